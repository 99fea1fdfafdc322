package sweep

import (
	"fmt"
	"math"
	"strconv"

	"pvcouple/model"
)

// MaxPoints caps the number of points of one grid (500 × 500). A point keeps
// its metrics (about 300 bytes) and takes about half a millisecond of one
// core, so the cap bounds a sweep to some 75 MB and a few minutes.
const MaxPoints = 250_000

// Axis is one varied parameter: N values evenly spaced from From to To
// inclusive (From may exceed To). With N = 1 the single value is From and To
// must equal it.
type Axis struct {
	Key      string  // parameter key, as in model.Specs
	From, To float64 // first and last value, in the parameter's unit
	N        int     // number of values, at least 1
}

// Value returns the i-th value of the axis, 0 ≤ i < N; the last one is To exactly.
func (a Axis) Value(i int) float64 {
	switch {
	case a.N <= 1 || i == 0:
		return a.From
	case i == a.N-1:
		return a.To
	}
	return a.From + (a.To-a.From)*float64(i)/float64(a.N-1)
}

// Values returns every value of the axis in order.
func (a Axis) Values() []float64 {
	v := make([]float64, a.N)
	for i := range v {
		v[i] = a.Value(i)
	}
	return v
}

// Position returns where v falls on the axis as a fractional index: 0 at
// From, N−1 at To, outside [0, N−1] when v lies outside the axis. It is NaN
// for a one-value axis unless v equals From (then 0). A map uses it to mark
// the current state between grid points.
func (a Axis) Position(v float64) float64 {
	if a.N <= 1 || a.To == a.From {
		if v == a.From {
			return 0
		}
		return math.NaN()
	}
	return (v - a.From) / (a.To - a.From) * float64(a.N-1)
}

// String writes the axis as KEY=FROM:TO:N.
func (a Axis) String() string {
	return fmt.Sprintf("%s=%s:%s:%d", a.Key, fmtNum(a.From), fmtNum(a.To), a.N)
}

func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// Check reports what is wrong with the axis: an unknown key, a value that is
// not finite or outside the key's range (a *model.ParamError naming the range
// and unit), N below 1, or N = 1 with To unlike From.
func (a Axis) Check() error {
	spec, ok := model.SpecByKey(a.Key)
	if !ok {
		return fmt.Errorf("unknown parameter %q (see `pvcouple params`)", a.Key)
	}
	if err := spec.Check(a.From); err != nil {
		return fmt.Errorf("from value: %w", err)
	}
	if err := spec.Check(a.To); err != nil {
		return fmt.Errorf("to value: %w", err)
	}
	if a.N < 1 {
		return fmt.Errorf("%s: %d values; need at least 1", a.Key, a.N)
	}
	if a.N == 1 && a.To != a.From {
		return fmt.Errorf("%s: with 1 value, from (%s) and to (%s) must be equal", a.Key, fmtNum(a.From), fmtNum(a.To))
	}
	return nil
}

// Grid is a sweep: the base parameters and the axes that vary. The points are
// numbered in row-major order, the first axis varying slowest.
type Grid struct {
	Base model.Params
	Axes []Axis
}

// Size returns the number of points, or −1 if it exceeds MaxPoints (or an
// axis has fewer than 1 value).
func (g Grid) Size() int {
	n := 1
	for _, a := range g.Axes {
		if a.N < 1 || a.N > MaxPoints || n > MaxPoints/a.N {
			return -1
		}
		n *= a.N
	}
	return n
}

// Dims returns the number of values of each axis.
func (g Grid) Dims() []int {
	d := make([]int, len(g.Axes))
	for i, a := range g.Axes {
		d[i] = a.N
	}
	return d
}

// Validate checks that the grid has at least one axis, that each axis is
// valid and names a different key, that the base parameters not varied are in
// range, and that the grid has at most MaxPoints points. Combinations of
// values that the model refuses (model.Params.Validate) are not errors of the
// grid: they are reported per point.
func (g Grid) Validate() error {
	if len(g.Axes) == 0 {
		return fmt.Errorf("a sweep needs at least one varied parameter")
	}
	varied := map[string]bool{}
	for _, a := range g.Axes {
		if err := a.Check(); err != nil {
			return err
		}
		if varied[a.Key] {
			return fmt.Errorf("%s is varied twice; give each parameter one axis", a.Key)
		}
		if s, _ := model.SpecByKey(a.Key); !s.ActsIn(g.Base.Circulation) {
			return fmt.Errorf("%s acts only in the %s circulation and this sweep is %s", a.Key, s.Circulations(), g.Base.Circulation)
		}
		varied[a.Key] = true
	}
	for _, s := range model.Specs {
		if !varied[s.Key] && s.ActsIn(g.Base.Circulation) {
			if err := s.Check(s.Get(g.Base)); err != nil {
				return fmt.Errorf("base parameters: %w", err)
			}
		}
	}
	if g.Size() < 0 {
		total := 1.0
		for _, a := range g.Axes {
			total *= float64(a.N)
		}
		return fmt.Errorf("%.0f points is more than the %d a sweep may have; use fewer values per axis", total, MaxPoints)
	}
	return nil
}

// FillsVolume reports whether the points are solved for their filling
// pressure as mean LAP: a closed circulation with the filling pressure on an
// axis, whose volume is found anew at every point.
func (g Grid) FillsVolume() bool {
	if g.Base.Circulation != model.Closed {
		return false
	}
	for _, a := range g.Axes {
		if a.Key == "filling_pressure_mmhg" {
			return true
		}
	}
	return false
}

// Index returns the axis indices of point i (row-major, first axis slowest)
// into idx, which must have one element per axis.
func (g Grid) Index(i int, idx []int) {
	for k := len(g.Axes) - 1; k >= 0; k-- {
		n := g.Axes[k].N
		idx[k] = i % n
		i /= n
	}
}

// Flat returns the point number of the axis indices idx.
func (g Grid) Flat(idx []int) int {
	i := 0
	for k, a := range g.Axes {
		i = i*a.N + idx[k]
	}
	return i
}

// Params returns the parameters of the point with axis indices idx.
func (g Grid) Params(idx []int) model.Params {
	p := g.Base
	for k, a := range g.Axes {
		spec, _ := model.SpecByKey(a.Key)
		spec.Set(&p, a.Value(idx[k]))
	}
	return p
}

// Matches reports whether p equals the grid's base in every parameter that
// the grid does not vary, so that a map of the grid still describes p.
func (g Grid) Matches(p model.Params) bool {
	for _, s := range model.Specs {
		varied := false
		for _, a := range g.Axes {
			varied = varied || a.Key == s.Key
		}
		if !varied && s.Get(p) != s.Get(g.Base) {
			return false
		}
	}
	return true
}
