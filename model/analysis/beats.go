package analysis

import (
	"math"
	"reflect"

	"pvcouple/model"
)

// Beat detection without an ECG (common practice, no source): each beat's
// pressure upstroke is a peak of dP/dt (from the timing filter) above upstrokeFrac of the recording's high dP/dt (its 99.5th
// percentile), at least the refractory window apart.
//
// End-diastole is the later of two points before the upstroke: the onset of
// contraction, the last sample where dP/dt is below onsetFrac of its peak;
// and the start of the plateau of largest volume, the first sample of the
// last run within a band of the largest volume, searched from at most the
// end-diastole window before the upstroke until dP/dt reaches edFrac of its
// peak (isovolumic contraction is then well under way). The band is three
// noise SDs of the timing smoother's volume (at least 0.1 % of the
// volume) so that noise cannot move end-diastole into isovolumic
// contraction. When filling lasts into contraction (fast heart rates) the
// plateau starts at mitral closure; otherwise the onset of contraction ends
// a flat diastasis. On a clean model recording both give the model's own
// end-diastole within a fraction of a mmHg.
const (
	upstrokeFrac = 0.35
	edFrac       = 0.50
	onsetFrac    = 0.05
	edBandSD     = 3
	edBandMin    = 1e-3
)

// Beat is one beat of a recording, from one end-diastole to the next
// inclusive, with its measurements.
type Beat struct {
	Index    int     // 1-based, in time order
	Start    float64 // time of its first sample (end-diastole), s
	End      float64 // time of its last sample (the next end-diastole), s
	Upstroke float64 // time of its peak dP/dt, s; NaN for fragments
	// Metrics are its measurements; all NaN when Measured is false.
	Metrics  model.Metrics
	Measured bool
	// Dropped says why the beat is left out of the fits and summaries; empty
	// when it is kept.
	Dropped string
	// Ejection is the timing of ejection read from the outflow (see
	// ejectionTiming); its Err says why it could not be found.
	Ejection Ejection
	// Run is the index in Analysis.Runs of the occlusion run the beat
	// belongs to, −1 for none.
	Run int

	peakP    float64 // highest LV pressure, mmHg
	closeGap float64 // |V(end) − V(start)|, mL
	from, to int     // the beat's samples in the recording
	onset    int     // the sample of the onset of contraction (≤ from)
	seg      *signals
}

// Kept reports whether the beat is used.
func (b *Beat) Kept() bool { return b.Dropped == "" }

// Samples returns the filtered samples of the beat, as passed to
// model.Measure (filtered again at each call).
func (b *Beat) Samples() model.BeatSamples {
	return b.filtered().samples()
}

func (b *Beat) filtered() filtered {
	s := b.seg
	return s.window(b.from-s.seg.From, b.to-s.seg.From)
}

// findBeats cuts one filtered segment into beats. thr is the dP/dt threshold
// of an upstroke, mmHg/s. Fragments at the ends of the segment are returned
// as dropped beats without measurements.
func findBeats(sig *signals, w *windows, thr float64, atStart, atEnd string) []*Beat {
	d := sig.detect
	n := len(d)
	refr := int(math.Round(w.refractory / sig.dt))
	back := int(math.Round(w.edSearch / sig.dt))
	th := float32(thr)
	var ups []int
	for i := 0; i < n; {
		if !(d[i] >= th) {
			i++
			continue
		}
		k := i
		for ; i < n && d[i] >= th; i++ {
			if d[i] > d[k] {
				k = i
			}
		}
		if m := len(ups); m > 0 && k-ups[m-1] < refr {
			if d[k] > d[ups[m-1]] {
				ups[m-1] = k
			}
			continue
		}
		ups = append(ups, k)
	}
	// End-diastole of each upstroke; −1 where none is found.
	eds := make([]int, len(ups))
	onsets := make([]int, len(ups))
	v := sig.v
	for j, k := range ups {
		lim := max(0, k-back)
		if j > 0 {
			lim = max(lim, ups[j-1]+1)
		}
		eds[j] = -1
		end := -1
		for i := k; i >= lim; i-- {
			if d[i] < edFrac*d[k] {
				end = i
				break
			}
		}
		if end < 0 {
			continue
		}
		onset := end
		for onset > lim && d[onset] >= onsetFrac*d[k] {
			onset--
		}
		top := lim
		for i := lim; i <= end; i++ {
			if v[i] > v[top] {
				top = i
			}
		}
		band := float32(math.Max(edBandSD*sig.noiseVT, edBandMin*math.Abs(float64(v[top]))))
		i := top
		for i > lim && v[i-1] >= v[top]-band {
			i--
		}
		eds[j], onsets[j] = max(i, onset), onset
	}
	var beats []*Beat
	g := sig.seg.From
	newBeat := func(from, to int) *Beat {
		return &Beat{Start: sig.time(from), End: sig.time(to - 1), Upstroke: math.NaN(), Metrics: nanMetrics(),
			from: g + from, to: g + to, seg: sig, Run: -1, Ejection: noEjection("fragment")}
	}
	frag := func(from, to int, why string) {
		if to-from < 2 {
			return
		}
		b := newBeat(from, to)
		b.Dropped = why
		beats = append(beats, b)
	}
	// A beat must start and end at least half a filter window inside the
	// segment: nearer its ends the filters fit one-sided polynomials.
	edge := max(sig.sm.Window, sig.ts.Window) / 2
	for j := range eds {
		if eds[j] >= 0 && (eds[j] < edge || eds[j] > n-1-edge) {
			eds[j] = -1
		}
	}
	first := -1
	for j := range ups {
		if eds[j] >= 0 {
			first = j
			break
		}
	}
	if first < 0 {
		frag(0, n, atStart)
		return beats
	}
	frag(0, eds[first]+1, atStart)
	prev := first
	for j := first + 1; j < len(ups); j++ {
		if eds[j] < 0 {
			continue // merged into the beat before: found as a long cycle
		}
		b := newBeat(eds[prev], eds[j]+1)
		b.Upstroke = sig.time(ups[prev])
		b.onset = g + onsets[prev]
		beats = append(beats, b)
		prev = j
	}
	frag(eds[prev], n, atEnd)
	return beats
}

// upstrokeThreshold is upstrokeFrac of the 99.5th percentile of dP/dt over
// all segments.
func upstrokeThreshold(segs []*signals) float64 {
	n := 0
	for _, s := range segs {
		n += len(s.detect)
	}
	at := func(i int) float64 {
		for _, s := range segs {
			if i < len(s.detect) {
				return float64(s.detect[i])
			}
			i -= len(s.detect)
		}
		return nan
	}
	return upstrokeFrac * quantileOf(n, at, 0.995)
}

// nanMetrics is a Metrics with every value NaN.
func nanMetrics() model.Metrics {
	var m model.Metrics
	v := reflect.ValueOf(&m).Elem()
	for i := 0; i < v.NumField(); i++ {
		if f := v.Field(i); f.Kind() == reflect.Float64 && f.CanSet() {
			f.SetFloat(nan)
		}
	}
	return m
}
