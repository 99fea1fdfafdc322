package analysis

import (
	"fmt"
	"math"
	"runtime"
	"slices"
	"strings"

	"pvcouple/model"
)

// Options say how to analyse a recording. The zero value is the default.
type Options struct {
	// SmoothWindow is the Savitzky–Golay window, s; 0 means the default, a
	// fraction of the recording's beat period (see newWindows). dP/dt always
	// comes from this filter.
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
	SourceSingleBeat = "single-beat" // Chen et al. 2001 (Ees only): an estimate
	SourceNone       = "none"        // unknown: V0 = 0 for finding end-systole (maximal P/V), PE not measured
	// SourceVolumeFloor: unknown, and volumes fall below 1 % of their
	// range above zero (an offset): V0 is taken below the smallest volume
	// for finding end-systole only; PE, PVA, efficiency and VO2 are not measured.
	SourceVolumeFloor = "volume-floor"
)

// Analysis is a recording measured beat by beat, with the relations fitted to it.
type Analysis struct {
	Recording *Recording
	// Options are those used, SmoothWindow filled in.
	Options Options
	// Period is the median beat period found before beat detection, s; the
	// windows of detection and smoothing scale with it.
	Period float64
	// Unit is the unit volumes are shown in (µL for a small heart).
	Unit  VolumeUnit
	Beats []*Beat // every beat and fragment, in time order, kept or dropped

	// Runs are the preload runs (occlusions and releases), in time order,
	// each with its own fits; none when the recording is steady.
	Runs []*Run
	// PreloadRun, ESPVR and EDPVR are those of the first run with an ESPVR
	// (else the first run; nil or empty without one).
	PreloadRun []*Beat
	ESPVR      *ESPVRFit
	EDPVR      *EDPVRFit
	// SteadySegments are the stretches at steady state, outside the runs;
	// Steady are their beats, in time order.
	SteadySegments [][]*Beat
	Steady         []*Beat
	SingleBeat     *SingleBeat // nil when no steady beat could be used
	Drift          *Drift      // nil when the steady beats are too few to judge

	// Known is what the beats were measured with (those of a recording with
	// several runs were each measured with the nearest run's fit); V0Source
	// and EesSource say where its V0 and Ees came from (Source… constants).
	Known     model.Known
	V0Source  string
	EesSource string

	NoiseP, NoiseV float64  // estimated SD of pressure (mmHg) and volume (mL) noise
	Notes          []string // what could not be done, and why
	Warnings       []string // what looks doubtful in the data (includes the recording's)

	sigs  []*signals
	sdEDV float64 // noise SD of one end-diastolic volume, mL
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

// EesIsEstimate reports whether Ees (and so every Ea/Ees) comes from a
// single-beat estimate rather than an occlusion run.
func (a *Analysis) EesIsEstimate() bool { return a.EesSource == SourceSingleBeat }

func (a *Analysis) notef(format string, x ...any) {
	a.Notes = append(a.Notes, fmt.Sprintf(format, x...))
}
func (a *Analysis) warnf(format string, x ...any) {
	a.Warnings = append(a.Warnings, fmt.Sprintf(format, x...))
}

// Analyze finds the beats of a recording, drops ectopic and incomplete ones
// with a reason, measures each with model.Measure, finds its preload runs
// and steady segments, fits each run (ESPVR, EDPVR, PRSW, dP/dt max–EDV,
// Emax(t)), and makes the single-beat estimates from the steady beats. An
// error means the recording cannot be analysed at all (no beats, or loops
// that run the wrong way); a smoothing window outside the recording's range
// is a *SmoothError.
func Analyze(r *Recording, o Options) (*Analysis, error) {
	switch o.ESPVR {
	case "":
		o.ESPVR = "linear"
	case "linear", "quadratic":
	default:
		return nil, fmt.Errorf("ESPVR method %q: allowed linear, quadratic", o.ESPVR)
	}
	period, err := beatPeriod(r)
	if err != nil {
		return nil, r.cellErr(1, r.Columns.Pressure, err.Error())
	}
	w, err := newWindows(period, r.Rate, o.SmoothWindow)
	if err != nil {
		return nil, err
	}
	o.SmoothWindow = w.smooth
	a := &Analysis{Recording: r, Options: o, Period: period, Unit: volumeUnitFor(r), Warnings: append([]string(nil), r.Warnings...)}
	if sp := r.Species; sp != nil {
		if hr := 60 / period; hr < sp.MinHR || hr > sp.MaxHR {
			a.warnf("heart rate about %.0f bpm is outside the usual %.0f–%.0f bpm of a %s (%s)", hr, sp.MinHR, sp.MaxHR, sp.Name, sp.Source)
		}
	}
	for _, s := range r.Segments {
		sig, err := newSignals(r, s, w, !o.Raw)
		if err != nil {
			a.notef("segment from %.3f s to %.3f s is too short to analyse", s.Start, s.Start+float64(s.To-s.From-1)*s.Step)
			continue
		}
		a.sigs = append(a.sigs, sig)
	}
	if len(a.sigs) == 0 {
		return nil, &InputError{File: r.Source, Line: 1, Col: 1, Msg: "no stretch of the recording is long enough to analyse"}
	}
	a.noise()
	thr := upstrokeThreshold(a.sigs)
	if !(thr > 0) {
		return nil, r.cellErr(1, r.Columns.Pressure, "pressure never rises steeply: no beats found; is it LV pressure?")
	}
	for k, sig := range a.sigs {
		atStart, atEnd := "incomplete: cut by a gap in the recording", "incomplete: cut by a gap in the recording"
		if k == 0 {
			atStart = "incomplete: the recording starts within this beat"
		}
		if k == len(a.sigs)-1 {
			atEnd = "incomplete: the recording ends within this beat"
		}
		a.Beats = append(a.Beats, findBeats(sig, w, thr, atStart, atEnd)...)
	}
	for i, b := range a.Beats {
		b.Index = i + 1
	}
	for _, s := range a.sigs {
		s.detect, s.v = nil, nil // only beat finding needs them
	}
	if r.Len() > largeRecording {
		runtime.GC() // they are a third of a long recording's memory
	}
	// First pass: V0 unknown; below the volumes when they carry an offset.
	a.Known = model.Unknown()
	a.V0Source, a.EesSource = SourceNone, SourceNone
	if lo, hi := r.vRange[0], r.vRange[1]; lo < 0.01*hi {
		a.Known.V0, a.V0Source = lo-0.1*(hi-lo), SourceVolumeFloor
	}
	a.measure(true, nil)
	if err := a.checkOrientation(); err != nil {
		return nil, err
	}
	for _, sig := range a.sigs {
		var seg []*Beat
		for _, b := range a.Beats {
			if b.seg == sig {
				seg = append(seg, b)
			}
		}
		classifyBeats(seg, sig.noiseVOut)
	}
	if len(a.Kept()) == 0 {
		return nil, a.noneKept()
	}
	a.fitRuns()
	// Measure again with what the fits know, each beat with its nearest
	// run's, so that V0 sets end-systole and Ees, PE and PVA are filled in.
	a.measure(false, a.nearestKnown())
	a.findSteady()
	a.checkQuality()
	return a, nil
}

// noneKept explains why no beat was kept.
func (a *Analysis) noneKept() error {
	count := map[string]int{}
	var order []string
	for _, b := range a.Beats {
		why, _, _ := strings.Cut(b.Dropped, ":")
		why, _, _ = strings.Cut(why, " (")
		if count[why] == 0 {
			order = append(order, why)
		}
		count[why]++
	}
	var parts []string
	for _, w := range order {
		parts = append(parts, fmt.Sprintf("%d %s", count[w], w))
	}
	return &InputError{File: a.Recording.Source, Line: 1, Col: 1, Msg: fmt.Sprintf("no beat could be kept among the %d found (%s); are these LV pressure and volume?",
		len(a.Beats), strings.Join(parts, ", "))}
}

// noise combines the segments' noise estimates.
func (a *Analysis) noise() {
	var sp, sv, so, n float64
	for _, s := range a.sigs {
		w := float64(s.n)
		sp += w * s.noiseP * s.noiseP
		sv += w * s.noiseV * s.noiseV
		so += w * s.noiseVOut * s.noiseVOut
		n += w
	}
	a.NoiseP, a.NoiseV, a.sdEDV = math.Sqrt(sp/n), math.Sqrt(sv/n), math.Sqrt(so/n)
}

// measure measures every complete beat: with a.Known, or with known(b) when
// known is not nil. The first pass also reads what does not depend on V0:
// ejection timing, extremes and loop closure.
func (a *Analysis) measure(first bool, known func(*Beat) model.Known) {
	var buf windowBuf
	for _, b := range a.Beats {
		if math.IsNaN(b.Upstroke) {
			continue
		}
		k := a.Known
		if known != nil {
			k = known(b)
		}
		f := b.seg.windowInto(&buf, b.from-b.seg.seg.From, b.to-b.seg.seg.From)
		if first {
			b.peakP = slices.Max(f.P)
			b.closeGap = math.Abs(f.V[len(f.V)-1] - f.V[0])
			b.Ejection = ejectionTiming(f, b.seg)
		}
		m, err := measureScaled(f.samples(), k, a.Unit.Scale)
		if err != nil {
			b.Measured, b.Metrics = false, nanMetrics()
			if b.Dropped == "" {
				b.Dropped = "not measurable: " + err.Error()
			}
			continue
		}
		if a.V0Source == SourceVolumeFloor && math.IsNaN(k.Ees) {
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
	r := a.Recording
	if n == 0 {
		return r.cellErr(2, "", fmt.Sprintf(
			"no complete beat found in %.3g s (need a pressure upstroke with end-diastole before it, twice); are the pressure (%q) and volume (%q) columns right?",
			r.Duration(), r.Columns.Pressure, r.Columns.Volume))
	}
	if 2*cw > n {
		return r.cellErr(2, "", fmt.Sprintf(
			"%d of %d loops run clockwise in the pressure–volume plane (LV loops run counter-clockwise): "+
				"the pressure (%q) and volume (%q) columns look swapped; name them with --pressure-col and --volume-col",
			cw, n, r.Columns.Pressure, r.Columns.Volume))
	}
	return nil
}

// nearestKnown gives each beat the Known of the fitted run nearest to it in
// beats (nil when fewer than two runs are fitted: all beats use a.Known).
func (a *Analysis) nearestKnown() func(*Beat) model.Known {
	var fitted []*Run
	for _, run := range a.Runs {
		if run.ESPVR != nil {
			fitted = append(fitted, run)
		}
	}
	if len(fitted) < 2 {
		return nil
	}
	return func(b *Beat) model.Known {
		best, dist := fitted[0], math.MaxInt
		for _, run := range fitted {
			d := max(run.First()-b.Index, b.Index-run.Last(), 0)
			if d < dist {
				best, dist = run, d
			}
		}
		return best.known(a.Known)
	}
}

// findSteady picks the steady segments and makes the single-beat estimates.
func (a *Analysis) findSteady() {
	var kept []*Beat
	for _, b := range a.Kept() {
		if b.Measured {
			kept = append(kept, b)
		}
	}
	a.SteadySegments = steadySegments(kept, a.sdEDV)
	a.Steady = nil
	for _, s := range a.SteadySegments {
		a.Steady = append(a.Steady, s...)
	}
	if len(a.Steady) == 0 {
		a.notef("no steady stretch of %d or more beats outside the preload runs: no single-beat estimates", minSteadyBeats)
		return
	}
	a.SingleBeat = singleBeat(a.Steady)
	if a.SingleBeat == nil {
		a.notef("no steady beat has a clear onset and end of ejection: no single-beat estimates")
		return
	}
	if c := a.SingleBeat.Chen; c != nil && a.ESPVR == nil {
		// Ees from one beat stands in for the ESPVR: Ea/Ees carries it.
		a.Known.Ees = c.Ees
		a.EesSource = SourceSingleBeat
		for _, b := range a.Beats {
			if b.Measured {
				b.Metrics.Ees = c.Ees
				b.Metrics.EaEes = b.Metrics.Ea / c.Ees
			}
		}
		a.notef("Ees is the single-beat estimate (Chen et al. 2001), not a measurement: Ea/Ees from it is an estimate too, and can be far off (docs/science.md §5); an occlusion run measures Ees")
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
