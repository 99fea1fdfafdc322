package model

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// SteadyTol is the beat-map residual below which a beat counts as periodic:
// max over the state of |F(x) − x| / max(|x|, 10).
const SteadyTol = 1e-6

// MaxSteadyBeats caps the beats integrated while looking for a steady state.
const MaxSteadyBeats = 60

// maxUnknowns is the most unknowns of a steady-state search: the closed
// circulation's compartment volumes but one (their sum is fixed) and the
// stressed volume.
const maxUnknowns = int(NumCompartments)

// closedUnknowns are the compartments whose start volumes the closed search
// solves for; the systemic veins take the rest of the blood volume.
var closedUnknowns = [...]Compartment{LeftVentricle, SystemicArteries, RightAtrium, RightVentricle,
	PulmonaryArteries, PulmonaryVeins, LeftAtrium}

// Warm carries a steady state forward, so that solving for nearby parameters
// starts from it (and from its Jacobian of the beat map). The zero value
// means a cold start.
type Warm struct {
	State  State
	volume float64                            // stressed volume of State (closed)
	jac    [maxUnknowns * maxUnknowns]float64 // row-major, of the residual w.r.t. the unknowns
	// hasJac marks jac as valid for the state unknowns; hasVolume also for
	// the stressed volume's column (closed).
	hasJac, hasVolume bool
	ok                bool

	// The parameters solved, and how the unknowns moved per unit of the one
	// lever changed on the way there (sensKey, "" when none): a nudge of the
	// same lever starts from where that slope predicts.
	params  Params
	sensKey string
	sens    [maxUnknowns]float64
}

// Valid reports whether w holds a state to start from.
func (w *Warm) Valid() bool { return w != nil && w.ok }

// Steady is a periodic steady state.
type Steady struct {
	*Beat
	Beats    int     // beats integrated to find it, including the final one
	Residual float64 // beat-map residual of the returned beat
	Warm     Warm    // start point for the next, nearby solve
}

// errBeatCap stops the search when MaxSteadyBeats have been integrated.
var errBeatCap = errors.New("beat cap reached")

// NotSettledError is returned when no periodic steady state was found within
// MaxSteadyBeats.
type NotSettledError struct {
	Beats       int
	Residual    float64
	Cause       error // the failure that stopped the search, if any
	Circulation Circulation
}

func (e *NotSettledError) Error() string {
	msg := fmt.Sprintf("no periodic steady state in the %s circulation after %d beats (beat-map residual %.2g, need below %g)",
		e.Circulation, e.Beats, e.Residual, SteadyTol)
	if e.Cause != nil && !errors.Is(e.Cause, errBeatCap) {
		msg += ": " + e.Cause.Error()
	}
	if e.Circulation == Closed {
		return msg + "; the parameters may be outside the region where this circulation settles: very stiff chambers " +
			"(edpvr_b_per_ml, rv_edpvr_b_per_ml, atrial_emin_mmhg_per_ml) or volumes far from their unstressed ones " +
			"(stressed_volume_ml) make its equations too stiff or its beat irregular"
	}
	return msg + "; the parameters may be outside the region where this heart settles"
}

func (e *NotSettledError) Unwrap() error { return e.Cause }

// SteadyState finds the periodic steady state of p: the start-of-beat state x
// with F(x) = x, where F integrates one beat. In a closed circulation the
// stressed volume is p's and fixes the sum of the volumes, so the unknowns are
// all volumes but the systemic veins'. Plain repetition of beats converges
// only at the rate of the slowest compartment (the veins and arteries drain
// over seconds); instead Newton's method is applied to G(x) = F(x) − x, with a
// finite-difference Jacobian on a cold start and Broyden updates after each
// beat. A warm start reuses the state and Jacobian of a previous nearby solve
// and usually settles in two or three beats.
func (s *Solver) SteadyState(p Params, warm *Warm) (*Steady, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	return s.shoot(p, warm, false)
}

