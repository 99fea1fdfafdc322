package model

import (
	"fmt"
	"math"
	"strconv"
)

// Params are the levers of the model. Every field but Circulation is in the
// unit named in its key (see Specs); Validate checks the ranges.
type Params struct {
	Circulation Circulation // held filling pressure or closed circulation

	FillingPressure  float64 // left-atrial (filling) pressure, mmHg: held, or the target of mean LAP in a closed circulation
	Ees              float64 // end-systolic elastance, slope of the ESPVR, mmHg/mL
	V0               float64 // volume intercept of the ESPVR (and origin of the EDPVR), mL
	EdpvrA           float64 // EDPVR scale A in P = A·(exp(B·(V−V0)) − 1), mmHg
	EdpvrB           float64 // EDPVR stiffness B, 1/mL
	Resistance       float64 // Windkessel peripheral resistance R, mmHg·s/mL
	Compliance       float64 // Windkessel compliance C, mL/mmHg
	Zc               float64 // aortic characteristic impedance, mmHg·s/mL
	VenousPressure   float64 // pressure the Windkessel drains to, mmHg
	HeartRate        float64 // beats per minute
	WallVolume       float64 // LV myocardial (wall) volume for wall stress, mL
	MitralResistance float64 // open mitral valve resistance, mmHg·s/mL
	AorticResistance float64 // open aortic valve resistance, mmHg·s/mL

	// The closed circulation (docs/science.md §9); unused in a held one.
	StressedVolume         float64 // blood volume above the unstressed volumes of all compartments, mL
	VenousCompliance       float64 // systemic venous compliance, mL/mmHg
	VenousReturnResistance float64 // from the systemic veins to the right atrium, mmHg·s/mL
	CavalOcclusion         float64 // share of the venous return path closed by a caval balloon, %
	RVEes                  float64 // right-ventricular end-systolic elastance, mmHg/mL
	RVV0                   float64 // RV ESPVR intercept and EDPVR origin, mL
	RVEdpvrA               float64 // RV EDPVR scale, mmHg
	RVEdpvrB               float64 // RV EDPVR stiffness, 1/mL
	PulmonaryResistance    float64 // pulmonary vascular resistance, mmHg·s/mL
	PulmonaryCompliance    float64 // pulmonary arterial compliance, mL/mmHg
	PulmonaryVenousComp    float64 // pulmonary venous compliance, mL/mmHg
	AtrialEmax             float64 // peak elastance of both atria, mmHg/mL
	AtrialEmin             float64 // passive elastance of both atria, mmHg/mL
	PRInterval             float64 // atrial activation onset before the ventricles', ms

	// Valve lesions and mechanical support (docs/science.md §11–12), in both
	// circulations. Each has an off value (DeviceOff) that means no lesion or
	// no device; a scenario that leaves one out has it off.
	AorticValveArea       float64 // effective orifice area of the open aortic valve, cm² (4 = normal)
	AorticRegurgitantArea float64 // regurgitant orifice area of the shut aortic valve, cm² (0 = none)
	MitralValveArea       float64 // effective orifice area of the open mitral valve, cm² (6 = normal)
	MitralRegurgitantArea float64 // effective regurgitant orifice area of the shut mitral valve, cm² (0 = none)
	PumpFlow              float64 // continuous-flow pump from LV to aorta: flow at zero head, L/min (0 = off)
	PumpHead              float64 // the pump's head at zero flow, mmHg
	BalloonVolume         float64 // aortic counterpulsation balloon, mL (0 = off)
	BalloonRatio          float64 // beats per inflation: 1 (1:1) or 2 (1:2)
}

// Spec describes one parameter: its key (unit in the name), unit, allowed
// range, meaning and the circulation it acts in.
type Spec struct {
	Key     string
	Name    string // short name for headings and screens, e.g. "Heart rate"
	Unit    string
	Min     float64
	Max     float64
	Meaning string
	field   func(*Params) *float64
	// only restricts the parameter to one circulation when set.
	only   bool
	onlyIn Circulation
	// Device marks a valve lesion or support device lever: Off is its value
	// when there is none, and a scenario may leave it out.
	Device bool
	Off    float64
	// Hint, when set, follows the allowed range in errors: why the range ends
	// where it does.
	Hint string
}

