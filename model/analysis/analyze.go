package analysis

import (
	"fmt"
	"math"
	"strings"

	"pvcouple/model"
)

// Options say how to analyse a recording. The zero value is the default.
type Options struct {
	// SmoothWindow is the Savitzky–Golay window, s; 0 means
	// DefaultSmoothWindow. dP/dt always comes from this filter.
	SmoothWindow float64
	// Raw passes unsmoothed pressure and volume to the measurements
	// (dP/dt is still the filter's).
	Raw bool
	// ESPVR is "linear" (default) or "quadratic".
	ESPVR string
}

// Sources of V0 and Ees for measuring the beats.
const (
	SourceESPVR      = "espvr"       // the ESPVR fitted to a preload run
	SourceSingleBeat = "single-beat" // Chen et al. 2001 (Ees only)
	SourceNone       = "none"        // unknown: V0 = 0 for finding end-systole (maximal P/V), PE not measured
	// SourceVolumeFloor: unknown, and volumes fall below 1 mL (an offset):
	// V0 is taken 10 mL below the smallest volume for finding end-systole
	// only; PE, PVA, efficiency and VO2 are not measured.
	SourceVolumeFloor = "volume-floor"
)

// Analysis is a recording measured beat by beat, with the relations fitted to it.
type Analysis struct {
	Recording *Recording
	Options   Options
	Beats     []*Beat // every beat and fragment, in time order, kept or dropped

	// PreloadRun are the beats of the preload change the ESPVR and EDPVR are
	// fitted to; empty when the recording is steady.
	PreloadRun []*Beat
	ESPVR      *ESPVRFit // nil when there is no preload run or the fit failed
	EDPVR      *EDPVRFit // nil when it could not be fitted
	// Steady are the kept beats at steady state: before the preload run, or
	// all kept beats when there is none.
	Steady     []*Beat
	SingleBeat *SingleBeat // nil when no steady beat could be used

	// Known is what the beats were measured with; V0Source and EesSource say
	// where its V0 and Ees came from (Source… constants).
	Known     model.Known
	V0Source  string
	EesSource string

	NoiseP, NoiseV float64  // estimated SD of pressure (mmHg) and volume (mL) noise
	Notes          []string // what could not be done, and why
	Warnings       []string // what looks doubtful in the data (includes the recording's)
}

// Kept returns the kept beats in time order.
func (a *Analysis) Kept() []*Beat {
	var k []*Beat
	for _, b := range a.Beats {
		if b.Kept() {
			k = append(k, b)
		}
	}
	return k
}

func (a *Analysis) notef(format string, x ...any) {
	a.Notes = append(a.Notes, fmt.Sprintf(format, x...))
}
func (a *Analysis) warnf(format string, x ...any) {
	a.Warnings = append(a.Warnings, fmt.Sprintf(format, x...))
}

