package sweep_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"pvcouple/model"
	"pvcouple/model/sweep"
)

func TestAxisValues(t *testing.T) {
	a := sweep.Axis{Key: "ees_mmhg_per_ml", From: 0.3, To: 0.1, N: 3}
	if v := a.Values(); len(v) != 3 || v[0] != 0.3 || v[2] != 0.1 || math.Abs(v[1]-0.2) > 1e-15 {
		t.Errorf("values %v", v)
	}
	// The last value is To exactly, whatever the rounding of the steps.
	a = sweep.Axis{Key: "ees_mmhg_per_ml", From: 0.1, To: 0.7, N: 7}
	if a.Value(6) != 0.7 {
		t.Errorf("last value %v", a.Value(6))
	}
	if p := a.Position(0.4); math.Abs(p-3) > 1e-12 {
		t.Errorf("position of 0.4 = %v, want 3", p)
	}
	if p := a.Position(1.3); math.Abs(p-12) > 1e-12 {
		t.Errorf("position outside = %v, want 12", p)
	}
	one := sweep.Axis{Key: "ees_mmhg_per_ml", From: 2, To: 2, N: 1}
	if one.Value(0) != 2 || one.Position(2) != 0 || !math.IsNaN(one.Position(3)) {
		t.Error("one-value axis")
	}
	if s := a.String(); s != "ees_mmhg_per_ml=0.1:0.7:7" {
		t.Errorf("String %q", s)
	}
}

// Every mistake in a grid is refused with a message that names the key, the
// value, and the allowed range with its unit.
func TestGridValidate(t *testing.T) {
	base := normal(t)
	ees := func(from, to float64, n int) sweep.Axis {
		return sweep.Axis{Key: "ees_mmhg_per_ml", From: from, To: to, N: n}
	}
	for _, c := range []struct {
		name string
		axes []sweep.Axis
		want []string
	}{
		{"no axis", nil, []string{"at least one varied parameter"}},
		{"unknown key", []sweep.Axis{{Key: "ees", From: 1, To: 2, N: 3}}, []string{`"ees"`, "pvcouple params"}},
		{"from out of range", []sweep.Axis{ees(0.1, 2, 3)}, []string{"from value", "ees_mmhg_per_ml = 0.1", "allowed 0.2 to 10 mmHg/mL"}},
		{"to out of range", []sweep.Axis{ees(1, 12, 3)}, []string{"to value", "ees_mmhg_per_ml = 12", "allowed 0.2 to 10 mmHg/mL"}},
		{"not finite", []sweep.Axis{ees(math.NaN(), 2, 3)}, []string{"not a finite number"}},
		{"no values", []sweep.Axis{ees(1, 2, 0)}, []string{"0 values", "at least 1"}},
		{"one value, two ends", []sweep.Axis{ees(1, 2, 1)}, []string{"with 1 value", "must be equal"}},
		{"twice", []sweep.Axis{ees(1, 2, 3), ees(2, 3, 3)}, []string{"varied twice"}},
		{"too many", []sweep.Axis{ees(1, 2, 1000), {Key: "heart_rate_bpm", From: 60, To: 90, N: 1000}}, []string{"1000000 points", "250000"}},
	} {
		err := sweep.Grid{Base: base, Axes: c.axes}.Validate()
		if err == nil {
			t.Errorf("%s: accepted", c.name)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: %q lacks %q", c.name, err, w)
			}
		}
	}
	var pe *model.ParamError
	if err := (sweep.Grid{Base: base, Axes: []sweep.Axis{ees(1, 20, 2)}}).Validate(); !errors.As(err, &pe) || pe.Key != "ees_mmhg_per_ml" {
		t.Errorf("out-of-range error %v is not a *model.ParamError for the key", err)
	}
	bad := base
	bad.HeartRate = 500
	if err := (sweep.Grid{Base: bad, Axes: []sweep.Axis{ees(1, 2, 2)}}).Validate(); err == nil || !strings.Contains(err.Error(), "heart_rate_bpm") {
		t.Errorf("base out of range: %v", err)
	}
	// A varied key may be out of range in the base: the axis replaces it.
	bad = base
	bad.Ees = 50
	if err := (sweep.Grid{Base: bad, Axes: []sweep.Axis{ees(1, 2, 2)}}).Validate(); err != nil {
		t.Errorf("varied base value checked: %v", err)
	}
}

