package model

import "math"

// Pressure returns LV pressure (mmHg) at activation e and volume v (mL):
//
//	P = e·Ees·(V − V0) + (1 − e)·A·(exp(B·(V − V0)) − 1),
//
// the blend of a linear ESPVR and an exponential EDPVR used in lumped models
// (cited in docs/science.md §1 as Gohean et al. 2013, ASAIO J).
func (p *Params) Pressure(e, v float64) float64 {
	x := v - p.V0
	return e*p.Ees*x + (1-e)*p.passive(x)
}

// passive is the EDPVR at x = V − V0.
func (p *Params) passive(x float64) float64 {
	return p.EdpvrA * math.Expm1(p.EdpvrB*x)
}

// EDPVR returns the end-diastolic pressure (mmHg) at volume v (mL).
func (p *Params) EDPVR(v float64) float64 { return p.passive(v - p.V0) }

// ESPVR returns the end-systolic pressure (mmHg) at volume v (mL).
func (p *Params) ESPVR(v float64) float64 { return p.Ees * (v - p.V0) }

// pressureAndSlopes returns LV pressure at (e, v) with its partial
// derivatives ∂P/∂V and ∂P/∂e, so that dP/dt = ∂P/∂e·de/dt + ∂P/∂V·dV/dt.
func (p *Params) pressureAndSlopes(e, v float64) (pr, dpdv, dpde float64) {
	x := v - p.V0
	ex := math.Exp(p.EdpvrB * x)
	pas := p.EdpvrA * (ex - 1)
	act := p.Ees * x
	return e*act + (1-e)*pas, e*p.Ees + (1-e)*p.EdpvrA*p.EdpvrB*ex, act - pas
}