// Analyze finds the beats of a recording, drops ectopic and incomplete ones
// with a reason, measures each with model.Measure, fits the ESPVR and EDPVR
// when preload changes across at least MinESPVRBeats beats, and makes the
// single-beat estimates from the steady beats. An error means the recording
// cannot be analysed at all (no beats, or loops that run the wrong way).
func Analyze(r *Recording, o Options) (*Analysis, error) {
	if o.SmoothWindow == 0 {
		o.SmoothWindow = DefaultSmoothWindow
	}
	if !(o.SmoothWindow >= 0.002 && o.SmoothWindow <= 0.1) {
		return nil, fmt.Errorf("smoothing window %g ms: allowed 2 to 100 ms", o.SmoothWindow*1e3)
	}
	switch o.ESPVR {
	case "":
		o.ESPVR = "linear"
	case "linear", "quadratic":
	default:
		return nil, fmt.Errorf("ESPVR method %q: allowed linear, quadratic", o.ESPVR)
	}
	a := &Analysis{Recording: r, Options: o, Warnings: append([]string(nil), r.Warnings...)}
	var sigs []*signals
	for _, s := range r.Segments {
		sig, err := filterSegment(r, s, o.SmoothWindow, !o.Raw)
		if err != nil {
			a.notef("segment from %.3f s to %.3f s is too short to analyse", r.T[s.From], r.T[s.To-1])
			continue
		}
		sigs = append(sigs, sig)
	}
	if len(sigs) == 0 {
		return nil, &InputError{File: r.Source, Msg: "no stretch of the recording is long enough to analyse"}
	}
	a.noise(sigs)
	thr := upstrokeThreshold(sigs)
	if !(thr > 0) {
		return nil, &InputError{File: r.Source, Column: r.Columns.Pressure, Msg: "pressure never rises steeply: no beats found; is it LV pressure?"}
	}
	for k, sig := range sigs {
		atStart, atEnd := "incomplete: cut by a gap in the recording", "incomplete: cut by a gap in the recording"
		if k == 0 {
			atStart = "incomplete: the recording starts within this beat"
		}
		if k == len(sigs)-1 {
			atEnd = "incomplete: the recording ends within this beat"
		}
		a.Beats = append(a.Beats, findBeats(sig, thr, atStart, atEnd)...)
	}
	for i, b := range a.Beats {
		b.Index = i + 1
	}
	// First pass: V0 unknown; below the volumes when they carry an offset.
	a.Known = model.Unknown()
	a.V0Source, a.EesSource = SourceNone, SourceNone
	if lo, _ := percentiles(r.V); lo < 1 {
		a.Known.V0, a.V0Source = lo-10, SourceVolumeFloor
	}
	a.measure()
	if err := a.checkOrientation(); err != nil {
		return nil, err
	}
	for _, sig := range sigs {
		var seg []*Beat
		for _, b := range a.Beats {
			if b.seg == sig {
				seg = append(seg, b)
			}
		}
		classifyBeats(seg)
	}
	if len(a.Kept()) == 0 {
		count := map[string]int{}
		var order []string
		for _, b := range a.Beats {
			why, _, _ := strings.Cut(b.Dropped, ":")
			if count[why] == 0 {
				order = append(order, why)
			}
			count[why]++
		}
		var parts []string
		for _, w := range order {
			parts = append(parts, fmt.Sprintf("%d %s", count[w], w))
		}
		return nil, &InputError{File: r.Source, Msg: fmt.Sprintf("no beat could be kept among the %d found (%s); are these LV pressure and volume?",
			len(a.Beats), strings.Join(parts, ", "))}
	}

	a.fitRelations()
	a.findSteady()
	// Measure again with what the fits and estimates know, so that V0 sets
	// end-systole and Ees, PE and PVA are filled in.
	a.measure()
	a.checkQuality()
	return a, nil
}

// measure measures every complete beat with a.Known.
func (a *Analysis) measure() {
	for _, b := range a.Beats {
		if math.IsNaN(b.Upstroke) {
			continue
		}
		b.Samples = b.samples()
		m, err := model.Measure(b.Samples, a.Known)
		if err != nil {
			b.Measured, b.Metrics = false, nanMetrics()
			if b.Dropped == "" {
				b.Dropped = "not measurable: " + err.Error()
			}
			continue
		}
		if a.V0Source == SourceVolumeFloor {
			nan := math.NaN()
			m.PE, m.PVA, m.Efficiency, m.VO2, m.VO2Per100g, m.MechEff = nan, nan, nan, nan, nan, nan
		}
		b.Metrics, b.Measured = m, true
	}
}

// checkOrientation refuses a recording whose loops mostly run clockwise in
// the pressure–volume plane: its pressure and volume columns are swapped.
func (a *Analysis) checkOrientation() error {
	cw, n := 0, 0
	for _, b := range a.Beats {
		if b.Measured {
			n++
			if b.Metrics.SW < 0 {
				cw++
			}
		}
	}
	if n == 0 {
		return &InputError{File: a.Recording.Source, Msg: fmt.Sprintf(
			"no complete beat found in %.3g s (need a pressure upstroke with end-diastole before it, twice); are the pressure (%q) and volume (%q) columns right?",
			a.Recording.Duration(), a.Recording.Columns.Pressure, a.Recording.Columns.Volume)}
	}
	if 2*cw > n {
		return &InputError{File: a.Recording.Source, Msg: fmt.Sprintf(
			"%d of %d loops run clockwise in the pressure–volume plane (LV loops run counter-clockwise): "+
				"the pressure (%q) and volume (%q) columns look swapped; name them with --pressure-col and --volume-col",
			cw, n, a.Recording.Columns.Pressure, a.Recording.Columns.Volume)}
	}
	return nil
}