func TestGridIndexing(t *testing.T) {
	g := sweep.Grid{Base: normal(t), Axes: []sweep.Axis{
		{Key: "ees_mmhg_per_ml", From: 1, To: 3, N: 3},
		{Key: "resistance_mmhg_s_per_ml", From: 0.5, To: 2, N: 4},
	}}
	if g.Size() != 12 {
		t.Fatalf("size %d", g.Size())
	}
	idx := make([]int, 2)
	for i := 0; i < 12; i++ {
		g.Index(i, idx)
		if g.Flat(idx) != i {
			t.Fatalf("Flat(Index(%d)) = %d", i, g.Flat(idx))
		}
	}
	// Row-major, first axis slowest: point 7 is Ees index 1, R index 3.
	g.Index(7, idx)
	p := g.Params(idx)
	if idx[0] != 1 || idx[1] != 3 || p.Ees != 2 || p.Resistance != 2 || p.HeartRate != g.Base.HeartRate {
		t.Errorf("point 7: %v Ees %g R %g", idx, p.Ees, p.Resistance)
	}
	q := g.Base
	q.Ees, q.Resistance = 7, 0.3
	if !g.Matches(q) {
		t.Error("a change of a varied key should keep the grid")
	}
	q.HeartRate++
	if g.Matches(q) {
		t.Error("a change of another key should not")
	}
}

func TestMapAround(t *testing.T) {
	p := normal(t) // Ees 2.5, R 0.85, V0 5
	g, err := sweep.MapAround(p, "resistance_mmhg_s_per_ml", "ees_mmhg_per_ml", 40, 30)
	if err != nil {
		t.Fatal(err)
	}
	x, y := g.Axes[1], g.Axes[0]
	if x.Key != "resistance_mmhg_s_per_ml" || x.N != 40 || x.From != 0.425 || x.To != 1.7 {
		t.Errorf("x axis %v", x)
	}
	if y.Key != "ees_mmhg_per_ml" || y.N != 30 || y.From != 1.25 || y.To != 5 {
		t.Errorf("y axis %v", y)
	}
	// v0_ml may be negative: its span is ± a quarter of the range −30…120 mL, clipped.
	a, err := sweep.AxisAround("v0_ml", 5, 11)
	if err != nil || a.From != -30 || a.To != 42.5 {
		t.Errorf("v0 axis %v, %v", a, err)
	}
	// Clipped at the top of the range.
	if a, _ = sweep.AxisAround("ees_mmhg_per_ml", 8, 5); a.To != 10 || a.From != 4 {
		t.Errorf("ees axis %v", a)
	}
	for _, bad := range [][2]string{{"ees_mmhg_per_ml", "ees_mmhg_per_ml"}, {"nope", "ees_mmhg_per_ml"}, {"ees_mmhg_per_ml", "nope"}} {
		if _, err := sweep.MapAround(p, bad[0], bad[1], 10, 10); err == nil {
			t.Errorf("%v accepted", bad)
		}
	}
	if _, err := sweep.MapAround(p, "ees_mmhg_per_ml", "heart_rate_bpm", 1, 10); err == nil {
		t.Error("one-column map accepted")
	}
	for _, k := range sweep.MapMetrics {
		if _, ok := model.MetricByKey(k); !ok {
			t.Errorf("map metric %s is not a metric", k)
		}
	}
}

func TestExtremes(t *testing.T) {
	nan := math.NaN()
	for _, c := range []struct {
		f      []float64
		lo, hi int
	}{
		{[]float64{nan, 3, -1, 7, nan, 7}, 2, 3},
		{[]float64{nan, nan}, -1, -1},
		{nil, -1, -1},
		{[]float64{5}, 0, 0},
	} {
		if lo, hi := sweep.Extremes(c.f); lo != c.lo || hi != c.hi {
			t.Errorf("%v: %d, %d; want %d, %d", c.f, lo, hi, c.lo, c.hi)
		}
	}
}
