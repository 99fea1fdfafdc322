package sweep_test

import (
	"math"
	"testing"

	"pvcouple/model"
	"pvcouple/model/sweep"
)

// resistanceSweep solves the normal preset (Ees 2.5 mmHg/mL fixed) in the
// held circulation, where the filling pressure and so EDV stay as the
// theories below assume, over resistances 0.2–5 mmHg·s/mL in steps of 0.05,
// which takes Ea/Ees from about 0.19 to 2.6, and returns Ea/Ees, stroke work
// and efficiency per point.
func resistanceSweep(t *testing.T, filling float64) (ratio, sw, eff []float64) {
	ratio, sw, eff, _ = resistanceSweepVO2(t, filling)
	return ratio, sw, eff
}

// resistanceSweepVO2 is resistanceSweep with the mechanical efficiency SW/VO2.
func resistanceSweepVO2(t *testing.T, filling float64) (ratio, sw, eff, mech []float64) {
	t.Helper()
	base := normal(t)
	base.Circulation, base.StressedVolume = model.Held, 0
	base.FillingPressure = filling
	g := sweep.Grid{Base: base, Axes: []sweep.Axis{{Key: "resistance_mmhg_s_per_ml", From: 0.2, To: 5, N: 97}}}
	res := run(t, g, sweep.Options{})
	if n := res.Count(sweep.OK); n != 97 {
		t.Fatalf("%d of 97 points settled", n)
	}
	ratio, _ = res.Field("ea_ees_ratio")
	sw, _ = res.Field("sw_mmhg_ml")
	eff, _ = res.Field("efficiency")
	mech, _ = res.Field("mechanical_efficiency")
	return ratio, sw, eff, mech
}

// Work per oxygen, SW/VO2, is the efficiency measured in hearts: commonly
// put near 20–25 % in the human heart at rest [memory], here 15–30 %, and
// below SW/PVA at every load, because the oxygen used also pays for the PVA
// that is not work and for the part of VO2 that does not grow with PVA
// (docs/science.md §3–4 [derived]). That unloaded part gives SW/VO2 an optimum
// over the afterload, at Ea/Ees = 1/√(1 + a·Ees·(EDV−V0)²/(2b)) for the ideal
// loop [derived]; with Suga's per-100 g constants and a human-sized loop it
// lies below the sweep's lowest Ea/Ees (about 0.2), lower than the 0.70 ± 0.15
// measured in canine hearts (De Tombe et al. 1993) [paper]: SW/VO2 here falls
// over the whole sweep, more slowly than SW/PVA.
func TestMechanicalEfficiency(t *testing.T) {
	ratio, _, eff, mech := resistanceSweepVO2(t, 10)
	for i := range mech {
		if !(mech[i] < eff[i]) {
			t.Errorf("Ea/Ees %.3f: SW/VO2 %.3f not below SW/PVA %.3f", ratio[i], mech[i], eff[i])
		}
		if near := math.Abs(ratio[i]-0.53) < 0.03; near && !(mech[i] > 0.15 && mech[i] < 0.30) {
			t.Errorf("SW/VO2 at rest (Ea/Ees %.2f) %.3f, want 0.15–0.30", ratio[i], mech[i])
		}
	}
	n := len(mech) - 1
	if !(mech[n]/mech[0] > eff[n]/eff[0]) {
		t.Errorf("SW/VO2 falls by %.2f and SW/PVA by %.2f over the sweep; want the first to fall less", mech[n]/mech[0], eff[n]/eff[0])
	}
}

