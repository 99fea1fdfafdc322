package analysis

import (
	"fmt"
	"math"
	"slices"
	"strconv"

	"gonum.org/v1/gonum/interp"
)

// maxFill is the longest run of missing samples filled by interpolation;
// longer gaps split the recording.
const maxFill = 5

// jitterTol is how far a sampling interval may stray from the median, as a
// fraction, before a segment is resampled.
const jitterTol = 0.1

// setTimeline checks the sample times, finds the sampling rate and gaps, and
// makes the time grid uniform within each segment. lines are the file lines
// of the samples, for messages.
func (r *Recording) setTimeline(lines []int, o ReadOptions) error {
	n := len(r.T)
	col := r.Columns.Time
	for i := 1; i < n; i++ {
		if !(r.T[i] > r.T[i-1]) {
			return &InputError{File: r.Source, Line: lines[i], Column: col, Msg: fmt.Sprintf(
				"time %g s is not after the previous sample's %g s (line %d); times must increase", r.T[i], r.T[i-1], lines[i-1])}
		}
	}
	dts := make([]float64, n-1)
	for i := range dts {
		dts[i] = r.T[i+1] - r.T[i]
	}
	sorted := slices.Clone(dts)
	slices.Sort(sorted)
	med := sorted[len(sorted)/2]
	rate := 1 / med
	if !(rate >= MinRate*0.99 && rate <= MaxRate*1.01) {
		hint := ""
		switch {
		case r.Columns.TimeUnit == "s" && rate*1e3 >= MinRate && rate*1e3 <= MaxRate:
			hint = "; the times look like milliseconds: name the column e.g. \"time_ms\" or give --time-unit ms"
		case r.Columns.TimeUnit == "ms" && rate/1e3 >= MinRate && rate/1e3 <= MaxRate:
			hint = "; the times look like seconds: give --time-unit s"
		case o.Rate > 0:
		}
		return &InputError{File: r.Source, Column: col, Msg: fmt.Sprintf(
			"sampling rate %.4g Hz (median step %.4g %s) is outside %d to %d Hz%s",
			rate, med/timeScale[r.Columns.TimeUnit], r.Columns.TimeUnit, MinRate, MaxRate, hint)}
	}
	// The median interval carries the file's rounding: 1/0.004 reads as
	// 249.99999999999977. Nine significant digits are plenty.
	r.Rate, _ = strconv.ParseFloat(strconv.FormatFloat(rate, 'g', 9, 64), 64)

	// Split at long gaps; resample segments with short gaps or jitter.
	var segs []Span
	from := 0
	for i, dt := range dts {
		if math.Round(dt/med)-1 > maxFill {
			segs = append(segs, Span{from, i + 1})
			r.Gaps = append(r.Gaps, Gap{r.T[i], r.T[i+1]})
			from = i + 1
		}
	}
	segs = append(segs, Span{from, n})
	var t, p, v, pao []float64
	filled, jitter := 0, 0
	for _, s := range segs {
		need := false
		for i := s.From; i < s.To-1; i++ {
			switch d := dts[i] / med; {
			case d >= 1.5:
				filled++
				need = true
			case math.Abs(d-1) > jitterTol:
				jitter++
				need = true
			}
		}
		start := len(t)
		if !need {
			t = append(t, r.T[s.From:s.To]...)
			p = append(p, r.P[s.From:s.To]...)
			v = append(v, r.V[s.From:s.To]...)
			if r.Pao != nil {
				pao = append(pao, r.Pao[s.From:s.To]...)
			}
		} else {
			grid := uniformGrid(r.T[s.From], r.T[s.To-1], med)
			t = append(t, grid...)
			p = append(p, resample(r.T[s.From:s.To], r.P[s.From:s.To], grid)...)
			v = append(v, resample(r.T[s.From:s.To], r.V[s.From:s.To], grid)...)
			if r.Pao != nil {
				pao = append(pao, resample(r.T[s.From:s.To], r.Pao[s.From:s.To], grid)...)
			}
		}
		r.Segments = append(r.Segments, Span{start, len(t)})
	}
	r.T, r.P, r.V = t, p, v
	if r.Pao != nil {
		r.Pao = pao
	}
	if filled > 0 {
		r.warnf("%d short gaps (up to %d missing samples) were filled by linear interpolation", filled, maxFill)
	}
	if jitter > 0 {
		r.warnf("sampling is irregular (%d of %d intervals differ from the median %.4g ms by more than %.0f %%): resampled to %.4g Hz by linear interpolation",
			jitter, len(dts), med*1e3, jitterTol*100, rate)
	}
	for _, g := range r.Gaps {
		r.warnf("gap in the recording from %.3f s to %.3f s: beats across it are dropped", g.From, g.To)
	}
	return nil
}

// uniformGrid returns t0, t0+dt, … up to t1.
func uniformGrid(t0, t1, dt float64) []float64 {
	m := int(math.Floor((t1-t0)/dt+1e-6)) + 1
	g := make([]float64, m)
	for i := range g {
		g[i] = t0 + float64(i)*dt
	}
	return g
}

// resample interpolates y(t) linearly at the grid times.
func resample(t, y, grid []float64) []float64 {
	var pl interp.PiecewiseLinear
	if err := pl.Fit(t, y); err != nil {
		panic(err) // t is checked to increase and has at least 2 samples
	}
	out := make([]float64, len(grid))
	for i, x := range grid {
		out[i] = pl.Predict(x)
	}
	return out
}
