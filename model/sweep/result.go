package sweep

import (
	"fmt"
	"math"
	"time"

	"pvcouple/model"
)

// Result is a finished (or cancelled) sweep.
type Result struct {
	Grid    Grid
	Points  []Point // in grid order: row-major, the first axis varying slowest
	Workers int     // worker goroutines used
	Elapsed time.Duration
}

// Values returns the varied values of point i, one per axis.
func (r *Result) Values(i int) []float64 {
	idx := make([]int, len(r.Grid.Axes))
	r.Grid.Index(i, idx)
	v := make([]float64, len(idx))
	for k, a := range r.Grid.Axes {
		v[k] = a.Value(idx[k])
	}
	return v
}

// Count returns the number of points with status s.
func (r *Result) Count(s Status) int {
	n := 0
	for i := range r.Points {
		if r.Points[i].Status == s {
			n++
		}
	}
	return n
}

// Field returns one metric (a key of model.MetricSpecs) at every point in
// grid order, NaN where the point did not settle.
func (r *Result) Field(metric string) ([]float64, error) {
	return field(r.Points, metric)
}

func field(pts []Point, metric string) ([]float64, error) {
	spec, ok := model.MetricByKey(metric)
	if !ok {
		return nil, fmt.Errorf("unknown metric %q", metric)
	}
	f := make([]float64, len(pts))
	for i := range pts {
		if pts[i].Status == OK {
			f[i] = spec.Get(&pts[i].Metrics)
		} else {
			f[i] = math.NaN()
		}
	}
	return f, nil
}

// Extremes returns the indices of the smallest and largest values of a
// field, skipping NaN (points not solved or not settled); both are −1 when
// every value is NaN. A map uses them for its colour scale and to mark the
// optimum of a metric.
func Extremes(field []float64) (iMin, iMax int) {
	iMin, iMax = -1, -1
	for i, v := range field {
		if math.IsNaN(v) {
			continue
		}
		if iMin < 0 || v < field[iMin] {
			iMin = i
		}
		if iMax < 0 || v > field[iMax] {
			iMax = i
		}
	}
	return iMin, iMax
}
