package analysis

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/stat"
)

// Rules for dropping beats (common practice, no source; docs/science.md §6 drops
// ectopic and post-ectopic beats). Each compares a beat with the median of
// its neighbours (up to neighbours on each side), so a slow change such as a
// caval occlusion is not taken for ectopy.
const (
	neighbours     = 5
	prematureFrac  = 0.80 // upstroke sooner than this fraction of the usual interval
	longCycleFrac  = 1.50 // cycle longer than this multiple of the usual period
	weakFrac       = 0.60 // peak pressure below this fraction of the neighbours'
	openLoopFrac   = 0.35 // end-diastolic volumes of the two ends differ by more than this fraction of SV
	minEjectionFrc = 0.02 // SV below this fraction of EDV (or 3 volume noise SDs) is no ejection
	minEjectionSD  = 3
)

// classifyBeats sets Dropped on the measured beats of one segment that break
// a rule; sd is the noise SD of the volume as measured, mL.
func classifyBeats(beats []*Beat, sd float64) {
	var idx []int // complete beats, in order
	for i, b := range beats {
		if !math.IsNaN(b.Upstroke) {
			idx = append(idx, i)
		}
	}
	drop := func(i int, format string, a ...any) {
		if beats[i].Dropped == "" {
			beats[i].Dropped = fmt.Sprintf(format, a...)
		}
	}
	// Premature upstrokes: the beat itself is ectopic, the beat before it is
	// cut short, the beat after is post-ectopic.
	coupling := make([]float64, len(idx))
	for k := range idx {
		coupling[k] = math.NaN()
		if k > 0 && adjacent(beats[idx[k-1]], beats[idx[k]]) {
			coupling[k] = beats[idx[k]].Upstroke - beats[idx[k-1]].Upstroke
		}
	}
	period := func(k int) float64 { b := beats[idx[k]]; return b.End - b.Start }
	for k := range idx {
		usual := neighbourMedian(coupling, k)
		if c := coupling[k]; c < prematureFrac*usual {
			drop(idx[k], "ectopic: premature upstroke %.0f ms after the previous one (usual %.0f ms)", c*1e3, usual*1e3)
			drop(idx[k-1], "cut short by the premature beat that follows")
			if k+1 < len(idx) && adjacent(beats[idx[k]], beats[idx[k+1]]) {
				drop(idx[k+1], "post-ectopic: follows a premature beat")
			}
		}
	}
	periods := make([]float64, len(idx))
	peaks := make([]float64, len(idx))
	for k, i := range idx {
		periods[k] = period(k)
		peaks[k] = math.NaN()
		if beats[i].Measured {
			peaks[k] = beats[i].peakP
		}
	}
	for k, i := range idx {
		b := beats[i]
		if !b.Measured {
			continue
		}
		m := &b.Metrics
		if usual := neighbourMedian(periods, k); periods[k] > longCycleFrac*usual {
			drop(i, "long cycle of %.0f ms (usual %.0f ms): a pause or a missed beat", periods[k]*1e3, usual*1e3)
		}
		if m.SW <= 0 {
			drop(i, "loop runs clockwise in the pressure–volume plane")
		}
		if m.SV < math.Max(minEjectionSD*sd, minEjectionFrc*m.EDV) {
			drop(i, "no ejection (SV %.3g mL, EDV %.3g mL)", m.SV, m.EDV)
		}
		if usual := neighbourMedian(peaks, k); peaks[k] < weakFrac*usual {
			drop(i, "weak beat: pressure peaks at %.0f mmHg (neighbours %.0f mmHg)", peaks[k], usual)
		}
		if d := b.closeGap; d > openLoopFrac*m.SV {
			drop(i, "loop does not close: its end-diastolic volumes differ by %.3g mL (SV %.3g mL)", d, m.SV)
		}
	}
}

// adjacent reports whether b follows a directly in the same segment.
func adjacent(a, b *Beat) bool { return a.seg == b.seg && a.to-1 == b.from }

// neighbourMedian is the median of the finite values within neighbours of k,
// k itself excluded; NaN when there are none.
func neighbourMedian(x []float64, k int) float64 {
	var w []float64
	for j := max(0, k-neighbours); j <= min(len(x)-1, k+neighbours); j++ {
		if j != k && !math.IsNaN(x[j]) {
			w = append(w, x[j])
		}
	}
	if len(w) == 0 {
		return math.NaN()
	}
	slices.Sort(w)
	return stat.Quantile(0.5, stat.LinInterp, w, nil)
}