// ActsIn reports whether the parameter acts in circulation c.
func (s Spec) ActsIn(c Circulation) bool { return !s.only || s.onlyIn == c }

// Circulations names the circulations the parameter acts in: "held",
// "closed" or "both".
func (s Spec) Circulations() string {
	if !s.only {
		return "both"
	}
	return s.onlyIn.String()
}

// Get returns the parameter's value in p.
func (s Spec) Get(p Params) float64 { return *s.field(&p) }

// Set stores v as the parameter's value in p without checking the range.
func (s Spec) Set(p *Params, v float64) { *s.field(p) = v }

// Specs lists every parameter in a fixed order: the levers a user reaches for
// first come first. The ranges cover disease and exercise while keeping the
// solver in the region where a periodic steady state exists.
var Specs = []Spec{
	spec("filling_pressure_mmhg", "Filling pressure", "mmHg", 1, 40, "left-atrial filling pressure: held, or the mean LAP the closed circulation's volume is set to (preload lever)",
		func(p *Params) *float64 { return &p.FillingPressure }),
	spec("ees_mmhg_per_ml", "Ees", "mmHg/mL", 0.2, 10, "end-systolic elastance, slope of the ESPVR (contractility)",
		func(p *Params) *float64 { return &p.Ees }),
	spec("resistance_mmhg_s_per_ml", "Systemic resistance", "mmHg·s/mL", 0.2, 5, "systemic peripheral resistance R of the Windkessel",
		func(p *Params) *float64 { return &p.Resistance }),
	spec("heart_rate_bpm", "Heart rate", "bpm", 30, 180, "heart rate; systole shortens with the beat period",
		func(p *Params) *float64 { return &p.HeartRate }),
	spec("v0_ml", "V0", "mL", -30, 120, "volume intercept of the ESPVR and origin of the EDPVR",
		func(p *Params) *float64 { return &p.V0 }),
	spec("edpvr_a_mmhg", "EDPVR A", "mmHg", 0.01, 10, "EDPVR scale A in A·(exp(B·(V−V0)) − 1)",
		func(p *Params) *float64 { return &p.EdpvrA }),
	spec("edpvr_b_per_ml", "EDPVR B", "1/mL", 0.005, 0.2, "EDPVR stiffness B in A·(exp(B·(V−V0)) − 1)",
		func(p *Params) *float64 { return &p.EdpvrB }),
	spec("compliance_ml_per_mmhg", "Arterial compliance", "mL/mmHg", 0.2, 5, "arterial compliance C of the Windkessel",
		func(p *Params) *float64 { return &p.Compliance }),
	spec("zc_mmhg_s_per_ml", "Zc", "mmHg·s/mL", 0, 0.5, "aortic characteristic impedance Zc (0 gives a two-element Windkessel)",
		func(p *Params) *float64 { return &p.Zc }),
	only(Held, spec("venous_pressure_mmhg", "Venous pressure", "mmHg", 0, 25, "venous pressure the Windkessel drains to (held circulation)",
		func(p *Params) *float64 { return &p.VenousPressure })),
	spec("wall_volume_ml", "Wall volume", "mL", 50, 500, "LV wall (myocardial) volume, for wall stress and O2 use",
		func(p *Params) *float64 { return &p.WallVolume }),
	spec("mitral_resistance_mmhg_s_per_ml", "Mitral valve resistance", "mmHg·s/mL", 0.001, 0.5, "resistance of the open mitral valve",
		func(p *Params) *float64 { return &p.MitralResistance }),
	spec("aortic_resistance_mmhg_s_per_ml", "Aortic valve resistance", "mmHg·s/mL", 0.001, 1, "resistance of the open aortic valve",
		func(p *Params) *float64 { return &p.AorticResistance }),
	only(Closed, spec("stressed_volume_ml", "Stressed volume", "mL", 100, 5000, "blood volume above the unstressed volume of every compartment (closed circulation)",
		func(p *Params) *float64 { return &p.StressedVolume })),
	only(Closed, spec("venous_compliance_ml_per_mmhg", "Venous compliance", "mL/mmHg", 10, 400, "compliance of the systemic veins",
		func(p *Params) *float64 { return &p.VenousCompliance })),
	only(Closed, spec("venous_return_resistance_mmhg_s_per_ml", "Venous return resistance", "mmHg·s/mL", 0.005, 0.5, "resistance from the systemic veins to the right atrium",
		func(p *Params) *float64 { return &p.VenousReturnResistance })),
	only(Closed, spec("caval_occlusion_pct", "Caval occlusion", "%", 0, 95, "share of the venous return path closed by a caval balloon (0 = open)",
		func(p *Params) *float64 { return &p.CavalOcclusion })),
	only(Closed, spec("rv_ees_mmhg_per_ml", "RV Ees", "mmHg/mL", 0.1, 5, "right-ventricular end-systolic elastance",
		func(p *Params) *float64 { return &p.RVEes })),
	only(Closed, spec("rv_v0_ml", "RV V0", "mL", -30, 150, "RV ESPVR intercept and EDPVR origin",
		func(p *Params) *float64 { return &p.RVV0 })),
	only(Closed, spec("rv_edpvr_a_mmhg", "RV EDPVR A", "mmHg", 0.01, 10, "RV EDPVR scale A",
		func(p *Params) *float64 { return &p.RVEdpvrA })),
	only(Closed, spec("rv_edpvr_b_per_ml", "RV EDPVR B", "1/mL", 0.002, 0.2, "RV EDPVR stiffness B",
		func(p *Params) *float64 { return &p.RVEdpvrB })),
	only(Closed, spec("pulmonary_resistance_mmhg_s_per_ml", "Pulmonary resistance", "mmHg·s/mL", 0.01, 1.5, "pulmonary vascular resistance",
		func(p *Params) *float64 { return &p.PulmonaryResistance })),
	only(Closed, spec("pulmonary_compliance_ml_per_mmhg", "Pulmonary compliance", "mL/mmHg", 0.5, 20, "pulmonary arterial compliance",
		func(p *Params) *float64 { return &p.PulmonaryCompliance })),
	only(Closed, spec("pulmonary_venous_compliance_ml_per_mmhg", "Pulmonary venous compliance", "mL/mmHg", 1, 60, "pulmonary venous compliance",
		func(p *Params) *float64 { return &p.PulmonaryVenousComp })),
	only(Closed, spec("atrial_emax_mmhg_per_ml", "Atrial Emax", "mmHg/mL", 0.05, 3, "peak elastance of the contracting atria",
		func(p *Params) *float64 { return &p.AtrialEmax })),
	only(Closed, spec("atrial_emin_mmhg_per_ml", "Atrial Emin", "mmHg/mL", 0.02, 1, "passive elastance of the atria",
		func(p *Params) *float64 { return &p.AtrialEmin })),
	only(Closed, spec("pr_interval_ms", "PR interval", "ms", 60, 300, "onset of atrial contraction before the ventricles'",
		func(p *Params) *float64 { return &p.PRInterval })),
	device(NormalAorticValveArea, "0 would shut the valve; 4 cm² is a normal adult valve [memory, docs/science.md §11]",
		spec("aortic_valve_area_cm2", "Aortic valve area", "cm²", 0.3, NormalAorticValveArea,
			"effective orifice area of the open aortic valve; 4 is a normal valve (no stenosis)",
			func(p *Params) *float64 { return &p.AorticValveArea })),
	device(0, "0 is a competent valve; from 0.30 cm² aortic regurgitation is already severe [memory, docs/science.md §11]",
		spec("aortic_regurgitant_area_cm2", "Aortic regurgitant area", "cm²", 0, 0.8,
			"regurgitant orifice area of the shut aortic valve (0 = no regurgitation)",
			func(p *Params) *float64 { return &p.AorticRegurgitantArea })),
	device(NormalMitralValveArea, "0 would shut the valve; 6 cm² is a normal adult valve [memory, docs/science.md §11]",
		spec("mitral_valve_area_cm2", "Mitral valve area", "cm²", 0.5, NormalMitralValveArea,
			"effective orifice area of the open mitral valve; 6 is a normal valve (no stenosis)",
			func(p *Params) *float64 { return &p.MitralValveArea })),
	device(0, "0 is a competent valve; from 0.40 cm² mitral regurgitation is already severe [memory, docs/science.md §11]",
		spec("mitral_regurgitant_area_cm2", "Mitral regurgitant area", "cm²", 0, 1,
			"effective regurgitant orifice area of the shut mitral valve (0 = no regurgitation)",
			func(p *Params) *float64 { return &p.MitralRegurgitantArea })),
	device(0, "0 turns the pump off [docs/science.md §12]",
		spec("pump_flow_l_per_min", "Pump flow", "L/min", 0, 8,
			"continuous-flow pump from LV to aorta: its flow at zero head at the set speed (0 = off)",
			func(p *Params) *float64 { return &p.PumpFlow })),
	device(defaultPumpHead, "a pump with a lower head cannot hold the aortic pressure: it runs backwards through diastole and no supported steady beat settles [docs/science.md §12]",
		spec("pump_head_mmhg", "Pump head", "mmHg", 60, 300,
			"the pump's head (outlet less inlet pressure) at zero flow; its flow falls linearly with head",
			func(p *Params) *float64 { return &p.PumpHead })),
	device(0, "adult balloons hold 25–50 mL; a larger one does not fit the descending aorta [memory, docs/science.md §12]",
		spec("balloon_volume_ml", "Balloon volume", "mL", 0, maxBalloonVolume,
			"aortic counterpulsation balloon: inflates at aortic valve closure, empty before ejection (0 = off)",
			func(p *Params) *float64 { return &p.BalloonVolume })),
	device(1, "1 inflates every beat (1:1), 2 every other beat (1:2)",
		spec("balloon_ratio", "Balloon ratio", "beats", 1, 2,
			"beats per balloon inflation: 1 (every beat, 1:1) or 2 (every other beat, 1:2)",
			func(p *Params) *float64 { return &p.BalloonRatio })),
}

