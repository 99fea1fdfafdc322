package model

import "math"

// Double-Hill activation, parameter set A attributed to Stergiopulos, Meister &
// Westerhof 1996 (Am J Physiol 270:H2050) [cited in docs/science.md §1]: time is
// normalised by Tmax, the time to peak elastance.
const (
	hillAlpha1 = 0.7
	hillN1     = 1.9
	hillAlpha2 = 1.17
	hillN2     = 21.9
)

// hillOff1 is n1·ln(α1); hillRatio is (α1/α2)^n1, which with n2 − n1 = 20
// turns g1 into g2 (see EDeriv).
var (
	hillOff1  = hillN1 * math.Log(hillAlpha1)
	hillRatio = math.Pow(hillAlpha1/hillAlpha2, hillN1)
)

// Activation is the normalised elastance curve e(t) of one beat, peaking at
// exactly 1 and zero at both ends of the beat.
//
// It is the double-Hill function of Stergiopulos, Meister & Westerhof (1996),
// parameter set A, with Mynard et al.'s (2012, Int J Numer Meth Biomed Eng
// 28:626) correction that subtracts the relaxation factor's value at the end of
// the beat, so that e(0) = e(T) = 0 exactly and a beat map is periodic in e:
//
//	e(t) = k·[g1/(1+g1)]·[1/(1+g2) − 1/(1+g2(T))],  g1 = (t/(α1·Tmax))^n1,  g2 = (t/(α2·Tmax))^n2,
//
// with k chosen numerically so that max e = 1. Systole shortens with heart
// rate through Tmax = 0.2 + 0.15·Tc (Tc = beat period, s), the scaling cited
// with set A in docs/science.md §1.
type Activation struct {
	Period float64 // beat period Tc, s
	Tmax   float64 // time scale of contraction, s
	Peak   float64 // time of peak activation, s
	k      float64 // normalisation
	c      float64 // relaxation factor at the end of the beat
	invT   float64 // 1/Tmax
}

// NewActivation returns the activation curve for a heart rate in beats per minute.
func NewActivation(heartRate float64) Activation {
	tc := 60 / heartRate
	a := Activation{Period: tc, Tmax: 0.2 + 0.15*tc, k: 1}
	a.invT = 1 / a.Tmax
	g2end := math.Pow(tc*a.invT/hillAlpha2, hillN2)
	a.c = 1 / (1 + g2end)
	// The peak is where de/dt changes sign: bisection on the analytic derivative,
	// which is positive before the single maximum and negative after it.
	lo, hi := 1e-3*tc, tc
	for i := 0; i < 80; i++ {
		mid := 0.5 * (lo + hi)
		if _, d := a.EDeriv(mid); d > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	a.Peak = 0.5 * (lo + hi)
	e, _ := a.EDeriv(a.Peak)
	a.k = 1 / e
	return a
}

// E returns e(t) for 0 ≤ t ≤ Period.
func (a *Activation) E(t float64) float64 {
	e, _ := a.EDeriv(t)
	return e
}

// EDeriv returns e(t) and de/dt (1/s).
func (a *Activation) EDeriv(t float64) (e, de float64) {
	if t <= 0 {
		return 0, 0
	}
	u := t * a.invT
	g1 := math.Exp(hillN1*math.Log(u) - hillOff1)
	// n2 = n1 + 20 in set A, so g2 = g1·(α1/α2)^n1·(u/α2)^20: an exponential
	// saved by an integer power.
	w := u * u * (1 / (hillAlpha2 * hillAlpha2))
	w2 := w * w
	w4 := w2 * w2
	w5 := w4 * w
	g2 := g1 * hillRatio * w5 * w5
	h1 := g1 / (1 + g1)
	h2 := 1/(1+g2) - a.c
	dh1 := hillN1 * g1 / (t * (1 + g1) * (1 + g1))
	dh2 := -hillN2 * g2 / (t * (1 + g2) * (1 + g2))
	return a.k * h1 * h2, a.k * (dh1*h2 + h1*dh2)
}
