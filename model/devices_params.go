package model

import "fmt"

// validateDevices checks the combinations of the lesion and support levers
// that their ranges alone do not: a regurgitant orifice must be smaller than
// its valve's open area, and the balloon ratio a whole 1 or 2.
func (p Params) validateDevices() error {
	if p.BalloonRatio != 1 && p.BalloonRatio != 2 {
		return &ParamError{"balloon_ratio", p.BalloonRatio,
			"allowed 1 (the balloon inflates every beat, 1:1) or 2 (every other beat, 1:2) beats"}
	}
	for _, v := range [2]struct {
		reg, open       string
		regArea, opened float64
	}{
		{"aortic_regurgitant_area_cm2", "aortic_valve_area_cm2", p.AorticRegurgitantArea, p.AorticValveArea},
		{"mitral_regurgitant_area_cm2", "mitral_valve_area_cm2", p.MitralRegurgitantArea, p.MitralValveArea},
	} {
		if v.regArea > 0 && !(v.regArea < v.opened) {
			return &ParamError{v.reg, v.regArea, fmt.Sprintf(
				"with %s = %g cm² the regurgitant orifice must be smaller than the open valve: allowed 0 to below %g cm²",
				v.open, v.opened, v.opened)}
		}
	}
	return nil
}

// checkSuction refuses a beat in which a pump draws the ventricle below its
// unstressed volume, where its pressure turns negative and a real inlet would
// draw the wall in (a suction event). It runs before the beat is measured, so
// that such a beat is named for what it is.
func checkSuction(b *Beat) error {
	p := &b.Params
	if !(p.PumpFlow > 0) {
		return nil
	}
	preload := "filling_pressure_mmhg"
	if p.Circulation == Closed {
		preload = "stressed_volume_ml"
	}
	if _, lo := extremes(b.PLV); lo < 0 {
		return &ImplausibleError{
			What: fmt.Sprintf("the pump draws the left ventricle empty: its pressure falls to %.1f mmHg, its volume below v0_ml = %g mL (a suction event)",
				lo, p.V0),
			Levers: leverValues(p, "pump_flow_l_per_min", "pump_head_mmhg", preload),
			Advice: "lower the pump flow or its head, or give volume, so that the ventricle keeps blood at the pump's inlet",
		}
	}
	return nil
}
