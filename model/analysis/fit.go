package analysis

import (
	"errors"
	"fmt"
	"math"
	"time"

	"gonum.org/v1/gonum/optimize"

	"pvcouple/model"
)

// FitKeys are the parameters FitModel fits, in model.Specs keys. The heart
// rate comes from the recording; the other parameters stay at FitOptions.Base.
var FitKeys = []string{
	"ees_mmhg_per_ml", "v0_ml", "edpvr_a_mmhg", "edpvr_b_per_ml",
	"resistance_mmhg_s_per_ml", "compliance_ml_per_mmhg", "zc_mmhg_s_per_ml", "filling_pressure_mmhg",
}

// FitOptions configure FitModel.
type FitOptions struct {
	// Base gives the parameters that are not fitted (venous pressure, wall
	// volume, valve resistances) and is the fallback start of the fitted ones.
	Base model.Params
	// MaxEvaluations caps the model solves of the search (default 4000);
	// MaxTime caps its wall time (default 4 s).
	MaxEvaluations int
	MaxTime        time.Duration
	// MinSteadyBeats is the fewest steady beats fitted to (default 3).
	MinSteadyBeats int
}

// FitParam is one fitted parameter and how well the recording determines it.
type FitParam struct {
	Key   string
	Value float64
	Start float64 // where the search started
	// Spread is the relative half-width of the range of values that fit
	// almost as well (see FitModel); +Inf when the recording does not
	// determine the parameter at all.
	Spread float64
	Note   string // "well determined", "fairly well determined", "poorly determined", "not determined"
}

// FitResult is the model fitted to a steady recording.
type FitResult struct {
	Params      model.Params // the fitted parameter set
	Fitted      []FitParam   // the fitted parameters in FitKeys order
	HeartRate   float64      // bpm, from the recording
	Beats       int          // steady beats averaged into the target loop
	RMSPressure float64      // root-mean-square pressure residual over the loop, mmHg
	RMSVolume   float64      // root-mean-square volume residual over the loop, mL
	Evaluations int          // model solves, including the determinacy estimate
	Elapsed     time.Duration
	Stopped     string        // why the search stopped: "converged" or the cap it hit
	Target      *Loop         // the recording's mean steady loop
	Model       *Loop         // the fitted model's loop on the same grid
	Metrics     model.Metrics // the fitted model's steady-beat measurements
	Warnings    []string      // doubts about the fit
}

// poorFit is the residual, mmHg or mL root-mean-square, above which the fit
// is reported as not reproducing the loop (several times the noise of a
// catheter recording; common practice, no source).
const poorFit = 3

// ErrNotSteady is returned by FitModel when a recording has too few steady beats.
var ErrNotSteady = errors.New("too few steady beats")

// Tolerated misfit for the determinacy of a parameter: the range of a
// parameter over which the best fit of the others keeps the loop within
// detTol (mmHg and mL, root-mean-square) of the best fit's residual.
const detTol = 0.5

// penalty is the cost of parameters the model refuses or cannot settle.
const penalty = 1e9