// Sunagawa, Maughan & Sagawa 1985 (Circ Res 56:586; docs/science.md §3) [paper]:
// with a linear ESPVR and a fixed end-diastolic volume, stroke work
// SW = Ees·(EDV−V0)²·r/(1+r)², r = Ea/Ees, is largest at r = 1.
//
// Tolerance: that curve is flat at its top; it stays within 2 % of its
// maximum for r in [0.75, 1.33]. The model departs from the theory's
// assumptions by a few per cent (ejection is not at a constant pressure ESP,
// so SW differs from ESP·SV by about 2 % near the peak; EDP is 10 mmHg, not
// 0; EDV moves a little with the load), enough to move the argmax anywhere
// within that band but not beyond it. So the test asks for the peak in
// [0.75, 1.33]. (This model puts it at 0.98, logged.)
//
// ⚠ Measured optima are lower: stroke work peaked at Ea/Ees 0.80 ± 0.16
// and efficiency at 0.70 ± 0.15 in isolated canine hearts (De Tombe et al.
// 1993, Am J Physiol 264:H1817) [paper]. Theory also puts maximal efficiency
// at Ea/Ees = 0.5 (Burkhoff & Sagawa 1986) [memory], which this model's
// SW/PVA, like the formula 1/(1 + ½·Ea/Ees), does not show: it falls
// monotonically (checked below). The model follows the theory; a user reading
// a map should know the measured optimum lies lower.
func TestStrokeWorkPeaksNearEaEesOne(t *testing.T) {
	ratio, sw, _ := resistanceSweep(t, 10)
	if ratio[0] > 0.5 || ratio[len(ratio)-1] < 2 {
		t.Fatalf("sweep spans Ea/Ees %.2f to %.2f; it must bracket 1 widely", ratio[0], ratio[len(ratio)-1])
	}
	_, best := sweep.Extremes(sw)
	if best == 0 || best == len(sw)-1 {
		t.Fatalf("stroke work is largest at the end of the sweep (Ea/Ees %.2f)", ratio[best])
	}
	if r := ratio[best]; r < 0.75 || r > 1.33 {
		t.Errorf("stroke work peaks at Ea/Ees = %.3f, want 1 (0.75 to 1.33)", r)
	}
	t.Logf("stroke work peaks at Ea/Ees = %.3f (SW %.0f mmHg·mL)", ratio[best], sw[best])
}

// Mechanical efficiency SW/PVA falls as Ea/Ees rises (docs/science.md §3, from
// SW/PVA = 1/(1 + ½·Ea/Ees) [derived]), across the whole sweep.
func TestEfficiencyFallsWithEaEes(t *testing.T) {
	ratio, _, eff := resistanceSweep(t, 10)
	for i := 1; i < len(eff); i++ {
		if !(ratio[i] > ratio[i-1]) {
			t.Fatalf("Ea/Ees does not rise with resistance: %.4f then %.4f", ratio[i-1], ratio[i])
		}
		if !(eff[i] < eff[i-1]) {
			t.Errorf("efficiency %.4f at Ea/Ees %.3f does not fall from %.4f at %.3f", eff[i], ratio[i], eff[i-1], ratio[i-1])
		}
	}
}

// For a linear ESPVR and EDP ≈ 0, SW/PVA = 1/(1 + ½·Ea/Ees) (docs/science.md §3
// [derived]: SW = ESP·SV and PE = ½·ESP·(ESV−V0), with ESP = Ea·SV =
// Ees·(ESV−V0)). The check runs where EDP is small: filling pressure 2 mmHg,
// so EDP = 2 mmHg against an ESP of 28–130 mmHg.
//
// Tolerance 3 % (relative): the remaining assumption, ejection at the
// constant pressure ESP, is off in the model — SW differs from ESP·SV by up to
// about 25 % at the lowest Ea/Ees (a short, high ejection peak) and under 2 %
// above Ea/Ees 1. To first order an error ε in SW moves SW/PVA by
// (1 − SW/PVA)·ε, that is ≤ 0.1·25 % at the low end and ≤ 0.6·2 % at the high
// end: about 2.5 % at most. (Measured here: under 2 %.)
func TestEfficiencyMatchesFormula(t *testing.T) {
	ratio, _, eff := resistanceSweep(t, 2)
	worst := 0.0
	for i := range eff {
		want := 1 / (1 + 0.5*ratio[i])
		d := math.Abs(eff[i]-want) / want
		worst = math.Max(worst, d)
		if d > 0.03 {
			t.Errorf("Ea/Ees %.3f: SW/PVA %.4f, formula %.4f", ratio[i], eff[i], want)
		}
	}
	t.Logf("largest relative difference from 1/(1 + ½·Ea/Ees): %.2g", worst)
}