// fitRelations fits the ESPVR and EDPVR to the preload run, if there is one.
func (a *Analysis) fitRelations() {
	a.PreloadRun = preloadRun(a.Beats)
	if len(a.PreloadRun) == 0 {
		a.notef("no ESPVR or EDPVR: end-diastolic volume does not change by %.0f %% (and %d mL) across %d or more kept beats in a row",
			minPreloadChange*100, minPreloadML, MinESPVRBeats)
		return
	}
	samples := make([]model.BeatSamples, len(a.PreloadRun))
	for i, b := range a.PreloadRun {
		samples[i] = b.Samples
	}
	var fit ESPVRFit
	var err error
	v0Start := 0.0
	if a.V0Source == SourceVolumeFloor {
		v0Start = a.Known.V0
	}
	if a.Options.ESPVR == "quadratic" {
		fit, err = FitESPVRQuadratic(samples, v0Start)
	} else {
		fit, err = FitESPVR(samples, v0Start)
	}
	if err != nil {
		a.notef("ESPVR not fitted to beats %d–%d: %v", a.PreloadRun[0].Index, a.PreloadRun[len(a.PreloadRun)-1].Index, err)
	} else {
		a.ESPVR = &fit
		a.Known.V0, a.Known.Ees = fit.V0, fit.Ees
		a.V0Source, a.EesSource = SourceESPVR, SourceESPVR
		if fit.R2 < 0.9 {
			a.warnf("the ESPVR fits its end-systolic points poorly (r² %.3f)", fit.R2)
		}
	}
	v0 := a.Known.V0
	if math.IsNaN(v0) {
		v0 = 0
		a.notef("EDPVR fitted with V0 = 0 mL, as no ESPVR gives V0")
	}
	pts := make([]Point, len(a.PreloadRun))
	for i, b := range a.PreloadRun {
		pts[i] = Point{b.Metrics.EDV, b.Metrics.EDP}
	}
	if ed, err := FitEDPVR(pts, v0); err != nil {
		a.notef("EDPVR not fitted: %v", err)
	} else {
		a.EDPVR = &ed
		a.Known.EdpvrA, a.Known.EdpvrB = ed.A, ed.B
	}
}

// findSteady picks the steady beats and makes the single-beat estimates.
func (a *Analysis) findSteady() {
	kept := a.Kept()
	a.Steady = kept
	if len(a.PreloadRun) > 0 {
		a.Steady = nil
		first := a.PreloadRun[0]
		for _, b := range kept {
			if b.Index < first.Index {
				a.Steady = append(a.Steady, b)
			}
		}
	}
	var measured []*Beat
	for _, b := range a.Steady {
		if b.Measured {
			measured = append(measured, b)
		}
	}
	a.Steady = measured
	if len(a.Steady) == 0 {
		a.notef("no steady beats before the preload change: no single-beat estimates")
		return
	}
	a.SingleBeat = singleBeat(a.Steady)
	if a.SingleBeat == nil {
		a.notef("no steady beat has a clear onset of ejection: no single-beat estimates")
		return
	}
	if c := a.SingleBeat.Chen; c != nil && a.ESPVR == nil {
		a.Known.Ees = c.Ees
		a.EesSource = SourceSingleBeat
	}
}

// SteadyMedians returns, for every key of model.MetricSpecs, the median over
// the steady beats (NaN when there are none or the metric is unknown).
func (a *Analysis) SteadyMedians() map[string]float64 {
	out := make(map[string]float64, len(model.MetricSpecs))
	for _, s := range model.MetricSpecs {
		var x []float64
		for _, b := range a.Steady {
			if v := s.Get(&b.Metrics); !math.IsNaN(v) {
				x = append(x, v)
			}
		}
		out[s.Key] = math.NaN()
		if len(x) > 0 {
			out[s.Key] = median(x)
		}
	}
	return out
}
