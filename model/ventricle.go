package model

import "math"

// ventricle is a time-varying elastance chamber: a linear end-systolic and an
// exponential end-diastolic pressure–volume relation blended by the
// activation e in [0, 1],
//
//	P = e·Ees·(V − V0) + (1 − e)·A·(exp(B·(V − V0)) − 1),
//
// the form used in lumped models (Gohean et al. 2013, ASAIO J [cited],
// docs/science.md §1). The left and right ventricles share it and the
// activation (activation.go); V0 is also the chamber's unstressed volume.
type ventricle struct {
	ees, v0, a, b float64
}

// pressure returns the chamber pressure (mmHg) at activation e and volume v
// (mL). It takes exp(B·x) − 1 rather than math.Expm1: the assembly exp is
// several times faster, and near V0, where the two differ in the last
// digits, the passive pressure is a fraction of a mmHg.
func (c *ventricle) pressure(e, v float64) float64 {
	x := v - c.v0
	return e*c.ees*x + (1-e)*c.a*(math.Exp(c.b*x)-1)
}

// pressureAndSlopes returns the pressure at (e, v) with its partial
// derivatives ∂P/∂V and ∂P/∂e, so that dP/dt = ∂P/∂e·de/dt + ∂P/∂V·dV/dt.
func (c *ventricle) pressureAndSlopes(e, v float64) (pr, dpdv, dpde float64) {
	x := v - c.v0
	ex := math.Exp(c.b * x)
	pas := c.a * (ex - 1)
	act := c.ees * x
	return e*act + (1-e)*pas, e*c.ees + (1-e)*c.a*c.b*ex, act - pas
}

// lv and rv are the two ventricles of p.
func (p *Params) lv() ventricle { return ventricle{p.Ees, p.V0, p.EdpvrA, p.EdpvrB} }
func (p *Params) rv() ventricle { return ventricle{p.RVEes, p.RVV0, p.RVEdpvrA, p.RVEdpvrB} }

// passive is the EDPVR at x = V − V0.
func (p *Params) passive(x float64) float64 {
	return p.EdpvrA * math.Expm1(p.EdpvrB*x)
}

// EDPVR returns the end-diastolic pressure (mmHg) at volume v (mL).
func (p *Params) EDPVR(v float64) float64 { return p.passive(v - p.V0) }

// ESPVR returns the end-systolic pressure (mmHg) at volume v (mL).
func (p *Params) ESPVR(v float64) float64 { return p.Ees * (v - p.V0) }
