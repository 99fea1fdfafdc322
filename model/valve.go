package model

import "math"

// A valve passes flow one way while open and shuts when the pressure across
// it reverses. ΔP is the pressure upstream less downstream. Open, the flow Q
// satisfies r·Q + k·Q·|Q| = ΔP: the open valve's resistance r in series with
// the orifice loss of a stenosis (k = 0 without one, lesion.go). Shut, a
// regurgitant orifice (kr > 0) passes the reverse flow r·Q + kr·Q·|Q| = ΔP,
// and a competent valve passes nothing. The valve opens when ΔP rises
// through zero and shuts when it falls through zero, events the ODE solver
// locates on its dense output, so the flow is continuous across every switch,
// and with a regurgitant orifice so is its slope 1/r (docs/science.md §9, §11).
type valve struct {
	r    float64 // open resistance, mmHg·s/mL
	k    float64 // orifice coefficient of a stenosis, mmHg/(mL/s)²; 0 = none
	kr   float64 // orifice coefficient of the regurgitant orifice, mmHg/(mL/s)²; 0 = none
	open bool
}

// flow returns the flow (mL/s) at pressure difference dp (mmHg), negative
// for regurgitant backflow.
func (v *valve) flow(dp float64) float64 { return v.pass(v.open, dp) }

// sampleFlow returns the flow at pressure difference dp as the samples take
// it: open where dp is positive (the events put the switches on zeros),
// shut, and leaking if it has a regurgitant orifice, elsewhere.
func (v *valve) sampleFlow(dp float64) float64 { return v.pass(dp > 0, dp) }

// pass returns the flow at pressure difference dp through the valve open or
// shut.
func (v *valve) pass(open bool, dp float64) float64 {
	switch {
	case open:
		return orificeFlow(dp, v.r, v.k)
	case v.kr > 0:
		return orificeFlow(dp, v.r, v.kr)
	}
	return 0
}

// orificeFlow solves r·Q + k·Q·|Q| = dp for Q: a linear resistance r in
// series with a Bernoulli orifice of coefficient k. The root
// Q = 2·dp/(r + √(r² + 4k|dp|)) is written so that it loses no digits as
// k → 0, where it becomes dp/r.
func orificeFlow(dp, r, k float64) float64 {
	if k == 0 {
		return dp / r
	}
	return 2 * dp / (r + math.Sqrt(r*r+4*k*math.Abs(dp)))
}

// Valves of the circuit, in the order of their events.
const (
	mitralValve = iota
	aorticValve
	tricuspidValve
	pulmonicValve
	numValves
)
