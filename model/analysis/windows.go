package analysis

import (
	"fmt"
	"math"
	"slices"
)

// The windows of the analysis scale with the recording's beat period T, so
// that a mouse at 600 bpm is treated as a human at 60 (common practice, no
// source; at 75 bpm they are the fixed windows this package used for human
// recordings: 30 ms smoothing, 40 ms detection, 240 ms refractory).
const (
	smoothFrac     = 0.0375 // default Savitzky–Golay window for measuring
	maxSmoothFrac  = 0.125  // the longest smoothing allowed
	timingFrac     = 0.05   // timing filters: finding beats, the onset and end of ejection
	refractoryFrac = 0.3    // upstrokes closer than this are one
	edSearchFrac   = 0.3    // how far before an upstroke end-diastole is sought
	// minSamplesPerBeat: fewer samples than this a beat cannot be measured.
	minSamplesPerBeat = 30
)

// windows are the time windows of one analysis, s.
type windows struct {
	smooth               float64 // measuring window
	timing               float64
	refractory, edSearch float64
	minSmooth, maxSmooth float64 // the range allowed for smooth
}

// newWindows sets the windows for a recording of median period T sampled at
// rate; smooth is the requested measuring window (0: the default).
func newWindows(T, rate, smooth float64) (*windows, error) {
	w := &windows{timing: timingFrac * T,
		refractory: refractoryFrac * T, edSearch: edSearchFrac * T,
		minSmooth: minWindow / rate, maxSmooth: maxSmoothFrac * T}
	if T*rate < minSamplesPerBeat {
		return nil, fmt.Errorf("beats last about %.0f ms, only %.0f samples at %.6g Hz; measuring a beat needs at least %d samples: record at %.0f Hz or more",
			T*1e3, T*rate, rate, minSamplesPerBeat, math.Ceil(minSamplesPerBeat/T/100)*100)
	}
	w.smooth = smoothFrac * T
	if smooth != 0 {
		if !(smooth >= w.minSmooth-1e-12 && smooth <= w.maxSmooth+1e-12) {
			return nil, &SmoothError{Value: smooth, Min: w.minSmooth, Max: w.maxSmooth, Period: T}
		}
		w.smooth = smooth
	}
	w.smooth = max(w.smooth, w.minSmooth)
	return w, nil
}

// SmoothError is a smoothing window outside the range allowed for the
// recording: from minWindow samples to maxSmoothFrac of its beat period.
type SmoothError struct {
	Value, Min, Max, Period float64 // s
}

func (e *SmoothError) Error() string {
	return fmt.Sprintf("smoothing window %.4g ms: allowed %.3g to %.3g ms for this recording (%d samples to 1/8 of its %.0f-ms beats)",
		e.Value*1e3, e.Min*1e3, e.Max*1e3, minWindow, e.Period*1e3)
}

// beatPeriod finds the median beat period of a recording, s, from the
// upward crossings of LV pressure through 45 % of its range (after falling
// below 20 %: hysteresis against noise), keeping intervals of rates within
// the species' search range.
func beatPeriod(r *Recording) (float64, error) {
	lo, hi := r.pRange[0], r.pRange[1]
	up, down := lo+0.45*(hi-lo), lo+0.2*(hi-lo)
	hrLo, hrHi := r.Species.hrRange()
	minT, maxT := 60/hrHi, 60/hrLo
	var all, kept []float64
	for _, s := range r.Segments {
		last := math.NaN()
		armed := false
		for i := s.From; i < s.To; i++ {
			p := r.p.at(i)
			switch {
			case p < down:
				armed = true
			case armed && p >= up:
				armed = false
				t := s.Start + float64(i-s.From)*s.Step
				if d := t - last; !math.IsNaN(d) {
					all = append(all, d)
					if d >= minT && d <= maxT {
						kept = append(kept, d)
					}
				}
				last = t
			}
		}
	}
	if len(kept) == 0 {
		if len(all) == 0 {
			return 0, fmt.Errorf("LV pressure does not rise and fall beat by beat: fewer than two beats found")
		}
		slices.Sort(all)
		m := all[len(all)/2]
		return 0, fmt.Errorf("beats come every %.0f ms (%.0f bpm), outside the %.0f–%.0f bpm searched%s", m*1e3, 60/m, hrLo, hrHi, speciesHint(r.Species))
	}
	slices.Sort(kept)
	return kept[len(kept)/2], nil
}

func speciesHint(s *Species) string {
	if s == nil {
		return ""
	}
	return fmt.Sprintf(" for --species %s; is the species right?", s.Name)
}
