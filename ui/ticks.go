package ui

import (
	"math"
	"strconv"
)

// axisRange is the span of one axis and the spacing of its ticks.
type axisRange struct {
	Lo, Hi, Step float64
}

// niceStep is the 1, 2 or 5 × 10^k spacing that divides span into about n
// intervals.
func niceStep(span float64, n int) float64 {
	if !(span > 0) || n < 1 {
		return 1
	}
	raw := span / float64(n)
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 5, 10} {
		if raw <= m*mag*1.0000001 {
			return m * mag
		}
	}
	return 10 * mag
}

// niceRange widens [lo, hi] to whole ticks of a nice step, aiming at about n
// intervals.
func niceRange(lo, hi float64, n int) axisRange {
	if !(hi > lo) {
		hi = lo + 1
	}
	step := niceStep(hi-lo, n)
	return axisRange{Lo: math.Floor(lo/step+1e-9) * step, Hi: math.Ceil(hi/step-1e-9) * step, Step: step}
}

// ticks returns the tick values of r, from Lo to Hi.
func (r axisRange) ticks() []float64 {
	if !(r.Step > 0) || !(r.Hi > r.Lo) {
		return nil
	}
	var t []float64
	for k := math.Ceil(r.Lo/r.Step - 1e-9); k*r.Step <= r.Hi+1e-9*r.Step; k++ {
		t = append(t, k*r.Step)
	}
	return t
}

// tickLabel writes a tick value in ASCII with no more decimals than its step needs.
func tickLabel(v, step float64) string {
	dec := 0
	if step < 1 {
		dec = int(math.Ceil(-math.Log10(step) - 1e-9))
	}
	if v == 0 {
		v = 0 // no "-0"
	}
	return strconv.FormatFloat(v, 'f', dec, 64)
}

// contains reports whether [lo, hi] lies within r.
func (r axisRange) contains(lo, hi float64) bool {
	return lo >= r.Lo && hi <= r.Hi
}

// bounds is the extent of some data: the least and greatest x and y.
type bounds struct {
	X0, X1, Y0, Y1 float64
}

// emptyBounds is the bounds of no data.
func emptyBounds() bounds {
	return bounds{math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)}
}

// add grows b to hold the finite points of xs, ys.
func (b *bounds) add(xs, ys []float64) {
	for i := range xs {
		x, y := xs[i], ys[i]
		if math.IsNaN(x) || math.IsNaN(y) || math.IsInf(x, 0) || math.IsInf(y, 0) {
			continue
		}
		b.X0, b.X1 = math.Min(b.X0, x), math.Max(b.X1, x)
		b.Y0, b.Y1 = math.Min(b.Y0, y), math.Max(b.Y1, y)
	}
}

// addPoint grows b to hold one point.
func (b *bounds) addPoint(x, y float64) { b.add([]float64{x}, []float64{y}) }

// empty reports whether b holds no point.
func (b bounds) empty() bool { return !(b.X1 >= b.X0) || !(b.Y1 >= b.Y0) }

// frame is the view of a plot: the range of both axes.
type frame struct {
	X, Y axisRange
}

// fitFrame returns a frame around b with headroom above and to the right, so
// that a few nudges do not push the data out again; nx and ny are the
// numbers of tick intervals to aim at.
func fitFrame(b bounds, nx, ny int, headroom float64) frame {
	if b.empty() {
		return frame{niceRange(0, 1, nx), niceRange(0, 1, ny)}
	}
	dx, dy := b.X1-b.X0, b.Y1-b.Y0
	x0 := b.X0 - 0.05*dx
	if b.X0 >= 0 {
		x0 = math.Max(0, x0) // no negative axis for data that has none
	}
	return frame{
		X: niceRange(x0, b.X1+headroom*dx, nx),
		Y: niceRange(b.Y0, b.Y1+headroom*dy, ny),
	}
}

// holds reports whether the frame holds b.
func (f frame) holds(b bounds) bool {
	return b.empty() || (f.X.contains(b.X0, b.X1) && f.Y.contains(b.Y0, b.Y1))
}

// tickCounts is the number of tick intervals to aim at on a plot of outer
// size w × h: about one every 12 columns and one every 4 rows, within limits
// that keep the labels apart and the axis useful.
func tickCounts(w, h int) (nx, ny int) {
	return min(max(w/12, 3), 10), min(max((h-3)/4, 3), 8)
}