func spec(key, name, unit string, lo, hi float64, meaning string, f func(*Params) *float64) Spec {
	return Spec{Key: key, Name: name, Unit: unit, Min: lo, Max: hi, Meaning: meaning, field: f}
}

func only(c Circulation, s Spec) Spec { s.only, s.onlyIn = true, c; return s }

func device(off float64, hint string, s Spec) Spec {
	s.Device, s.Off, s.Hint = true, off, hint
	return s
}

// DevicesOff returns p with every lesion and support lever at its off value.
func (p Params) DevicesOff() Params {
	for _, s := range Specs {
		if s.Device {
			s.Set(&p, s.Off)
		}
	}
	return p
}

// HasDevice reports whether any lesion or support lever of p is on.
func (p Params) HasDevice() bool {
	for _, s := range Specs {
		if s.Device && s.Get(p) != s.Off {
			return true
		}
	}
	return false
}

// SpecByKey returns the spec of a parameter key.
func SpecByKey(key string) (Spec, bool) {
	for _, s := range Specs {
		if s.Key == key {
			return s, true
		}
	}
	return Spec{}, false
}

// Keys returns every parameter key in the order of Specs.
func Keys() []string {
	k := make([]string, len(Specs))
	for i, s := range Specs {
		k[i] = s.Key
	}
	return k
}

