package model

import "math"

// Double-Hill activation, parameter set B attributed to Stergiopulos, Meister &
// Westerhof 1996 (Am J Physiol 270:H2050) [cited, docs/science.md §1]: the
// rising and falling Hill functions are placed relative to the time of peak
// elastance t_peak.
const (
	hillN1       = 1.32
	hillN2       = 21.9
	hillAlpha1   = 0.708 // α1 = 0.708·t_peak
	hillAlpha2to = 1.677 // α2 = 1.677·α1
)

// Timing of systole (docs/science.md §10). Weissler, Harris & Schoenfeld
// (1968, Circulation) regressed the electromechanical systole QS2 of healthy
// men on heart rate, QS2 = 546 − 2.1·HR ms [memory]. The elastance peaks
// peakOfQS2 of the way through it: QS2 runs from the onset of the QRS complex
// to aortic closure, while the model's beat starts at the onset of contraction
// and its elastance peaks a little before the valve closes. The factor is our
// own round choice [common practice, no source]; the ejection times it gives at
// 60, 90 and 120 bpm are checked against Weissler's separate LVET regression.
const (
	qs2Intercept = 0.546  // s
	qs2Slope     = 0.0021 // s per bpm
	peakOfQS2    = 0.8
)

// TimeToPeak returns the time from the onset of contraction to peak
// elastance at a heart rate in beats per minute, s.
func TimeToPeak(heartRate float64) float64 {
	return peakOfQS2 * (qs2Intercept - qs2Slope*heartRate)
}

// Activation is the normalised elastance curve e(t) of one beat, peaking at
// exactly 1 and zero at both ends of the beat.
//
// It is the double-Hill function of Stergiopulos, Meister & Westerhof (1996),
// parameter set B, with Mynard et al.'s (2012, Int J Numer Meth Biomed Eng
// 28:626) correction that subtracts the relaxation factor's value at the end of
// the beat, so that e(0) = e(T) = 0 exactly and a beat map is periodic in e:
//
//	e(t) = k·[g1/(1+g1)]·[1/(1+g2) − 1/(1+g2(T))],  g1 = (t/α1)^1.32,  g2 = (t/α2)^21.9,
//	α1 = 0.708·t_peak,  α2 = 1.677·α1,
//
// with k chosen numerically so that max e = 1, and t_peak from TimeToPeak.
type Activation struct {
	Period float64 // beat period Tc, s
	TPeak  float64 // nominal time of peak elastance, s (TimeToPeak)
	Peak   float64 // time of the numerical maximum of e, s
	k      float64 // normalisation
	c      float64 // relaxation factor at the end of the beat
	off1   float64 // n1·ln α1
	off2   float64 // n2·ln α2
}

// NewActivation returns the activation curve for a heart rate in beats per minute.
func NewActivation(heartRate float64) Activation {
	tc := 60 / heartRate
	tp := TimeToPeak(heartRate)
	a1 := hillAlpha1 * tp
	a2 := hillAlpha2to * a1
	a := Activation{Period: tc, TPeak: tp, k: 1, off1: hillN1 * math.Log(a1), off2: hillN2 * math.Log(a2)}
	a.c = 1 / (1 + math.Exp(hillN2*math.Log(tc)-a.off2))
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
	l := math.Log(t)
	g1 := math.Exp(hillN1*l - a.off1)
	g2 := math.Exp(hillN2*l - a.off2)
	h1 := g1 / (1 + g1)
	r2 := 1 / (1 + g2)
	h2 := r2 - a.c
	dh1 := hillN1 * h1 * (1 - h1) / t
	dh2 := -hillN2 * g2 * r2 * r2 / t
	return a.k * h1 * h2, a.k * (dh1*h2 + h1*dh2)
}
