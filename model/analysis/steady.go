package analysis

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/stat"
)

// Steady segments are the stretches of kept beats outside the preload runs
// where the heart is at a steady state (common practice, no source): the
// longest stretch of consecutive beats whose EDV stays within steadyTol of
// EDV (or steadyNoise noise SDs) of a straight line fitted through the
// stretch's EDVs against time. The line lets a slow drift through, so drift
// can be measured on it; the band leaves out the recovery from an occlusion.
// A steady segment has at least minSteadyBeats beats.
const (
	steadyTol      = 0.03
	steadyNoise    = 3
	minSteadyBeats = 3
)

// steadySegments splits the kept, measured beats outside runs into
// stretches and keeps each stretch's steady part.
func steadySegments(kept []*Beat, sd float64) [][]*Beat {
	var out [][]*Beat
	var cur []*Beat
	flush := func() {
		if s := steadyPart(cur, sd); len(s) >= minSteadyBeats {
			out = append(out, s)
		}
		cur = nil
	}
	for _, b := range kept {
		if b.Run >= 0 || len(cur) > 0 && !adjacentKept(cur[len(cur)-1], b) {
			flush()
		}
		if b.Run < 0 {
			cur = append(cur, b)
		}
	}
	flush()
	return out
}

// steadyPart is the longest run of beats of a stretch within the band around
// the line through their EDVs.
func steadyPart(beats []*Beat, sd float64) []*Beat {
	if len(beats) < minSteadyBeats {
		return nil
	}
	ts := make([]float64, len(beats))
	ev := make([]float64, len(beats))
	for i, b := range beats {
		ts[i], ev[i] = b.Start, b.Metrics.EDV
	}
	// A line fitted to the middle half of the EDVs (by rank) is not pulled
	// by a recovery at one end.
	alpha, beta := robustLine(ts, ev)
	best, from := []*Beat(nil), 0
	for i := 0; i <= len(beats); i++ {
		if i < len(beats) {
			fit := alpha + beta*ts[i]
			if math.Abs(ev[i]-fit) <= math.Max(steadyTol*fit, steadyNoise*sd) {
				continue
			}
		}
		if i-from > len(best) {
			best = beats[from:i]
		}
		from = i + 1
	}
	return best
}

// robustLine fits y against t by least squares through the points whose y
// lies between the first and third quartiles of y (all points when fewer
// than 8).
func robustLine(t, y []float64) (alpha, beta float64) {
	if len(y) < 8 {
		return stat.LinearRegression(t, y, nil, false)
	}
	sorted := append([]float64(nil), y...)
	q1, q3 := quartiles(sorted)
	var tt, yy []float64
	for i := range y {
		if y[i] >= q1 && y[i] <= q3 {
			tt, yy = append(tt, t[i]), append(yy, y[i])
		}
	}
	if len(tt) < 2 {
		return stat.LinearRegression(t, y, nil, false)
	}
	return stat.LinearRegression(tt, yy, nil, false)
}

// quartiles of x (x is reordered).
func quartiles(x []float64) (q1, q3 float64) {
	slices.Sort(x)
	return stat.Quantile(0.25, stat.LinInterp, x, nil), stat.Quantile(0.75, stat.LinInterp, x, nil)
}
