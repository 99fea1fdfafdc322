package analysis

import (
	"math"
	"testing"
)

// near reports whether got rounds to want at the digits docs/science.md states:
// within half a unit of the last stated decimal place.
func near(got, want float64, decimals int) bool {
	return math.Abs(got-want) <= 0.5*math.Pow(10, -float64(decimals))
}

// Check values of docs/science.md §5 [derived from the formulas of Chen et al.
// 2001, JACC 38:2028]: Ps 120, Pd 80, SV 70, EF 0.60, tNd 0.20 →
// ENd(avg) 0.27809, ENd(est) 0.342530, Ees 1.79366.
func TestChen2001WorkedValue(t *testing.T) {
	c, err := Chen2001(120, 80, 70, 0.60, 0.20)
	if err != nil {
		t.Fatal(err)
	}
	if !near(c.ENdAvg, 0.27809, 5) || !near(c.ENdEst, 0.342530, 6) || !near(c.Ees, 1.79366, 5) {
		t.Errorf("got ENd(avg) %.6f, ENd(est) %.7f, Ees %.6f; want 0.27809, 0.342530, 1.79366", c.ENdAvg, c.ENdEst, c.Ees)
	}
	for _, bad := range [][5]float64{{0, 80, 70, 0.6, 0.2}, {120, 80, 70, 1.2, 0.2}, {120, 80, -1, 0.6, 0.2}, {120, 80, 70, 0.6, 1}} {
		if _, err := Chen2001(bad[0], bad[1], bad[2], bad[3], bad[4]); err == nil {
			t.Errorf("%v accepted", bad)
		}
	}
}

// Check values of docs/science.md §5 [derived from the formulas of Klotz et al.
// 2006, Am J Physiol Heart]: EDV 120, EDP 10 → V0 64.8, V30 144.7303,
// β 5.86300; EDV 200, EDP 25 → V30 204.2836, β 5.24115.
func TestKlotz2006WorkedValues(t *testing.T) {
	k, err := Klotz2006(120, 10)
	if err != nil {
		t.Fatal(err)
	}
	if !near(k.V0, 64.8, 1) || !near(k.V30, 144.7303, 4) || !near(k.Beta, 5.86300, 5) {
		t.Errorf("EDV 120, EDP 10: V0 %.4f, V30 %.5f, β %.6f; want 64.8, 144.7303, 5.86300", k.V0, k.V30, k.Beta)
	}
	// The curve passes through 30 mmHg at V30 and through the measured point [derived].
	if math.Abs(k.Pressure(k.V30)-30) > 1e-9 || math.Abs(k.Pressure(120)-10) > 1e-9 {
		t.Errorf("curve misses its anchors: P(V30) %.6g, P(EDV) %.6g", k.Pressure(k.V30), k.Pressure(120))
	}
	k, err = Klotz2006(200, 25)
	if err != nil {
		t.Fatal(err)
	}
	if !near(k.V30, 204.2836, 4) || !near(k.Beta, 5.24115, 5) {
		t.Errorf("EDV 200, EDP 25: V30 %.5f, β %.6f; want 204.2836, 5.24115", k.V30, k.Beta)
	}
	if math.Abs(k.Pressure(200)-25) > 1e-9 {
		t.Errorf("EDP > 22 branch misses the measured point: %.6g", k.Pressure(200))
	}
	if _, err := Klotz2006(120, 0); err == nil {
		t.Error("EDP 0 accepted")
	}
}