// SteadyStateAtFillingPressure finds the steady state whose mean left-atrial
// pressure is p.FillingPressure. Held, that is SteadyState. Closed, the
// stressed volume is an unknown too, solved with the state so that the mean
// LAP over the beat equals the filling pressure, as a fluid challenge gives or
// removes volume until the wedge pressure reads a target; the returned beat's
// Params carry the volume found.
func (s *Solver) SteadyStateAtFillingPressure(p Params, warm *Warm) (*Steady, error) {
	if p.Circulation != Closed {
		return s.SteadyState(p, warm)
	}
	if !(p.StressedVolume > 0) {
		_, p.StressedVolume = p.coldClosedAt(p.FillingPressure)
	}
	if spec, _ := SpecByKey("stressed_volume_ml"); p.StressedVolume < spec.Min || p.StressedVolume > spec.Max {
		p.StressedVolume = math.Min(math.Max(p.StressedVolume, spec.Min), spec.Max)
	}
	if err := p.Validate(); err != nil {
		return nil, err
	}
	st, err := s.shoot(p, warm, true)
	if err != nil {
		return nil, err
	}
	if spec, _ := SpecByKey("stressed_volume_ml"); spec.Check(st.Params.StressedVolume) != nil {
		return nil, &ParamError{"filling_pressure_mmhg", p.FillingPressure, fmt.Sprintf(
			"a mean left-atrial pressure of %g mmHg needs a stressed volume of %.0f mL, outside %s: choose a filling pressure this circulation can reach",
			p.FillingPressure, st.Params.StressedVolume, spec.RangeText())}
	}
	return st, nil
}

// CalibrateVolume returns p with the stressed volume that gives a mean
// left-atrial pressure equal to p.FillingPressure in the closed circulation,
// and the steady state it gives. Held parameters are returned as they are.
func CalibrateVolume(p Params) (Params, *Steady, error) {
	st, err := NewSolver().SteadyStateAtFillingPressure(p, nil)
	if err != nil {
		return p, nil, err
	}
	return st.Params, st, nil
}

// shooter is one steady-state search: its unknowns, residuals and the beats
// it has integrated.
type shooter struct {
	s      *Solver
	p      *Params
	closed bool
	m      int // state unknowns
	k      int // all unknowns: m, and the stressed volume when closed
	solveK int // unknowns solved for: m, or k when calibrating
	beats  int
	unstr  float64 // sum of the unstressed volumes, mL
	rtol   float64 // the integrator's relative tolerance for the beats now
}

// Integration tolerances of a search. Far from the fixed point a beat need
// not be accurate, only well below the residual it is to reduce: while the
// residual is above looseBelow the beats are integrated at looseTol, then at
// relTol, and a search ends only on a beat at relTol. The beat map's noise
// from a loose tolerance is about that tolerance, so the Jacobian's
// differences are taken over a step of √rtol instead of 1e-4.
const (
	looseTol   = 1e-5
	warmTol    = 1e-6
	looseBelow = 0.05
)

// setTol sets the integrator's tolerance for the next beats to rtol, kept
// between relTol and looseTol.
func (sh *shooter) setTol(rtol float64) {
	rtol = math.Min(math.Max(rtol, relTol), looseTol)
	if rtol != sh.rtol {
		sh.rtol = rtol
		sh.s.ode.SetTolerances(rtol, absTol*rtol/relTol)
	}
}

// state builds the start-of-beat state from the unknowns z.
func (sh *shooter) state(z []float64) State {
	var x State
	if !sh.closed {
		x.V[LeftVentricle], x.V[SystemicArteries] = z[0], z[1]
		return x
	}
	rest := z[sh.m] + sh.unstr
	for i, c := range closedUnknowns {
		x.V[c] = z[i]
		rest -= z[i]
	}
	x.V[SystemicVeins] = rest
	return x
}

// unknowns writes the unknowns of state x (and stressed volume sv) into z.
func (sh *shooter) unknowns(x State, sv float64, z []float64) {
	if !sh.closed {
		z[0], z[1] = x.V[LeftVentricle], x.V[SystemicArteries]
		return
	}
	for i, c := range closedUnknowns {
		z[i] = x.V[c]
	}
	z[sh.m] = sv
}

