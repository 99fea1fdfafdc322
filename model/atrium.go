package model

import "math"

// atrium is a contracting atrium: a linear elastance that rises from its
// passive value Emin to Emax as its activation ea goes from 0 to 1,
//
//	P = (Emin + ea·(Emax − Emin))·(V − V0),
//
// with Emax about 0.3–0.6 and Emin about 0.1–0.2 mmHg/mL and V0 about 4 mL
// for the left atrium [memory, docs/science.md §9]. The right atrium takes the
// same values here.
type atrium struct {
	emin, emax float64
}

// atrialV0 is the unstressed volume of each atrium, mL [memory, docs/science.md §9].
const atrialV0 = 4

// pressure returns the atrial pressure (mmHg) at activation ea and volume v (mL).
func (a *atrium) pressure(ea, v float64) float64 {
	return (a.emin + ea*(a.emax-a.emin)) * (v - atrialV0)
}

// atria returns the atrium of p (both atria share it).
func (p *Params) atria() atrium { return atrium{p.AtrialEmin, p.AtrialEmax} }

// atrialActivation is the activation of the atria over one ventricular beat
// (docs/science.md §9–10). The atria are activated a PR interval before the
// ventricles, so the contraction that fills a beat's ventricle starts PR before
// the beat ends and may run on into the next beat; with a beat starting at
// ventricular onset,
//
//	ea(t) = f(t + PR) + f(t − (T − PR)),
//	f(τ) = ½·(1 − cos(3π·τ/(2·Ta)))   for 0 ≤ τ < 2Ta/3 (rising to 1),
//	f(τ) = ½·(1 + cos(3π·τ/Ta − 2π))  for 2Ta/3 ≤ τ < Ta (falling to 0), else 0,
//
// the half-cosine activation of Gohean et al. 2013 (ASAIO J) [cited,
// docs/science.md §1] over the atrial systole Ta = 0.2·√T s [memory: a rate
// scaling of atrial systole used in lumped models]. The sum is periodic in T
// whenever Ta ≤ T.
type atrialActivation struct {
	period, pr, dur float64
	w               float64 // 3π/Ta
}

func newAtrialActivation(heartRate, prMS float64) atrialActivation {
	t := 60 / heartRate
	d := math.Min(0.2*math.Sqrt(t), t)
	return atrialActivation{period: t, pr: prMS / 1000, dur: d, w: 3 * math.Pi / d}
}

// f is the activation τ after the atria's onset.
func (a *atrialActivation) f(tau float64) float64 {
	switch {
	case tau <= 0 || tau >= a.dur:
		return 0
	case tau < 2*a.dur/3:
		return 0.5 * (1 - math.Cos(0.5*a.w*tau))
	}
	return 0.5 * (1 + math.Cos(a.w*tau-2*math.Pi))
}

// E returns ea(t) for 0 ≤ t ≤ period.
func (a *atrialActivation) E(t float64) float64 {
	return a.f(t+a.pr) + a.f(t-(a.period-a.pr))
}

// bounds returns the times within the beat where the atria start or stop
// contracting.
func (a *atrialActivation) bounds() []float64 {
	out := []float64{a.period - a.pr}
	if end := a.dur - a.pr; end > 0 {
		out = append(out, end)
	}
	if end := a.period - a.pr + a.dur; end < a.period {
		out = append(out, end)
	}
	return out
}

// contracting reports whether the atria are contracting at t (ea > 0).
func (a *atrialActivation) contracting(t float64) bool {
	return t+a.pr < a.dur || t > a.period-a.pr && t-(a.period-a.pr) < a.dur
}
