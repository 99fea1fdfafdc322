package model

// activationKnots is the number of intervals of an activation table over one
// beat. The double-Hill relaxation's steepest time scale is about
// t_peak/n2 ≈ 15 ms at rest, so intervals of under 1 ms make the cubic
// Hermite interpolant's error, about (h/τ)⁴/384, near 1e-8 of the peak
// [derived]: below the integrator's tolerance, and smooth (C¹) so the beat
// map stays smooth for Newton's method.
const activationKnots = 1024

// activationTable holds e(t) and de/dt at evenly spaced knots over a beat, so
// that the right-hand side of the model interpolates the activation instead
// of evaluating two exponentials and a logarithm at every stage.
type activationTable struct {
	h, invH float64
	e, de   []float64 // at t = i·h, i = 0…activationKnots
}

func newActivationTable(a *Activation) *activationTable {
	n := activationKnots
	t := &activationTable{h: a.Period / float64(n), e: make([]float64, n+1), de: make([]float64, n+1)}
	t.invH = 1 / t.h
	for i := 0; i <= n; i++ {
		t.e[i], t.de[i] = a.EDeriv(float64(i) * t.h)
	}
	t.e[n] = 0 // e(T) = 0 exactly (Mynard's correction); EDeriv rounds near it
	return t
}

// at returns e(t) and de/dt by cubic Hermite interpolation between the knots
// around t.
func (t *activationTable) at(tt float64) (e, de float64) {
	u := tt * t.invH
	i := int(u)
	if i < 0 {
		return 0, 0
	}
	n := len(t.e) - 1
	if i >= n {
		return t.e[n], t.de[n]
	}
	s := u - float64(i)
	e0, e1 := t.e[i], t.e[i+1]
	m0, m1 := t.de[i]*t.h, t.de[i+1]*t.h
	s2 := s * s
	s3 := s2 * s
	h00 := 2*s3 - 3*s2 + 1
	h10 := s3 - 2*s2 + s
	h01 := -2*s3 + 3*s2
	h11 := s3 - s2
	e = h00*e0 + h10*m0 + h01*e1 + h11*m1
	d00 := 6*s2 - 6*s
	d10 := 3*s2 - 4*s + 1
	d01 := -6*s2 + 6*s
	d11 := 3*s2 - 2*s
	de = (d00*e0 + d10*m0 + d01*e1 + d11*m1) * t.invH
	return e, de
}