// eval integrates one beat from z and writes the residuals into r: the change
// of each state unknown over the beat and, closed, the mean LAP less the
// filling pressure. It returns the beat's end state.
func (sh *shooter) eval(z, r []float64) (State, error) {
	if sh.beats >= MaxSteadyBeats {
		return State{}, errBeatCap
	}
	sh.beats += sh.s.cycleBeats()
	x := sh.state(z)
	end, lap, err := sh.s.cycle(x)
	if err != nil {
		return end, err
	}
	if !sh.closed {
		r[0], r[1] = end.V[LeftVentricle]-z[0], end.V[SystemicArteries]-z[1]
		return end, nil
	}
	for i, c := range closedUnknowns {
		r[i] = end.V[c] - z[i]
	}
	r[sh.m] = lap - sh.p.FillingPressure
	return end, nil
}

// norm is the relative size of the residual r at z over the unknowns solved.
func (sh *shooter) norm(r, z []float64) float64 {
	var worst float64
	for i := 0; i < sh.solveK; i++ {
		scale := math.Max(math.Abs(z[i]), 10)
		if i == sh.m {
			scale = math.Max(math.Abs(sh.p.FillingPressure), 10)
		}
		a := math.Abs(r[i]) / scale
		if math.IsNaN(a) {
			return math.Inf(1)
		}
		worst = math.Max(worst, a)
	}
	return worst
}