// maxFilledVolume caps the passive volume at the filling pressure: beyond it
// the EDPVR is too flat for a heart and the solver leaves its sane region.
const maxFilledVolume = 800 // mL

// minFilling is the least filling above V0, mL, that makes a beat worth measuring.
const minFilling = 10

// ParamError reports a parameter value that is not allowed.
type ParamError struct {
	Key    string
	Value  float64
	Reason string // what is wrong, with the allowed range and unit
}

func (e *ParamError) Error() string {
	return fmt.Sprintf("%s = %s: %s", e.Key, FormatValue(e.Value), e.Reason)
}

// FormatValue writes a parameter value in at most 12 significant digits, so
// that a value computed by a ramp or a factor (195.49999999999997) reads as
// the number meant (195.5).
func FormatValue(v float64) string { return strconv.FormatFloat(v, 'g', 12, 64) }

// RangeText describes the allowed range of a spec, e.g. "allowed 1 to 40 mmHg".
func (s Spec) RangeText() string {
	return fmt.Sprintf("allowed %g to %g %s", s.Min, s.Max, s.Unit)
}

// Check returns a *ParamError if v is not finite or outside the spec's range.
func (s Spec) Check(v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return &ParamError{s.Key, v, "not a finite number; " + s.RangeText()}
	}
	if v < s.Min || v > s.Max {
		msg := "out of range; " + s.RangeText()
		if s.Hint != "" {
			msg += " (" + s.Hint + ")"
		}
		return &ParamError{s.Key, v, msg}
	}
	return nil
}

