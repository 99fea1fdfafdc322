package model

// A valve passes flow one way: open, Q = ΔP/R with ΔP the pressure upstream
// less downstream and R the open valve's resistance; shut, no flow. It opens
// when ΔP rises through zero and shuts when it falls through zero, events the
// ODE solver locates on its dense output, so the flow is continuous across
// every switch (docs/science.md §9).
type valve struct {
	r    float64 // open resistance, mmHg·s/mL
	open bool
}

// flow returns the flow (mL/s) at pressure difference dp (mmHg).
func (v *valve) flow(dp float64) float64 {
	if !v.open {
		return 0
	}
	return dp / v.r
}

// Valves of the circuit, in the order of their events.
const (
	mitralValve = iota
	aorticValve
	tricuspidValve
	pulmonicValve
	numValves
)
