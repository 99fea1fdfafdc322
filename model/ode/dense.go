package ode

import "sort"

// Dense records the dense output of the steps it is given, across any number of
// calls of Solve, so the solution can be evaluated anywhere afterwards. Reset
// keeps its memory for reuse.
type Dense struct {
	n      int
	starts []float64 // step start times
	ends   []float64 // step end times (event-truncated where so)
	hs     []float64 // full step sizes of the interpolants
	coef   []float64 // 5·n coefficients per step
}

// NewDense returns an empty record for n-dimensional solutions.
func NewDense(n int) *Dense { return &Dense{n: n} }

// Reset forgets all steps.
func (d *Dense) Reset() {
	d.starts, d.ends, d.hs, d.coef = d.starts[:0], d.ends[:0], d.hs[:0], d.coef[:0]
}

// Add records a step; it is meant to be passed as the observer of Solve.
// Steps must be added in increasing time.
func (d *Dense) Add(st *Step) {
	if st.t1 <= st.t0 {
		return
	}
	d.starts = append(d.starts, st.t0)
	d.ends = append(d.ends, st.t1)
	d.hs = append(d.hs, st.h)
	for j := range st.r {
		d.coef = append(d.coef, st.r[j]...)
	}
}

// Len is the number of recorded steps.
func (d *Dense) Len() int { return len(d.starts) }

// Span returns the first and last recorded times.
func (d *Dense) Span() (t0, t1 float64) {
	if len(d.starts) == 0 {
		return 0, 0
	}
	return d.starts[0], d.ends[len(d.ends)-1]
}

// StepEnds returns the end time of every recorded step, in order. The slice is
// owned by d and valid until the next Add or Reset.
func (d *Dense) StepEnds() []float64 { return d.ends }

// At writes the solution at time t into dst, from the step that covers t
// (the first or last step when t lies outside the record).
func (d *Dense) At(t float64, dst []float64) {
	i := sort.SearchFloat64s(d.ends, t)
	if i >= len(d.ends) {
		i = len(d.ends) - 1
	}
	n := d.n
	base := i * 5 * n
	var r [5][]float64
	for j := range r {
		r[j] = d.coef[base+j*n : base+(j+1)*n]
	}
	interpolate(&r, d.starts[i], d.hs[i], t, dst)
}

// Eval evaluates the recorded solution at the increasing times ts:
// out[j][i] receives component j at ts[i]. It walks the steps once, so it is
// cheaper than At for many times.
func (d *Dense) Eval(ts []float64, out [][]float64) {
	n := d.n
	if len(out) != n {
		panic("ode: Eval needs one output slice per component")
	}
	var r [5][]float64
	seg := 0
	for i, t := range ts {
		for seg < len(d.ends)-1 && d.ends[seg] < t {
			seg++
		}
		base := seg * 5 * n
		for j := range r {
			r[j] = d.coef[base+j*n : base+(j+1)*n]
		}
		th := (t - d.starts[seg]) / d.hs[seg]
		th1 := 1 - th
		for j := 0; j < n; j++ {
			out[j][i] = r[0][j] + th*(r[1][j]+th1*(r[2][j]+th*(r[3][j]+th1*r[4][j])))
		}
	}
}
