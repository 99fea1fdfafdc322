package ode

import (
	"errors"
	"fmt"
	"math"
)

// Func evaluates the right-hand side dydt = f(t, y). It must not retain y or dydt.
type Func func(t float64, y, dydt []float64)

// Event is a zero crossing of G(t, y) at which integration stops.
type Event struct {
	// G is continuous in t along the solution.
	G func(t float64, y []float64) float64
	// Direction selects the crossings that count: +1 for G rising through zero
	// (from non-positive to positive), -1 for falling (from non-negative to
	// negative), 0 for both.
	Direction int
}

// Options controls accuracy and effort. The zero value selects the defaults.
type Options struct {
	// RTol and ATol bound the local error of each component i by
	// ATol + RTol·max(|y_i(t)|, |y_i(t+h)|). Defaults 1e-6 and 1e-9.
	RTol, ATol float64
	// InitialStep is the first step size; 0 selects one automatically.
	InitialStep float64
	// MaxStep caps the step size; 0 means no cap.
	MaxStep float64
	// MaxSteps caps accepted plus rejected steps in one call of Solve; default 100000.
	MaxSteps int
	// FixedStep, when positive, turns error control off and takes steps of this
	// size (the last one shortened to land on the end point). Meant for
	// convergence studies.
	FixedStep float64
}

// Stats counts the work done by a Solver since it was made or last reset.
type Stats struct {
	Steps    int // accepted steps
	Rejected int // rejected steps
	Evals    int // evaluations of f
}

// Result reports how a call of Solve ended.
type Result struct {
	// T is where integration stopped: the end point or the event time.
	T float64
	// Event is the index of the event that stopped integration, or -1.
	Event int
	// LastStep is the size of the last accepted step (or the step proposed
	// after it), a good InitialStep when integration is resumed.
	LastStep float64
}

// ErrStepSize is returned when the step size underflows or the solution stops being finite.
var ErrStepSize = errors.New("ode: step size underflow (solution not finite or too stiff)")

// Solver integrates one system with the Dormand–Prince 5(4) pair. It is not
// safe for concurrent use; make one per goroutine.
type Solver struct {
	n     int
	f     Func
	opt   Options
	k     [7][]float64
	y1    []float64
	ytmp  []float64
	gPrev []float64
	step  Step
	stats Stats
}

// NewSolver returns a solver for n-dimensional systems y' = f(t, y).
func NewSolver(n int, f Func, opt Options) *Solver {
	if n <= 0 {
		panic("ode: dimension must be positive")
	}
	if opt.RTol <= 0 {
		opt.RTol = 1e-6
	}
	if opt.ATol <= 0 {
		opt.ATol = 1e-9
	}
	if opt.MaxSteps <= 0 {
		opt.MaxSteps = 100000
	}
	s := &Solver{n: n, f: f, opt: opt}
	for i := range s.k {
		s.k[i] = make([]float64, n)
	}
	s.y1 = make([]float64, n)
	s.ytmp = make([]float64, n)
	for i := range s.step.r {
		s.step.r[i] = make([]float64, n)
	}
	return s
}

// SetInitialStep sets the size of the first step of the next calls of Solve;
// 0 lets the solver choose. Resuming after an event with Result.LastStep saves
// the work of choosing again.
func (s *Solver) SetInitialStep(h float64) { s.opt.InitialStep = h }

// SetTolerances sets the relative and absolute tolerances of the next calls
// of Solve.
func (s *Solver) SetTolerances(rtol, atol float64) { s.opt.RTol, s.opt.ATol = rtol, atol }

// SetMaxStep caps the step size of the next calls of Solve; 0 removes the cap.
// A cap keeps the solver from stepping over a pair of event crossings in
// stretches where the solution is smooth but an event function is not idle.
func (s *Solver) SetMaxStep(h float64) { s.opt.MaxStep = h }

// Stats returns the work counters.
func (s *Solver) Stats() Stats { return s.stats }

// ResetStats sets the work counters to zero.
func (s *Solver) ResetStats() { s.stats = Stats{} }

