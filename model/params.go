package model

import (
	"fmt"
	"math"
	"strconv"
)

// Params are the levers of the model. Every field is in the unit named in its
// key (see Specs); Validate checks the ranges.
type Params struct {
	FillingPressure  float64 // left-atrial (filling) pressure, mmHg
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
}

// Spec describes one parameter: its key (unit in the name), unit, allowed
// range and meaning.
type Spec struct {
	Key     string
	Name    string // short name for headings and screens, e.g. "Heart rate"
	Unit    string
	Min     float64
	Max     float64
	Meaning string
	field   func(*Params) *float64
}

// Get returns the parameter's value in p.
func (s Spec) Get(p Params) float64 { return *s.field(&p) }

// Set stores v as the parameter's value in p without checking the range.
func (s Spec) Set(p *Params, v float64) { *s.field(p) = v }

// Specs lists every parameter in a fixed order: the levers a user reaches for
// first come first. The ranges cover disease and exercise while keeping the
// solver in the region where a periodic steady state exists.
var Specs = []Spec{
	{"filling_pressure_mmhg", "Filling pressure", "mmHg", 1, 40, "left-atrial filling pressure (preload lever)",
		func(p *Params) *float64 { return &p.FillingPressure }},
	{"ees_mmhg_per_ml", "Ees", "mmHg/mL", 0.2, 10, "end-systolic elastance, slope of the ESPVR (contractility)",
		func(p *Params) *float64 { return &p.Ees }},
	{"resistance_mmhg_s_per_ml", "Systemic resistance", "mmHg·s/mL", 0.2, 5, "systemic peripheral resistance R of the Windkessel",
		func(p *Params) *float64 { return &p.Resistance }},
	{"heart_rate_bpm", "Heart rate", "bpm", 30, 180, "heart rate; systolic duration scales with the beat period",
		func(p *Params) *float64 { return &p.HeartRate }},
	{"v0_ml", "V0", "mL", -30, 120, "volume intercept of the ESPVR and origin of the EDPVR",
		func(p *Params) *float64 { return &p.V0 }},
	{"edpvr_a_mmhg", "EDPVR A", "mmHg", 0.01, 10, "EDPVR scale A in A·(exp(B·(V−V0)) − 1)",
		func(p *Params) *float64 { return &p.EdpvrA }},
	{"edpvr_b_per_ml", "EDPVR B", "1/mL", 0.005, 0.2, "EDPVR stiffness B in A·(exp(B·(V−V0)) − 1)",
		func(p *Params) *float64 { return &p.EdpvrB }},
	{"compliance_ml_per_mmhg", "Arterial compliance", "mL/mmHg", 0.2, 5, "arterial compliance C of the Windkessel",
		func(p *Params) *float64 { return &p.Compliance }},
	{"zc_mmhg_s_per_ml", "Zc", "mmHg·s/mL", 0, 0.5, "aortic characteristic impedance Zc (0 gives a two-element Windkessel)",
		func(p *Params) *float64 { return &p.Zc }},
	{"venous_pressure_mmhg", "Venous pressure", "mmHg", 0, 25, "venous pressure the Windkessel drains to",
		func(p *Params) *float64 { return &p.VenousPressure }},
	{"wall_volume_ml", "Wall volume", "mL", 50, 500, "LV wall (myocardial) volume, for wall stress",
		func(p *Params) *float64 { return &p.WallVolume }},
	{"mitral_resistance_mmhg_s_per_ml", "Mitral valve resistance", "mmHg·s/mL", 0.001, 0.5, "resistance of the open mitral valve",
		func(p *Params) *float64 { return &p.MitralResistance }},
	{"aortic_resistance_mmhg_s_per_ml", "Aortic valve resistance", "mmHg·s/mL", 0.001, 1, "resistance of the open aortic valve",
		func(p *Params) *float64 { return &p.AorticResistance }},
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
	return fmt.Sprintf("%s = %s: %s", e.Key, strconv.FormatFloat(e.Value, 'g', -1, 64), e.Reason)
}

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
		return &ParamError{s.Key, v, "out of range; " + s.RangeText()}
	}
	return nil
}

// Validate checks every parameter against its range, and the combinations
// that would leave the model without a sensible heart.
func (p Params) Validate() error {
	for _, s := range Specs {
		if err := s.Check(s.Get(p)); err != nil {
			return err
		}
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
func (p Params) FilledVolume() float64 {
	return p.V0 + math.Log1p(p.FillingPressure/p.EdpvrA)/p.EdpvrB
}

// With returns a copy of p with key set to v; the value is not range-checked.
func (p Params) With(key string, v float64) (Params, error) {
	s, ok := SpecByKey(key)
	if !ok {
		return p, fmt.Errorf("unknown parameter %q (see `pvcouple params`)", key)
	}
	s.Set(&p, v)
	return p, nil
}