// FitModel fits the model to the steady beats of an analysed recording: the
// mean loop of the steady beats (aligned on peak dP/dt) is compared sample by
// sample with the model's steady loop, filtered the same way, and the mean of
// the squared pressure (mmHg) and volume (mL) differences is minimised by
// Nelder–Mead over FitKeys, in log space for the positive parameters and in
// steps of 20 mL for V0. Every model solve starts warm from the previous
// steady state. The search starts from the recording's own measures: the
// ESPVR if the recording has one (else Ees = ESP/ESV, V0 = 0), the EDPVR fit
// if any (else a curve with the slope of the Klotz et al. 2006 estimate at
// EDV), R from the mean pressure over the output (else from Ea·T, Sunagawa
// et al. 1983), C from the diastolic decay of
// pressure, filling pressure from EDP.
//
// Each parameter's determinacy comes from the curvature of the cost at the
// optimum (finite-difference Hessian H in the search coordinates): the
// half-width w = sqrt(2·ΔJ·(H⁻¹)ᵢᵢ) over which the others, re-fitted, keep
// the cost within ΔJ of its minimum, ΔJ = (r + detTol)² − r², r the best
// root-mean-square residual. Spread is exp(w) − 1 for the log-scaled
// parameters and 20·w/|V0| for V0.
func FitModel(a *Analysis, o FitOptions) (*FitResult, error) {
	start := time.Now()
	if o.MaxEvaluations == 0 {
		o.MaxEvaluations = 4000
	}
	if o.MaxTime == 0 {
		o.MaxTime = 4 * time.Second
	}
	if o.MinSteadyBeats == 0 {
		o.MinSteadyBeats = 3
	}
	steady := a.Steady
	if len(steady) < o.MinSteadyBeats {
		return nil, fmt.Errorf("%w: %d steady beats kept, the fit needs at least %d", ErrNotSteady, len(steady), o.MinSteadyBeats)
	}
	periods := make([]float64, len(steady))
	for i, b := range steady {
		periods[i] = b.End - b.Start
	}
	period := median(periods)
	hr := 60 / period
	hrSpec, _ := model.SpecByKey("heart_rate_bpm")
	if err := hrSpec.Check(hr); err != nil {
		return nil, fmt.Errorf("the recording's heart rate is outside the model's range: %w", err)
	}
	target, used, err := meanLoop(steady, period)
	if err != nil {
		return nil, err
	}
	window := a.Options.SmoothWindow
	looper, err := newModelLooper(period, 1/a.Recording.Rate, window, a.Options.Raw)
	if err != nil {
		return nil, err
	}

	// One loop is fitted by the ventricle and its load alone, in the held
	// circulation, whose filling pressure is a lever of the fit.
	base := o.Base
	base.Circulation, base.StressedVolume = model.Held, 0
	base.HeartRate = hr
	x0 := encode(fitStart(a, base))
	solver := model.NewSolver()
	var warm model.Warm
	evals := 0
	cost := func(x []float64) float64 {
		evals++
		p, ok := decode(x, base)
		if !ok {
			return penalty
		}
		st, err := solver.SteadyState(p, &warm)
		if err != nil {
			return penalty
		}
		warm = st.Warm
		l, err := looper.loop(st.Beat)
		if err != nil {
			return penalty
		}
		return misfit(l, target)
	}
	prob := optimize.Problem{Func: cost}
	settings := &optimize.Settings{
		FuncEvaluations: o.MaxEvaluations,
		Runtime:         o.MaxTime,
		Converger:       &optimize.FunctionConverge{Absolute: 1e-6, Relative: 1e-6, Iterations: 50},
	}
	x, stopped := x0, "converged"
	// Nelder–Mead, restarted once from its result with a fresh simplex (a
	// collapsed simplex can stall short of the minimum).
	for round := 0; round < 2; round++ {
		res, err := optimize.Minimize(prob, x, settings, &optimize.NelderMead{SimplexSize: 0.1})
		if res == nil {
			return nil, fmt.Errorf("fit failed: %w", err)
		}
		x = res.X
		if res.Status != optimize.FunctionConvergence {
			stopped = "stopped at the cap: " + res.Status.String()
			break
		}
		settings.FuncEvaluations = o.MaxEvaluations - evals
		settings.Runtime = o.MaxTime - time.Since(start)
		if settings.FuncEvaluations <= 10 || settings.Runtime <= 0 {
			break
		}
	}
	best := cost(x)
	if best >= penalty {
		return nil, errors.New("the model could not be fitted: no parameter set near the start settles")
	}
	p, _ := decode(x, base)
	st, err := solver.SteadyState(p, &warm)
	if err != nil {
		return nil, err
	}
	ml, _ := looper.loop(st.Beat)
	modelLoop := &Loop{Period: period, T: append([]float64(nil), ml.T...), P: append([]float64(nil), ml.P...), V: append([]float64(nil), ml.V...)}
	r := &FitResult{Params: p, HeartRate: hr, Beats: used, Stopped: stopped, Target: target, Model: modelLoop, Metrics: st.Metrics}
	r.RMSPressure, r.RMSVolume = rmsDiff(modelLoop.P, target.P), rmsDiff(modelLoop.V, target.V)
	if r.RMSPressure > poorFit || r.RMSVolume > poorFit {
		r.Warnings = append(r.Warnings, fmt.Sprintf("the model does not reproduce this loop well (residual %.2g mmHg, %.2g mL): "+
			"treat the fitted values as a rough match, not a measurement", r.RMSPressure, r.RMSVolume))
	}
	if stopped != "converged" {
		r.Warnings = append(r.Warnings, "the search "+stopped+"; the fit may not be the best")
	}
	starts, _ := decode(x0, base)
	r.Fitted = determinacy(cost, x, best, p, starts)
	r.Evaluations = evals
	r.Elapsed = time.Since(start)
	return r, nil
}

// misfit is half the mean of the squared pressure and volume differences.
func misfit(l, target *Loop) float64 {
	var s float64
	for m := range l.P {
		dp, dv := l.P[m]-target.P[m], l.V[m]-target.V[m]
		s += dp*dp + dv*dv
	}
	return s / float64(2*len(l.P))
}