// Solve integrates from t0 to t1 > t0, starting from y (overwritten with the
// solution at the stopping time). It stops at t1 or at the first event crossing,
// whichever comes first. obs, if not nil, is called after every accepted step
// with that step's dense output; a step cut short by an event ends at the event.
func (s *Solver) Solve(t0, t1 float64, y []float64, events []Event, obs func(*Step)) (Result, error) {
	if len(y) != s.n {
		panic(fmt.Sprintf("ode: state has %d components, solver was made for %d", len(y), s.n))
	}
	res := Result{T: t0, Event: -1}
	if !(t1 > t0) {
		return res, fmt.Errorf("ode: end time %g is not after start time %g", t1, t0)
	}
	k1, k7 := s.k[0], s.k[6]
	s.f(t0, y, k1)
	s.stats.Evals++
	for i := range k1 {
		if math.IsNaN(k1[i]) || math.IsInf(k1[i], 0) {
			return res, fmt.Errorf("%w: derivative of component %d is %g at t=%g", ErrStepSize, i, k1[i], t0)
		}
	}
	if cap(s.gPrev) < len(events) {
		s.gPrev = make([]float64, len(events))
	}
	gPrev := s.gPrev[:len(events)]
	for i, ev := range events {
		gPrev[i] = ev.G(t0, y)
	}

	fixed := s.opt.FixedStep > 0
	hmax := s.opt.MaxStep
	if hmax <= 0 || hmax > t1-t0 {
		hmax = t1 - t0
	}
	var h float64
	switch {
	case fixed:
		h = s.opt.FixedStep
	case s.opt.InitialStep > 0:
		h = math.Min(s.opt.InitialStep, hmax)
	default:
		h = s.initialStep(t0, y, hmax)
	}

	const (
		safe  = 0.9
		beta  = 0.04
		expo1 = 0.2 - 0.75*beta
		facc1 = 5.0 // 1/fac1, fac1 = 0.2: largest decrease per step
		facc2 = 0.1 // 1/fac2, fac2 = 10: largest increase per step
	)
	logFacOld := math.Log(1e-4)
	rejectedLast := false
	t := t0
	for n := 0; ; n++ {
		if n >= s.opt.MaxSteps {
			return res, fmt.Errorf("ode: more than %d steps between t=%g and t=%g", s.opt.MaxSteps, t0, t1)
		}
		if t1-t <= 16*eps*math.Abs(t1) {
			// What is left is below the resolution of t: we are there.
			res.T = t1
			return res, nil
		}
		if !(h >= 16*eps*math.Abs(t)) || h < 1e-300 {
			return res, fmt.Errorf("%w at t=%g", ErrStepSize, t)
		}
		last := false
		if t+h >= t1-1e-12*math.Abs(t1) {
			h = t1 - t
			last = true
		}
		s.stages(t, h, y)
		var errNorm float64
		if !fixed {
			errNorm = s.errorNorm(h, y)
		}
		if !fixed && !(errNorm <= 1) {
			// Rejected, or not finite: shrink and retry.
			s.stats.Rejected++
			if math.IsNaN(errNorm) || math.IsInf(errNorm, 0) {
				h *= 0.1
			} else {
				h /= math.Min(facc1, math.Pow(errNorm, expo1)/safe)
			}
			rejectedLast = true
			continue
		}
		s.stats.Steps++
		s.denseCoefficients(t, h, y)

		// Events: the earliest crossing in (t, t+h].
		evIdx, tEv := -1, 0.0
		for i, ev := range events {
			g1 := ev.G(t+h, s.y1)
			if crossed(gPrev[i], g1, ev.Direction) {
				te := s.locate(ev, t, t+h, gPrev[i], g1)
				if evIdx < 0 || te < tEv {
					evIdx, tEv = i, te
				}
			}
			gPrev[i] = g1
		}
		if evIdx >= 0 {
			s.step.t1 = tEv
			s.step.Interpolate(tEv, y)
			if obs != nil {
				obs(&s.step)
			}
			res.T, res.Event, res.LastStep = tEv, evIdx, h
			return res, nil
		}
		if obs != nil {
			obs(&s.step)
		}
		copy(y, s.y1)
		k1, k7 = k7, k1
		s.k[0], s.k[6] = k1, k7
		t += h
		if last {
			res.T, res.LastStep = t1, h
			return res, nil
		}
		if fixed {
			h = s.opt.FixedStep
			continue
		}
		// PI step size control (Hairer's DOPRI5), with powers as exp∘log.
		logErr := math.Log(math.Max(errNorm, 1e-300))
		fac11 := math.Exp(expo1 * logErr)
		fac := fac11 / math.Exp(beta*logFacOld)
		fac = math.Max(facc2, math.Min(facc1, fac/safe))
		hNew := math.Min(h/fac, hmax)
		if rejectedLast {
			hNew = math.Min(hNew, h)
		}
		logFacOld = math.Max(logErr, math.Log(1e-4))
		rejectedLast = false
		res.LastStep = hNew
		h = hNew
	}
}

const eps = 2.220446049250313e-16

// crossed reports whether g went through zero from g0 to g1 in the given
// direction. A zero at the start counts: a crossing that begins exactly on
// the surface (as when a hybrid system resumes on it) must not be missed.
func crossed(g0, g1 float64, dir int) bool {
	rising := g0 <= 0 && g1 > 0
	falling := g0 >= 0 && g1 < 0
	switch {
	case dir > 0:
		return rising
	case dir < 0:
		return falling
	default:
		return rising || falling
	}
}