// shoot runs the Newton–Broyden search; calibrate adds the stressed volume to
// the unknowns and the mean-LAP condition to the equations.
func (s *Solver) shoot(p Params, warm *Warm, calibrate bool) (*Steady, error) {
	s.setParams(p)
	sh := &shooter{s: s, p: &s.p, closed: s.c.closed, m: heldDim, k: heldDim}
	if sh.closed {
		sh.m, sh.k = len(closedUnknowns), len(closedUnknowns)+1
		for _, u := range p.unstressed() {
			sh.unstr += u
		}
	}
	sh.solveK = sh.m
	if calibrate {
		sh.solveK = sh.k
	}
	defer s.ode.SetTolerances(relTol, absTol)
	k := sh.k
	z := make([]float64, 5*k)
	z, r, zn, rn, dz := z[:k], z[k:2*k], z[2*k:3*k], z[3*k:4*k], z[4*k:]
	var jac [maxUnknowns * maxUnknowns]float64
	haveJac, haveVol := false, false
	var z0 []float64 // the warm start's unknowns
	changedKey, changedBy := "", 0.0
	predicted := false
	warmStart := warm.Valid() && warm.params.Circulation == p.Circulation
	if warmStart {
		sv := p.StressedVolume
		if calibrate && warm.volume > 0 {
			sv = warm.volume // the volume is an unknown: start from the last one found
		}
		sh.unknowns(warm.State, sv, z)
		jac, haveJac, haveVol = warm.jac, warm.hasJac, warm.hasVolume
		z0 = append(z0[:0], z...)
		if key, d, ok := oneChange(warm.params, p); ok {
			changedKey, changedBy = key, d
			if key == warm.sensKey {
				for i := range z {
					z[i] += warm.sens[i] * d
				}
				predicted = true
			}
		}
	} else {
		sh.unknowns(p.coldGuess(), p.StressedVolume, z)
	}
	// A cold start is far from the fixed point; a warm one near it, where the
	// first Newton step is only as good as the beat it is taken from; a
	// predicted one usually on it, where its first beat may be the last.
	switch {
	case predicted:
		sh.setTol(relTol)
	case warmStart:
		sh.setTol(warmTol)
	default:
		sh.setTol(looseTol)
	}
	end, err := sh.eval(z, r)
	if err != nil {
		// A warm state far from the new parameters can fail; fall back to cold.
		sh.unknowns(p.coldGuess(), p.StressedVolume, z)
		haveJac, haveVol, changedKey = false, false, ""
		if end, err = sh.eval(z, r); err != nil {
			return nil, &NotSettledError{Circulation: p.Circulation, Beats: sh.beats, Residual: math.Inf(1), Cause: err}
		}
	}
	res := sh.norm(r, z)
	for res >= SteadyTol || sh.rtol > relTol {
		if sh.beats >= MaxSteadyBeats {
			return nil, &NotSettledError{Circulation: p.Circulation, Beats: sh.beats, Residual: res}
		}
		if res < SteadyTol {
			// Converged on beats integrated loosely: check on an accurate one.
			sh.setTol(relTol)
			if end, err = sh.eval(z, r); err != nil {
				return nil, &NotSettledError{Circulation: p.Circulation, Beats: sh.beats, Residual: res, Cause: err}
			}
			res = sh.norm(r, z)
			continue
		}
		if !haveJac || calibrate && !haveVol {
			cols := sh.solveK
			first := 0
			if haveJac {
				first = sh.m // only the stressed volume's column is missing
			}
			if err := sh.jacobian(z, r, jac[:], first, cols); err != nil {
				return nil, &NotSettledError{Circulation: p.Circulation, Beats: sh.beats, Residual: res, Cause: err}
			}
			haveJac, haveVol = true, haveVol || cols == sh.k
		}
		sh.setTol(relTol)
		if res > looseBelow {
			sh.setTol(looseTol)
		}
		ok, deficient := newtonStep(jac[:], k, sh.solveK, r, dz)
		if !ok {
			// A singular Jacobian (a ventricle that neither fills nor ejects
			// from here keeps its volume whatever it starts with): take one
			// plain beat instead and build the Jacobian again where it lands.
			for i := range dz {
				dz[i] = 0
			}
			copy(dz[:sh.m], r[:sh.m])
			haveJac, haveVol = false, false
		}
		sh.limitStep(dz, z)
		// Damped step: halve until the residual does not grow much.
		var endn State
		var resn float64
		accepted := false
		for lambda := 1.0; lambda > 1.0/64 && sh.beats < MaxSteadyBeats; lambda /= 2 {
			for i := range z {
				zn[i] = z[i] + lambda*dz[i]
			}
			if endn, err = sh.eval(zn, rn); err != nil {
				continue
			}
			resn = sh.norm(rn, zn)
			if resn < 2*res || resn < SteadyTol {
				accepted = true
				break
			}
		}
		if !accepted {
			if err == nil && sh.beats < MaxSteadyBeats {
				// The Jacobian misled us: rebuild it where we stand and retry.
				// The last evaluation was not of z, so redo it too.
				if end, err = sh.eval(z, r); err == nil {
					haveJac, haveVol = false, false
					continue
				}
			}
			return nil, &NotSettledError{Circulation: p.Circulation, Beats: sh.beats, Residual: res, Cause: err}
		}
		for i := range dz {
			dz[i] = zn[i] - z[i]
		}
		for i := range rn {
			r[i] = rn[i] - r[i] // the change of the residual, for Broyden
		}
		broyden(jac[:], k, dz, r)
		if deficient {
			haveJac, haveVol = false, false
		}
		copy(z, zn)
		copy(r, rn)
		end, res = endn, resn
	}
	// The last integrated beat started from z and is periodic within SteadyTol.
	start := sh.state(z)
	if sh.closed {
		s.p.StressedVolume = z[sh.m]
	}
	lap := s.p.FillingPressure
	if sh.closed {
		lap = r[sh.m] + s.p.FillingPressure
	}
	b, err := s.sample(s.cycleStart, end, lap)
	if err != nil {
		return nil, err
	}
	w := Warm{State: start, volume: s.p.StressedVolume, jac: jac, hasJac: haveJac, hasVolume: haveVol, ok: true, params: p}
	if changedKey != "" { // z0 is then the warm start's, of z's length
		w.sensKey = changedKey
		for i := range z {
			w.sens[i] = (z[i] - z0[i]) / changedBy
		}
	} else if warmStart && changedKey == "" {
		w.sensKey, w.sens = warm.sensKey, warm.sens
	}
	return &Steady{Beat: b, Beats: sh.beats, Residual: res, Warm: w}, nil
}

