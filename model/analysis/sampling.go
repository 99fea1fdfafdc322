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

// setTimeline finds the sampling rate and gaps from the sample times t
// (increasing, checked while reading) and makes the time grid uniform within
// each segment: a segment whose intervals all lie within jitterTol of the
// median keeps its samples at its mean interval; one with short gaps or
// jitter is resampled to the median interval by linear interpolation.
func (r *Recording) setTimeline(t *times) error {
	n := t.n
	med := medianInterval(t)
	rate, _ := strconv.ParseFloat(strconv.FormatFloat(1/med, 'g', 9, 64), 64)
	if !(rate >= MinRate && rate <= MaxRate) {
		hint := ""
		switch {
		case r.Columns.TimeUnit == "s" && rate*1e3 >= MinRate && rate*1e3 <= MaxRate:
			hint = "; the times look like milliseconds: name the column e.g. \"time_ms\" or give --time-unit ms"
		case r.Columns.TimeUnit == "ms" && rate/1e3 >= MinRate && rate/1e3 <= MaxRate:
			hint = "; the times look like seconds: give --time-unit s"
		}
		return r.cellErr(0, r.Columns.Time, fmt.Sprintf(
			"sampling rate %.6g Hz (median step %.4g %s) is outside %d to %d Hz%s",
			rate, med/timeScale[r.Columns.TimeUnit], r.Columns.TimeUnit, MinRate, MaxRate, hint))
	}
	// The median interval carries the file's rounding: 1/0.004 reads as
	// 249.99999999999977. Nine significant digits are plenty.
	r.Rate = rate

	// Split at long gaps; note which segments need resampling.
	var spans []Span
	from := 0
	for i := 0; i+1 < n; i++ {
		if dt := t.at(i+1) - t.at(i); math.Round(dt/med)-1 > maxFill {
			spans = append(spans, Span{from, i + 1})
			r.Gaps = append(r.Gaps, Gap{t.at(i), t.at(i + 1)})
			from = i + 1
		}
	}
	spans = append(spans, Span{from, n})
	filled, jitter := 0, 0
	need := make([]bool, len(spans))
	for k, s := range spans {
		for i := s.From; i < s.To-1; i++ {
			switch d := (t.at(i+1) - t.at(i)) / med; {
			case d >= 1.5:
				filled++
				need[k] = true
			case math.Abs(d-1) > jitterTol:
				jitter++
				need[k] = true
			}
		}
	}
	if !slices.Contains(need, true) {
		for _, s := range spans {
			r.Segments = append(r.Segments, Segment{Span: s, Start: t.at(s.From), Step: meanStep(t, s, med)})
		}
	} else {
		r.resample(t, spans, need, med)
	}
	if filled > 0 {
		r.warnf("%d short gaps (up to %d missing samples) were filled by linear interpolation", filled, maxFill)
	}
	if jitter > 0 {
		r.warnf("sampling is irregular (%d of %d intervals differ from the median %.4g ms by more than %.0f %%): resampled to %.6g Hz by linear interpolation",
			jitter, n-1, med*1e3, jitterTol*100, rate)
	}
	for _, g := range r.Gaps {
		r.warnf("gap in the recording from %.3f s to %.3f s: beats across it are dropped", g.From, g.To)
	}
	return nil
}

// medianInterval is the median of the sampling intervals.
func medianInterval(t *times) float64 {
	return quantileOf(t.n-1, func(i int) float64 { return t.at(i+1) - t.at(i) }, 0.5)
}

// resample puts the segments marked in need on a grid of step med (linear
// interpolation, a block at a time) and copies the others.
func (r *Recording) resample(t *times, spans []Span, need []bool, med float64) {
	var p, v, pao column
	cols := []struct{ src, dst *column }{{&r.p, &p}, {&r.v, &v}}
	if r.hasAortic {
		cols = append(cols, struct{ src, dst *column }{&r.pao, &pao})
	}
	var tb, yb []float64
	for k, s := range spans {
		start := p.n
		if !need[k] {
			for _, c := range cols {
				for i := s.From; i < s.To; i++ {
					c.dst.push(c.src.at(i))
				}
			}
			r.Segments = append(r.Segments, Segment{Span{start, p.n}, t.at(s.From), meanStep(t, s, med)})
			continue
		}
		t0, t1 := t.at(s.From), t.at(s.To-1)
		m := int(math.Floor((t1-t0)/med+1e-6)) + 1
		// Blocks of input samples overlapping by one; each grid time is
		// predicted from the block that holds it.
		g := 0
		for b := s.From; b < s.To-1 && g < m; b += blockSize {
			e := min(s.To, b+blockSize+1)
			tb = t.window(tb, b, e)
			for _, c := range cols {
				yb = c.src.window(yb, b, e)
				var pl interp.PiecewiseLinear
				if err := pl.Fit(tb, yb); err != nil {
					panic(err) // times increase and a block has at least 2 samples
				}
				for j := g; j < m; j++ {
					x := t0 + float64(j)*med
					if x > tb[len(tb)-1] && e < s.To {
						break
					}
					c.dst.push(pl.Predict(math.Min(x, tb[len(tb)-1])))
				}
			}
			g = p.n - start
		}
		r.Segments = append(r.Segments, Segment{Span{start, p.n}, t0, med})
	}
	r.p, r.v = p, v
	if r.hasAortic {
		r.pao = pao
	}
}

// meanStep is the mean interval of the samples of span s, med for a single
// sample.
func meanStep(t *times, s Span, med float64) float64 {
	if s.To-s.From > 1 {
		return (t.at(s.To-1) - t.at(s.From)) / float64(s.To-s.From-1)
	}
	return med
}
