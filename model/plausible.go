package model

import (
	"fmt"
	"strconv"
	"strings"
)

// ImplausibleError reports a beat no heart could give although every
// parameter is within its range: a ventricle emptied below zero volume, or a
// vessel drained below its unstressed volume (a negative pressure in a
// compliance). It names the levers that set it up.
type ImplausibleError struct {
	What   string   // what went wrong, with the numbers
	Levers []string // the parameters that lead there, "key = value unit"
	Advice string
}

func (e *ImplausibleError) Error() string {
	return fmt.Sprintf("no physiological beat: %s (with %s); %s", e.What, strings.Join(e.Levers, ", "), e.Advice)
}

// checkBeat refuses a beat whose volumes are impossible, so that no negative
// volume or ejection fraction outside 0–100 % is ever reported.
func checkBeat(b *Beat) error {
	p := &b.Params
	lever := func(keys ...string) []string { return leverValues(p, keys...) }
	if !(b.Metrics.SV > 0.01*b.Metrics.EDV) && !(p.PumpFlow > 0) {
		afterload := "venous_pressure_mmhg"
		if p.Circulation == Closed {
			afterload = "resistance_mmhg_s_per_ml"
		}
		return &ImplausibleError{
			What:   fmt.Sprintf("the left ventricle does not eject (SV %.1f mL of EDV %.1f mL): it cannot raise its pressure above the aortic pressure", b.Metrics.SV, b.Metrics.EDV),
			Levers: lever("ees_mmhg_per_ml", "filling_pressure_mmhg", afterload),
			Advice: "raise Ees or the filling, or lower the load, so that the aortic valve opens",
		}
	}
	if !(b.Metrics.VMin > 0) || !(b.Metrics.EF > 0 && b.Metrics.EF <= 100) {
		preload := "filling_pressure_mmhg"
		if p.Circulation == Closed {
			preload = "stressed_volume_ml"
		}
		return &ImplausibleError{
			What:   fmt.Sprintf("the left ventricle's volume would fall to %.1f mL from an EDV of %.1f mL", b.Metrics.VMin, b.Metrics.EDV),
			Levers: lever("v0_ml", preload, "ees_mmhg_per_ml", "edpvr_a_mmhg", "edpvr_b_per_ml"),
			Advice: "raise v0_ml or the filling, or lower Ees, so that the ventricle keeps a positive volume",
		}
	}
	if p.Circulation != Closed {
		return nil
	}
	u := p.unstressed()
	for c := SystemicArteries; c < NumCompartments; c++ {
		_, lo := extremes(b.V[c])
		switch c {
		case RightAtrium, RightVentricle, LeftAtrium:
			if !(lo > 0) {
				return &ImplausibleError{
					What:   fmt.Sprintf("the volume of the %s falls to %.1f mL", CompartmentNames[c], lo),
					Levers: lever("stressed_volume_ml", "rv_v0_ml", "rv_ees_mmhg_per_ml", "caval_occlusion_pct"),
					Advice: "give more volume or open the venous return so that the right heart and atria keep blood",
				}
			}
		default:
			if !(lo >= u[c]-1e-9*u[c]) {
				return &ImplausibleError{
					What: fmt.Sprintf("the volume of the %s falls to %.0f mL, %.1f mL below its unstressed volume (a negative pressure)",
						CompartmentNames[c], lo, u[c]-lo),
					Levers: lever("stressed_volume_ml", "caval_occlusion_pct", "venous_return_resistance_mmhg_s_per_ml"),
					Advice: "give more volume (a higher filling pressure or stressed volume) or open the venous return",
				}
			}
		}
	}
	return nil
}

// leverValues writes the levers keys of p as "key = value unit".
func leverValues(p *Params, keys ...string) []string {
	var out []string
	for _, k := range keys {
		s, _ := SpecByKey(k)
		out = append(out, fmt.Sprintf("%s = %s %s", k, formatG(s.Get(*p)), s.Unit))
	}
	return out
}

// formatG writes x in six significant digits.
func formatG(x float64) string { return strconv.FormatFloat(x, 'g', 6, 64) }