// oneChange reports the key and the change of the one parameter that
// differs between a and b, if exactly one does and both are of one
// circulation.
func oneChange(a, b Params) (key string, d float64, ok bool) {
	if a.Circulation != b.Circulation {
		return "", 0, false
	}
	for _, s := range Specs {
		if x, y := s.Get(a), s.Get(b); x != y {
			if ok {
				return "", 0, false
			}
			key, d, ok = s.Key, y-x, true
		}
	}
	return key, d, ok
}

// jacobian fills columns first…cols−1 of the forward-difference Jacobian of
// the residual at z (where it is r), every row. It leaves the dense record
// holding a perturbed beat.
func (sh *shooter) jacobian(z, r, jac []float64, first, cols int) error {
	k := sh.k
	zp := make([]float64, 2*k)
	zp, rp := zp[:k], zp[k:]
	for j := first; j < cols; j++ {
		copy(zp, z)
		h := math.Max(1e-4, math.Sqrt(sh.rtol)) * math.Max(math.Abs(z[j]), 10)
		zp[j] += h
		if _, err := sh.eval(zp, rp); err != nil {
			return err
		}
		for i := 0; i < k; i++ {
			jac[i*k+j] = (rp[i] - r[i]) / h
		}
	}
	return nil
}

// newtonStep solves J·dz = −r over the first n unknowns (J is k×k, row-major)
// with gonum's LU factorisation; the other unknowns keep dz = 0. A singular J
// (a ventricle that neither fills nor ejects keeps its volume whatever it
// starts with) is solved in the least-squares sense on its nonsingular part,
// by gonum's SVD, so the other unknowns still take their Newton step.
//
// It reports whether it found a step and whether J was rank-deficient, when
// the Jacobian should be built afresh where the step lands.
func newtonStep(jac []float64, k, n int, r, dz []float64) (ok, deficient bool) {
	a := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			a.Set(i, j, jac[i*k+j])
		}
	}
	b := mat.NewVecDense(n, nil)
	for i := 0; i < n; i++ {
		b.SetVec(i, -r[i])
	}
	var x mat.VecDense
	if err := x.SolveVec(a, b); err != nil {
		var svd mat.SVD
		if !svd.Factorize(a, mat.SVDThin) {
			return false, true
		}
		vals := svd.Values(nil)
		rank := 0
		for _, v := range vals {
			if v > 1e-9*vals[0] {
				rank++
			}
		}
		if rank == 0 {
			return false, true
		}
		svd.SolveVecTo(&x, b, rank)
		deficient = true
	}
	for i := range dz {
		dz[i] = 0
		if i < n {
			dz[i] = x.AtVec(i)
		}
		if !finite(dz[i]) {
			return false, deficient
		}
	}
	return true, deficient
}

// limitStep keeps a Newton step within half of each unknown's scale, so one
// poor Jacobian cannot throw the state out of the physiological region.
func (sh *shooter) limitStep(dz, z []float64) {
	f := 1.0
	for i := range dz {
		scale := 0.5 * math.Max(math.Abs(z[i]), 20)
		f = math.Max(f, math.Abs(dz[i])/scale)
	}
	for i := range dz {
		dz[i] /= f
	}
}

// broyden applies Broyden's rank-one update to the k×k Jacobian J so that
// J·dz = dr.
func broyden(jac []float64, k int, dz, dr []float64) {
	var n float64
	for _, v := range dz {
		n += v * v
	}
	if n == 0 {
		return
	}
	for i := 0; i < k; i++ {
		u := dr[i]
		for j := 0; j < k; j++ {
			u -= jac[i*k+j] * dz[j]
		}
		for j := 0; j < k; j++ {
			jac[i*k+j] += u * dz[j] / n
		}
	}
}

// Settled returns the parameters of the steady state as a scenario should
// keep them: in a closed circulation the filling pressure becomes the mean
// left-atrial pressure that the stressed volume gives, so that the pair agree
// (levers other than the filling pressure move LAP at a fixed volume).
func (st *Steady) Settled() Params {
	p := st.Params
	if p.Circulation == Closed {
		p.FillingPressure = st.Metrics.LAPMean
	}
	return p
}