// v0Scale is the step of V0 per unit of the search coordinate, mL.
const v0Scale = 20

// encode maps parameters to search coordinates.
func encode(p model.Params) []float64 {
	x := make([]float64, len(FitKeys))
	for i, k := range FitKeys {
		s, _ := model.SpecByKey(k)
		v := s.Get(p)
		if k == "v0_ml" {
			x[i] = v / v0Scale
		} else {
			x[i] = math.Log(v)
		}
	}
	return x
}

// decode maps search coordinates to parameters; ok is false when a value is
// outside its range or the set fails validation.
func decode(x []float64, base model.Params) (model.Params, bool) {
	p := base
	for i, k := range FitKeys {
		s, _ := model.SpecByKey(k)
		v := math.Exp(x[i])
		if k == "v0_ml" {
			v = x[i] * v0Scale
		}
		if s.Check(v) != nil {
			return p, false
		}
		s.Set(&p, v)
	}
	return p, p.Validate() == nil
}

// fitStart is the start of the search, from the recording's own measures,
// each clamped inside its parameter's range.
func fitStart(a *Analysis, base model.Params) model.Params {
	p := base
	st := a.Steady
	med := func(get func(m *model.Metrics) float64) float64 {
		x := make([]float64, len(st))
		for i, b := range st {
			x[i] = get(&b.Metrics)
		}
		return median(x)
	}
	edv := med(func(m *model.Metrics) float64 { return m.EDV })
	edp := med(func(m *model.Metrics) float64 { return m.EDP })
	esv := med(func(m *model.Metrics) float64 { return m.ESV })
	esp := med(func(m *model.Metrics) float64 { return m.ESP })
	sv := med(func(m *model.Metrics) float64 { return m.SV })
	tes := med(func(m *model.Metrics) float64 { return m.TES })
	period := 60 / p.HeartRate

	p.FillingPressure = edp
	p.V0, p.Ees = 0, esp/esv
	if e := a.ESPVR; e != nil {
		p.V0, p.Ees = e.V0, e.Ees
	}
	p.EdpvrB = 0.03
	if sb := a.SingleBeat; sb != nil && sb.Klotz != nil {
		// Match the slope of the Klotz curve at EDV: dP/dV = β·EDP/EDV ≈ B·(EDP + A).
		p.EdpvrB = sb.Klotz.Beta / edv
	}
	p.EdpvrB = clampSpec("edpvr_b_per_ml", p.EdpvrB)
	p.V0 = clampSpec("v0_ml", p.V0)
	p.EdpvrA = edp / math.Expm1(p.EdpvrB*math.Max(edv-p.V0, 10))
	if e := a.EDPVR; e != nil {
		p.EdpvrA, p.EdpvrB = e.A, e.B
	}
	ea := esp / sv
	p.Resistance = ea*period - p.Zc
	if sb := a.SingleBeat; sb != nil && sb.Pd > 0 && sb.Pd < esp {
		// Mean arterial pressure ≈ DBP + (SBP − DBP)/3 (common practice, from
		// memory) over the output gives the total resistance.
		mean := sb.Pd + (sb.Ps-sb.Pd)/3
		if r := (mean - p.VenousPressure) / (sv / period); r > p.Zc {
			p.Resistance = r - p.Zc
		}
		// Arterial pressure decays from ESP at aortic closure (≈ end-systole)
		// to the diastolic pressure at the next opening: τ = R·C = t_d / ln(Pes/Pd).
		td := period - tes + sb.TOpen
		p.Compliance = td / math.Log(esp/sb.Pd) / (p.Resistance + p.Zc)
	}
	for _, k := range FitKeys {
		s, _ := model.SpecByKey(k)
		s.Set(&p, clampSpec(k, s.Get(p)))
	}
	if p.Validate() != nil {
		// Fall back to the base values of the EDPVR and filling pressure.
		p.EdpvrA, p.EdpvrB, p.FillingPressure, p.V0 = base.EdpvrA, base.EdpvrB, base.FillingPressure, base.V0
	}
	return p
}

// clampSpec keeps v inside its parameter's range, 1 % in from the ends
// (and positive, for the log-scaled ones).
func clampSpec(key string, v float64) float64 {
	s, _ := model.SpecByKey(key)
	lo, hi := s.Min, s.Max
	margin := 0.01 * (hi - lo)
	lo, hi = lo+margin, hi-margin
	if math.IsNaN(v) {
		return 0.5 * (lo + hi)
	}
	return math.Max(lo, math.Min(hi, v))
}
