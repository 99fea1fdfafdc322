package model

import (
	"math"
	"testing"
)

// idealLoop is a rectangular pressure–volume loop with corners (EDV, 0),
// (EDV, Pes), (ESV, Pes), (ESV, 0), sampled densely over a period.
func idealLoop(edv, esv, pes, period float64) BeatSamples {
	var b BeatSamples
	const per = 50 // samples per side
	corners := [][2]float64{{edv, 0}, {edv, pes}, {esv, pes}, {esv, 0}, {edv, 0}}
	for side := 0; side < 4; side++ {
		a, c := corners[side], corners[side+1]
		for i := 0; i < per; i++ {
			f := float64(i) / per
			b.V = append(b.V, a[0]+f*(c[0]-a[0]))
			b.P = append(b.P, a[1]+f*(c[1]-a[1]))
		}
	}
	b.V = append(b.V, edv)
	b.P = append(b.P, 0)
	for i := range b.V {
		b.T = append(b.T, period*float64(i)/float64(len(b.V)-1))
	}
	return b
}

// docs/science.md §3 worked case [derived]: Ees 2.0, V0 10, EDV 120, HR 75,
// Ea = R/T = 1.25 → SV 67.692 mL, Pes 84.615 mmHg, ESV 52.308 mL, EF 0.5641,
// PE 1789.9 mmHg·mL. A loop with that end-systolic corner must measure so.
func TestMeasureWorkedCouplingCase(t *testing.T) {
	const ees, v0, edv, ea = 2.0, 10.0, 120.0, 1.25
	sv := (edv - v0) / (1 + ea/ees)
	pes := ea * sv
	b := idealLoop(edv, edv-sv, pes, 0.8)
	k := Unknown()
	k.V0, k.Ees = v0, ees
	m, err := Measure(b, k)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"SV", m.SV, 67.692}, {"ESP", m.ESP, 84.615}, {"ESV", m.ESV, 52.308},
		{"EF", m.EF, 56.41}, {"PE", m.PE, 1789.9}, {"Ea", m.Ea, 1.25}, {"HR", m.HR, 75},
		{"SW", m.SW, 84.615 * 67.692}, {"Ea/Ees", m.EaEes, 0.625},
	} {
		// The sheet gives five significant figures.
		if math.Abs(c.got-c.want) > 1e-4*math.Abs(c.want) {
			t.Errorf("%s = %.6g, want %.6g", c.name, c.got, c.want)
		}
	}
	if !math.IsNaN(m.MAP) || !math.IsNaN(m.EDStress) || !math.IsNaN(m.EaRT) {
		t.Errorf("unknowns should give NaN: MAP %g, stress %g, Ea≈R/T %g", m.MAP, m.EDStress, m.EaRT)
	}
	// For a linear ESPVR with EDP ≈ 0: SW/PVA = 1/(1 + ½·Ea/Ees) (docs/science.md §3, derived).
	if want := 1 / (1 + 0.5*ea/ees); math.Abs(m.Efficiency-want) > 1e-4 {
		t.Errorf("efficiency %.5f, want %.5f", m.Efficiency, want)
	}
	// VO2 = 1.53e-5·PVA + 0.019 mL O2 (Khalafbeigui, Suga & Sagawa 1979).
	if want := 1.53e-5*m.PVA + 0.019; math.Abs(m.VO2-want) > 1e-12 {
		t.Errorf("VO2 %.6f, want %.6f", m.VO2, want)
	}
}

// docs/science.md §7 check [derived]: P 117, r 2.4, h 0.8 → σm 200.4 ×10³ dyn/cm².
func TestWallStressGrossmanCheck(t *testing.T) {
	sphere := func(r float64) float64 { return 4 * math.Pi * r * r * r / 3 }
	v := sphere(2.4)
	wall := sphere(3.2) - v
	if got := wallStress(117, v, wall); math.Abs(got-200.4) > 0.05 {
		t.Errorf("σ = %.2f, want 200.4", got)
	}
	if !math.IsNaN(wallStress(100, 50, math.NaN())) {
		t.Error("unknown wall volume should give NaN")
	}
}

// Weiss's τ on an exact exponential P = 100·exp(−t/τ) recovers τ.
func TestWeissTauOnExponential(t *testing.T) {
	const tau = 0.040
	var ts, ps []float64
	for i := 0; i <= 300; i++ {
		tt := float64(i) * 1e-3
		ts = append(ts, tt)
		ps = append(ps, 100*math.Exp(-tt/tau))
	}
	if got := weissTau(ts, ps, 0, 5); math.Abs(got-40) > 1e-9 {
		t.Errorf("τ = %.12f ms, want 40", got)
	}
	if got := weissTau(ts, ps, 0, 200); !math.IsNaN(got) {
		t.Errorf("window with no points should give NaN, got %g", got)
	}
}

func TestMeasureRejectsBadInput(t *testing.T) {
	b := idealLoop(120, 50, 100, 0.8)
	if _, err := Measure(BeatSamples{T: b.T[:5], P: b.P[:5], V: b.V[:5]}, Unknown()); err == nil {
		t.Error("5 samples accepted")
	}
	if _, err := Measure(BeatSamples{T: b.T, P: b.P[:10], V: b.V}, Unknown()); err == nil {
		t.Error("ragged columns accepted")
	}
	k := Unknown()
	k.V0 = 500
	if _, err := Measure(b, k); err == nil {
		t.Error("V0 above every volume accepted")
	}
}

func TestCentralDifferenceOfLine(t *testing.T) {
	ts := []float64{0, 1, 2, 3}
	d := centralDiff(ts, []float64{1, 3, 5, 7})
	for i, v := range d {
		if v != 2 {
			t.Errorf("d[%d] = %g, want 2", i, v)
		}
	}
}
