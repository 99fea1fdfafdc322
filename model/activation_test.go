package model

import (
	"math"
	"testing"
)

// doubleHill is the textbook form of Stergiopulos et al.'s set A with
// Mynard's end correction, written with math.Pow, to check the fast form.
func doubleHill(t, tmax, period float64) float64 {
	g := func(t, a, n float64) float64 { return math.Pow(t/(a*tmax), n) }
	c := 1 / (1 + g(period, hillAlpha2, hillN2))
	return g(t, hillAlpha1, hillN1) / (1 + g(t, hillAlpha1, hillN1)) * (1/(1+g(t, hillAlpha2, hillN2)) - c)
}

func TestActivationShape(t *testing.T) {
	for _, hr := range []float64{30, 60, 75, 120, 180} {
		a := NewActivation(hr)
		tc := 60 / hr
		if a.Tmax != 0.2+0.15*tc {
			t.Errorf("HR %g: Tmax %g, want 0.2 + 0.15·Tc = %g [cited, docs/science.md §1]", hr, a.Tmax, 0.2+0.15*tc)
		}
		if e := a.E(a.Peak); math.Abs(e-1) > 1e-12 {
			t.Errorf("HR %g: peak e = %.15f, want 1", hr, e)
		}
		if a.E(0) != 0 || math.Abs(a.E(tc)) > 1e-15 {
			t.Errorf("HR %g: e(0) = %g, e(T) = %g, want 0 at both ends (Mynard 2012 correction)", hr, a.E(0), a.E(tc))
		}
		// The fast evaluation equals the textbook formula up to the normalisation.
		k := 1 / doubleHill(a.Peak, a.Tmax, tc)
		for i := 1; i < 200; i++ {
			tt := tc * float64(i) / 200
			if want := k * doubleHill(tt, a.Tmax, tc); math.Abs(a.E(tt)-want) > 1e-12 {
				t.Fatalf("HR %g t %g: e = %.15g, textbook %.15g", hr, tt, a.E(tt), want)
			}
			// The analytic derivative against a central difference.
			const h = 1e-7
			e, de := a.EDeriv(tt)
			fd := (a.E(tt+h) - a.E(tt-h)) / (2 * h)
			if math.Abs(de-fd) > 1e-5*math.Max(1, math.Abs(de)) {
				t.Fatalf("HR %g t %g: de/dt %g, central difference %g (e %g)", hr, tt, de, fd, e)
			}
		}
	}
	// Set A uncorrected peaks at 0.99606 at t/Tmax = 0.9972 (docs/science.md §1,
	// derived) with its usual scale factor k = 1.55 [memory]; at 75 bpm
	// Mynard's correction is below 1e-7, so the peak stays there.
	a := NewActivation(75)
	if r := a.Peak / a.Tmax; math.Abs(r-0.9972) > 5e-4 {
		t.Errorf("peak at t/Tmax = %.5f, want 0.9972", r)
	}
	if k := 1.55 / a.k; math.Abs(k-0.99606) > 5e-5 {
		t.Errorf("unnormalised peak %.5f, want 0.99606 (docs/science.md §1, derived)", k)
	}
}
