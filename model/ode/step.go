package ode

// Step is one accepted step with its continuous extension, valid from Start to End.
type Step struct {
	t0, h, t1 float64
	r         [5][]float64
}

// Start is the time the step began.
func (st *Step) Start() float64 { return st.t0 }

// End is the time the step ended: t0+h, or an event time inside the step.
func (st *Step) End() float64 { return st.t1 }

// Interpolate writes the fourth-order dense-output solution at time t into dst.
// t should lie in [Start, End].
func (st *Step) Interpolate(t float64, dst []float64) {
	interpolate(&st.r, st.t0, st.h, t, dst)
}

func interpolate(r *[5][]float64, t0, h, t float64, dst []float64) {
	th := (t - t0) / h
	th1 := 1 - th
	for i := range dst {
		dst[i] = r[0][i] + th*(r[1][i]+th1*(r[2][i]+th*(r[3][i]+th1*r[4][i])))
	}
}
