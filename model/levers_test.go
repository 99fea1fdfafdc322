package model

import (
	"errors"
	"math"
	"testing"
)

// Every lever names a parameter, its large step is a whole number of small
// steps, and its decimals show one small step.
func TestLeversWellFormed(t *testing.T) {
	seen := map[string]bool{}
	for _, l := range Levers {
		if _, ok := SpecByKey(l.Key); !ok {
			t.Errorf("lever %q names no parameter", l.Key)
			continue
		}
		if seen[l.Key] {
			t.Errorf("lever %q listed twice", l.Key)
		}
		seen[l.Key] = true
		if k := l.BigStep / l.Step; math.Abs(k-math.Round(k)) > 1e-9 || k < 2 {
			t.Errorf("%s: big step %g is not a whole number (≥ 2) of small steps %g", l.Key, l.BigStep, l.Step)
		}
		if got := l.Format(l.Step); got == l.Format(0) {
			t.Errorf("%s: %d decimals do not show a step of %g", l.Key, l.Decimals, l.Step)
		}
		if len(l.Short) > 8 || l.Short == "" || l.Name == "" {
			t.Errorf("%s: names %q / %q", l.Key, l.Name, l.Short)
		}
	}
	// The order: preload, contractility, resistance, rate first.
	want := []string{"filling_pressure_mmhg", "ees_mmhg_per_ml", "resistance_mmhg_s_per_ml", "heart_rate_bpm"}
	for i, k := range want {
		if Levers[i].Key != k {
			t.Errorf("lever %d is %s, want %s", i, Levers[i].Key, k)
		}
	}
}

func TestLeverNudge(t *testing.T) {
	lever := func(key string) Lever {
		for _, l := range Levers {
			if l.Key == key {
				return l
			}
		}
		t.Fatalf("no lever %s", key)
		return Lever{}
	}
	fill, ees, b := lever("filling_pressure_mmhg"), lever("ees_mmhg_per_ml"), lever("edpvr_b_per_ml")
	cases := []struct {
		l     Lever
		v     float64
		dir   int
		big   bool
		want  float64
		limit bool
	}{
		{fill, 10, 1, false, 11, false},
		{fill, 10, -1, false, 9, false},
		{fill, 10, 1, true, 15, false},
		{fill, 10, -1, true, 5, false},
		{fill, 12, 1, true, 17, false},
		{fill, 10.4, 1, false, 11, false},  // off the grid: to the next grid point
		{fill, 10.4, -1, false, 10, false}, // … either way
		{ees, 2.5, 1, false, 2.6, false},   // no 2.6000000000000001
		{ees, 0.3, -1, false, 0.2, false},  // the lower limit itself is allowed
		{ees, 0.2, -1, false, 0.2, true},   // at the limit: stays, says so
		{ees, 9.8, 1, true, 10, true},      // a large step stops at the limit
		{b, 0.027, 1, false, 0.028, false}, //
		{b, 0.027, -1, true, 0.022, false}, //
		{fill, 39, 1, true, 40, true},      //
		{fill, 1, -1, false, 1, true},      //
	}
	for _, c := range cases {
		got, err := c.l.Nudge(c.v, c.dir, c.big)
		if got != c.want {
			t.Errorf("%s from %g dir %d big %v: %v, want %v", c.l.Key, c.v, c.dir, c.big, got, c.want)
		}
		var le *LimitError
		if isLim := errors.As(err, &le); isLim != c.limit {
			t.Errorf("%s from %g dir %d big %v: limit error %v, want %v", c.l.Key, c.v, c.dir, c.big, err, c.limit)
		} else if isLim && le.Value != c.want {
			t.Errorf("%s: limit error names %g, want %g", c.l.Key, le.Value, c.want)
		}
	}
	// The limit message names the lever, the range and the unit.
	_, err := ees.Nudge(0.2, -1, false)
	if err == nil || err.Error() != "Contractility Ees stops at 0.2 mmHg/mL (allowed 0.2 to 10 mmHg/mL)" {
		t.Errorf("limit message %v", err)
	}
}

// Many small steps up and back down return exactly to the start, so undo by
// nudging never drifts.
func TestLeverNudgeRoundTrip(t *testing.T) {
	for _, l := range Levers {
		s := l.Spec()
		start := l.Step * math.Round((s.Min+s.Max)/2/l.Step)
		v := start
		for range 7 {
			v, _ = l.Nudge(v, 1, false)
		}
		for range 7 {
			v, _ = l.Nudge(v, -1, false)
		}
		if math.Abs(v-start) > 1e-12 {
			t.Errorf("%s: %g up and down 7 steps gives %g", l.Key, start, v)
		}
	}
}
