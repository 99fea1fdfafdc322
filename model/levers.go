package model

import (
	"fmt"
	"math"
	"strconv"
)

// Lever is a parameter that the interactive explorer nudges, with the sizes
// of its steps. The steps are chosen so that one small step is the least
// change worth looking at in a catheter study and one large step a
// deliberate intervention (common practice, no source); values move on the
// grid of the small step, so they stay round.
type Lever struct {
	Key      string  // parameter key (see Specs)
	Name     string  // name for screens
	Short    string  // name for narrow screens, at most 8 characters
	Step     float64 // small step, in the parameter's unit
	BigStep  float64 // large step, a whole number of small steps
	Decimals int     // decimals that show one small step
}

// Levers lists the levers of the explorer in the order a user reaches for
// them: preload, contractility, afterload and rate first.
var Levers = []Lever{
	{"filling_pressure_mmhg", "Filling pressure", "Fill P", 1, 5, 0},
	{"ees_mmhg_per_ml", "Contractility Ees", "Ees", 0.1, 0.5, 1},
	{"resistance_mmhg_s_per_ml", "Systemic resistance", "R sys", 0.05, 0.25, 2},
	{"heart_rate_bpm", "Heart rate", "HR", 5, 20, 0},
	{"v0_ml", "ESPVR intercept V0", "V0", 5, 20, 0},
	{"edpvr_b_per_ml", "EDPVR stiffness B", "EDPVR B", 0.001, 0.005, 3},
	{"compliance_ml_per_mmhg", "Arterial compliance", "C art", 0.1, 0.5, 1},
	{"zc_mmhg_s_per_ml", "Aortic impedance Zc", "Zc", 0.01, 0.05, 2},
}

// Spec returns the parameter spec of the lever.
func (l Lever) Spec() Spec {
	s, ok := SpecByKey(l.Key)
	if !ok {
		panic("model: lever " + l.Key + " names no parameter") // a programming error, caught by the tests
	}
	return s
}

// Format writes v with the lever's decimals.
func (l Lever) Format(v float64) string {
	return strconv.FormatFloat(v, 'f', l.Decimals, 64)
}

// LimitError reports a nudge that the parameter's range stopped.
type LimitError struct {
	Lever Lever
	Value float64 // the limit the value stopped at
}

func (e *LimitError) Error() string {
	s := e.Lever.Spec()
	return fmt.Sprintf("%s stops at %s %s (%s)", e.Lever.Name, e.Lever.Format(e.Value), s.Unit, s.RangeText())
}

// Nudge moves v by one small step (or one large step when big is set) up
// (dir > 0) or down (dir < 0) on the grid of the small step: from a value
// between grid points, a small step goes to the next grid point. The result
// stays within the parameter's range; when the range stops the move, Nudge
// returns the limit and a *LimitError.
func (l Lever) Nudge(v float64, dir int, big bool) (float64, error) {
	s := l.Spec()
	const eps = 1e-9 // grid tolerance in steps, against rounding of v/Step
	k := v / l.Step
	var n float64
	switch {
	case dir > 0 && !big:
		n = math.Floor(k+eps) + 1
	case dir < 0 && !big:
		n = math.Ceil(k-eps) - 1
	case dir > 0:
		n = math.Floor((v+l.BigStep)/l.Step + eps)
	default:
		n = math.Ceil((v-l.BigStep)/l.Step - eps)
	}
	nv, _ := strconv.ParseFloat(strconv.FormatFloat(n*l.Step, 'f', l.Decimals, 64), 64)
	switch {
	case nv > s.Max:
		return s.Max, &LimitError{l, s.Max}
	case nv < s.Min:
		return s.Min, &LimitError{l, s.Min}
	}
	return nv, nil
}