// Validate checks every parameter against its range, and the combinations
// that would leave the model without a sensible heart.
func (p Params) Validate() error {
	if p.Circulation != Held && p.Circulation != Closed {
		return fmt.Errorf("circulation %d: allowed held or closed", p.Circulation)
	}
	for _, s := range Specs {
		if !s.ActsIn(p.Circulation) {
			continue
		}
		if err := s.Check(*s.field(&p)); err != nil { // one copy of p, not one per parameter
			return err
		}
	}
	if p.Circulation == Closed {
		if period := 60000 / p.HeartRate; !(p.PRInterval < 0.8*period) {
			return &ParamError{"pr_interval_ms", p.PRInterval, fmt.Sprintf(
				"at heart_rate_bpm = %g the beat lasts %.0f ms; the PR interval must be shorter than %.0f ms (0.8 of the beat)",
				p.HeartRate, period, 0.8*period)}
		}
	}
	if err := p.validateDevices(); err != nil {
		return err
	}
	if x := p.FilledVolume() - p.V0; !(x >= minFilling) {
		return &ParamError{"filling_pressure_mmhg", p.FillingPressure, fmt.Sprintf(
			"with edpvr_a_mmhg = %g and edpvr_b_per_ml = %g the ventricle would fill only %.1f mL above v0_ml "+
				"(ln(1 + P/A)/B); at least %d mL is needed for a beat: raise the filling pressure or soften the EDPVR",
			p.EdpvrA, p.EdpvrB, x, minFilling)}
	}
	if v := p.FilledVolume(); !(v <= maxFilledVolume) {
		return &ParamError{"filling_pressure_mmhg", p.FillingPressure, fmt.Sprintf(
			"with edpvr_a_mmhg = %g and edpvr_b_per_ml = %g the ventricle would fill to %.0f mL (v0_ml + ln(1 + P/A)/B); "+
				"at most %d mL is allowed: lower the filling pressure or stiffen the EDPVR", p.EdpvrA, p.EdpvrB, v, maxFilledVolume)}
	}
	return nil
}

// FilledVolume is the volume at which the EDPVR reaches the filling pressure,
// V0 + ln(1 + P/A)/B: the most the ventricle can fill in a long diastole, mL.
func (p Params) FilledVolume() float64 { return p.volumeAt(p.FillingPressure) }

// volumeAt is the volume at which the EDPVR reaches pressure pr, mL.
func (p Params) volumeAt(pr float64) float64 { return p.V0 + math.Log1p(pr/p.EdpvrA)/p.EdpvrB }

// With returns a copy of p with key set to v; the value is not range-checked.
func (p Params) With(key string, v float64) (Params, error) {
	s, ok := SpecByKey(key)
	if !ok {
		return p, fmt.Errorf("unknown parameter %q (see `pvcouple params`)", key)
	}
	s.Set(&p, v)
	return p, nil
}
