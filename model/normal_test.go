package model

import (
	"math"
	"testing"
)

// The normal ranges follow docs/science.md §3 and §8; the derived ones are
// recomputed here from the published means and SDs.
func TestNormalRanges(t *testing.T) {
	want := []struct {
		key       string
		low, high float64
		source    string
	}{
		// Hudsmith et al. 2005, JCMR 7:775 (CMR): women 135 ± 26, men 160 ± 29 mL; mean ± 2 SD over both.
		{"edv_ml", 135 - 2*26, 160 + 2*29, "Hudsmith"},
		// Hudsmith et al. 2005: ESV women 42 ± 12, men 50 ± 16 mL.
		{"esv_ml", 42 - 2*12, 50 + 2*16, "Hudsmith"},
		// Petersen et al. 2017 (UK Biobank): EF 58–61 ± 5 %.
		{"ef_pct", 58 - 2*5, 61 + 2*5, "Petersen"},
		// docs/science.md §3 from memory: Ea 1.2–2.0, Ees 1.5–3, Ea/Ees 0.5–0.9.
		{"ea_mmhg_per_ml", 1.2, 2.0, "memory"},
		{"ees_mmhg_per_ml", 1.5, 3, "memory"},
		{"ea_ees_ratio", 0.5, 0.9, "memory"},
		// docs/science.md §8 from memory: LVEDP above 16 mmHg is raised (Paulus 2007).
		{"edp_mmhg", 4, 16, "Paulus"},
		// docs/science.md §3 derived: SW/PVA = 1/(1 + ½·Ea/Ees) at Ea/Ees 0.9 and 0.5, to two decimals.
		{"efficiency", math.Round(100/(1+0.5*0.9)) / 100, 1 / (1 + 0.5*0.5), "derived"},
	}
	for _, w := range want {
		r, ok := NormalRangeOf(w.key)
		if !ok {
			t.Errorf("%s: no normal range", w.key)
			continue
		}
		if math.Abs(r.Low-w.low) > 1e-9 || math.Abs(r.High-w.high) > 1e-9 {
			t.Errorf("%s: range %g–%g, want %g–%g (%s)", w.key, r.Low, r.High, w.low, w.high, w.source)
		}
	}
	for _, r := range NormalRanges {
		if _, ok := MetricByKey(r.Key); !ok {
			t.Errorf("normal range for unknown metric %s", r.Key)
		}
		if !(r.Low < r.High) || r.Source == "" {
			t.Errorf("%s: range %g–%g, source %q", r.Key, r.Low, r.High, r.Source)
		}
	}
}

func TestClassifyAndChange(t *testing.T) {
	r, _ := NormalRangeOf("edp_mmhg")
	for _, c := range []struct {
		v    float64
		want int
	}{{3.9, -1}, {4, 0}, {10, 0}, {16, 0}, {16.1, 1}, {math.NaN(), 0}} {
		if got := r.Classify(c.v); got != c.want {
			t.Errorf("Classify(%g) = %d, want %d", c.v, got, c.want)
		}
	}
	if d, p := Change(110, 100); d != 10 || p != 10 {
		t.Errorf("Change(110, 100) = %g, %g", d, p)
	}
	if d, p := Change(-3, -2); d != -1 || p != -50 {
		t.Errorf("Change(-3, -2) = %g, %g; the percentage is of |base|", d, p)
	}
	if _, p := Change(1, 0); !math.IsNaN(p) {
		t.Errorf("Change from 0: %g%%, want NaN", p)
	}
	if d, p := Change(math.NaN(), 1); !math.IsNaN(d) || !math.IsNaN(p) {
		t.Errorf("Change of NaN: %g, %g", d, p)
	}
}