// stages computes k2…k7 and the fifth-order solution s.y1 for a step of size h from (t, y).
func (s *Solver) stages(t, h float64, y []float64) {
	k1, k2, k3, k4, k5, k6, k7 := s.k[0], s.k[1], s.k[2], s.k[3], s.k[4], s.k[5], s.k[6]
	yt := s.ytmp
	for i := range y {
		yt[i] = y[i] + h*a21*k1[i]
	}
	s.f(t+c2*h, yt, k2)
	for i := range y {
		yt[i] = y[i] + h*(a31*k1[i]+a32*k2[i])
	}
	s.f(t+c3*h, yt, k3)
	for i := range y {
		yt[i] = y[i] + h*(a41*k1[i]+a42*k2[i]+a43*k3[i])
	}
	s.f(t+c4*h, yt, k4)
	for i := range y {
		yt[i] = y[i] + h*(a51*k1[i]+a52*k2[i]+a53*k3[i]+a54*k4[i])
	}
	s.f(t+c5*h, yt, k5)
	for i := range y {
		yt[i] = y[i] + h*(a61*k1[i]+a62*k2[i]+a63*k3[i]+a64*k4[i]+a65*k5[i])
	}
	s.f(t+h, yt, k6)
	for i := range y {
		s.y1[i] = y[i] + h*(a71*k1[i]+a73*k3[i]+a74*k4[i]+a75*k5[i]+a76*k6[i])
	}
	s.f(t+h, s.y1, k7)
	s.stats.Evals += 6
}

// errorNorm is the RMS of the local error estimate scaled by the tolerances.
func (s *Solver) errorNorm(h float64, y []float64) float64 {
	k1, k3, k4, k5, k6, k7 := s.k[0], s.k[2], s.k[3], s.k[4], s.k[5], s.k[6]
	var sum float64
	for i := range y {
		e := h * (e1*k1[i] + e3*k3[i] + e4*k4[i] + e5*k5[i] + e6*k6[i] + e7*k7[i])
		sk := s.opt.ATol + s.opt.RTol*math.Max(math.Abs(y[i]), math.Abs(s.y1[i]))
		sum += (e / sk) * (e / sk)
	}
	return math.Sqrt(sum / float64(len(y)))
}

// denseCoefficients fills s.step with the continuous extension of the step (DOPRI5's CONTD5).
func (s *Solver) denseCoefficients(t, h float64, y []float64) {
	k1, k3, k4, k5, k6, k7 := s.k[0], s.k[2], s.k[3], s.k[4], s.k[5], s.k[6]
	r := &s.step.r
	for i := range y {
		ydiff := s.y1[i] - y[i]
		bspl := h*k1[i] - ydiff
		r[0][i] = y[i]
		r[1][i] = ydiff
		r[2][i] = bspl
		r[3][i] = ydiff - h*k7[i] - bspl
		r[4][i] = h * (d1*k1[i] + d3*k3[i] + d4*k4[i] + d5*k5[i] + d6*k6[i] + d7*k7[i])
	}
	s.step.t0, s.step.h, s.step.t1 = t, h, t+h
}

// locate finds the crossing of ev.G in (a, b] on the dense output by the
// Illinois variant of regula falsi. It returns a time just past the crossing,
// where G has the strict sign it has after the crossing.
func (s *Solver) locate(ev Event, a, b, ga, gb float64) float64 {
	tol := 1e-13 + 4*eps*math.Abs(b)
	side := 0
	for iter := 0; iter < 100 && b-a > tol; iter++ {
		c := (a*gb - b*ga) / (gb - ga)
		if !(c > a && c < b) {
			c = 0.5 * (a + b)
		}
		s.step.Interpolate(c, s.ytmp)
		gc := ev.G(c, s.ytmp)
		if gc != 0 && (gc > 0) == (gb > 0) {
			b, gb = c, gc
			if side == -1 {
				ga /= 2
			}
			side = -1
		} else {
			a, ga = c, gc
			if side == 1 {
				gb /= 2
			}
			side = 1
		}
	}
	return b
}

// initialStep guesses a first step size (Hairer, Nørsett & Wanner 1993, §II.4).
func (s *Solver) initialStep(t0 float64, y []float64, hmax float64) float64 {
	f0, f1, y1 := s.k[0], s.k[1], s.ytmp
	var d0, d1 float64
	for i := range y {
		sk := s.opt.ATol + s.opt.RTol*math.Abs(y[i])
		d0 += (y[i] / sk) * (y[i] / sk)
		d1 += (f0[i] / sk) * (f0[i] / sk)
	}
	n := float64(len(y))
	d0, d1 = math.Sqrt(d0/n), math.Sqrt(d1/n)
	h0 := 1e-6
	if d0 >= 1e-5 && d1 >= 1e-5 {
		h0 = 0.01 * d0 / d1
	}
	h0 = math.Min(h0, hmax)
	for i := range y {
		y1[i] = y[i] + h0*f0[i]
	}
	s.f(t0+h0, y1, f1)
	s.stats.Evals++
	var d2 float64
	for i := range y {
		sk := s.opt.ATol + s.opt.RTol*math.Abs(y[i])
		d := (f1[i] - f0[i]) / sk
		d2 += d * d
	}
	d2 = math.Sqrt(d2/n) / h0
	var h1 float64
	if m := math.Max(d1, d2); m <= 1e-15 {
		h1 = math.Max(1e-6, h0*1e-3)
	} else {
		h1 = math.Pow(0.01/m, 1.0/5)
	}
	return math.Min(math.Min(100*h0, h1), hmax)
}
