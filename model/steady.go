package model

import (
	"errors"
	"fmt"
	"math"
)

// SteadyTol is the beat-map residual below which a beat counts as periodic:
// max over the state of |F(x) − x| / max(|x|, 10).
const SteadyTol = 1e-6

// MaxSteadyBeats caps the beats integrated while looking for a steady state.
const MaxSteadyBeats = 60

// Warm carries a steady state forward, so that solving for nearby parameters
// starts from it (and from its Jacobian of the beat map). The zero value
// means a cold start.
type Warm struct {
	State  State
	jac    [2][2]float64
	hasJac bool
	ok     bool
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
	Beats    int
	Residual float64
	Cause    error // the failure that stopped the search, if any
}

func (e *NotSettledError) Error() string {
	msg := fmt.Sprintf("no periodic steady state after %d beats (beat-map residual %.2g, need below %g)", e.Beats, e.Residual, SteadyTol)
	if e.Cause != nil && !errors.Is(e.Cause, errBeatCap) {
		msg += ": " + e.Cause.Error()
	}
	return msg + "; the parameters may be outside the region where this heart settles"
}

func (e *NotSettledError) Unwrap() error { return e.Cause }

// SteadyState finds the periodic steady state of p: the start-of-beat state x
// with F(x) = x, where F integrates one beat. Plain repetition of beats
// converges only at the rate exp(−T/(R·C)) of the arterial load; instead
// Newton's method is applied to G(x) = F(x) − x, with a finite-difference
// Jacobian of F on a cold start and Broyden updates after each beat. A warm
// start reuses the state and Jacobian of a previous nearby solve and usually
// settles in two or three beats.
func (s *Solver) SteadyState(p Params, warm *Warm) (*Steady, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	s.setParams(p)
	beats := 0
	eval := func(x State) (State, error) {
		if beats >= MaxSteadyBeats {
			return State{}, errBeatCap
		}
		beats++
		return s.integrate(x)
	}

	var x State
	var jac [2][2]float64
	haveJac := false
	if warm.Valid() {
		x, jac, haveJac = warm.State, warm.jac, warm.hasJac
	} else {
		x = p.coldGuess()
	}
	fx, err := eval(x)
	if err != nil {
		// A warm state far from the new parameters can fail; fall back to cold.
		x, haveJac = p.coldGuess(), false
		if fx, err = eval(x); err != nil {
			return nil, &NotSettledError{Beats: beats, Residual: math.Inf(1), Cause: err}
		}
	}
	r := [2]float64{fx.V - x.V, fx.Pc - x.Pc}
	res := residual(r, x)
	for res >= SteadyTol {
		if beats >= MaxSteadyBeats {
			return nil, &NotSettledError{Beats: beats, Residual: res}
		}
		if !haveJac {
			if jac, err = s.jacobian(x, fx, eval); err != nil {
				return nil, &NotSettledError{Beats: beats, Residual: res, Cause: err}
			}
			haveJac = true
		}
		dx, ok := newtonStep(jac, r)
		if !ok {
			return nil, &NotSettledError{Beats: beats, Residual: res, Cause: fmt.Errorf("singular beat-map Jacobian")}
		}
		limitStep(&dx, x)
		// Damped step: halve until the residual does not grow much.
		var xn, fxn State
		var rn [2]float64
		var resn float64
		accepted := false
		for lambda := 1.0; lambda > 1.0/64 && beats < MaxSteadyBeats; lambda /= 2 {
			xn = State{x.V + lambda*dx[0], x.Pc + lambda*dx[1]}
			fxn, err = eval(xn)
			if err != nil {
				continue
			}
			rn = [2]float64{fxn.V - xn.V, fxn.Pc - xn.Pc}
			resn = residual(rn, xn)
			if resn < 2*res || resn < SteadyTol {
				accepted = true
				break
			}
		}
		if !accepted {
			if err == nil && beats < MaxSteadyBeats {
				// The Jacobian misled us: rebuild it where we stand and retry.
				// The last evaluation was not of x, so redo it too.
				if fx, err = eval(x); err == nil {
					haveJac = false
					continue
				}
			}
			return nil, &NotSettledError{Beats: beats, Residual: res, Cause: err}
		}
		broyden(&jac, [2]float64{xn.V - x.V, xn.Pc - x.Pc}, [2]float64{fxn.V - fx.V, fxn.Pc - fx.Pc})
		x, fx, r, res = xn, fxn, rn, resn
	}
	// The last integrated beat started from x and is periodic within SteadyTol.
	b, err := s.sample(x, fx)
	if err != nil {
		return nil, err
	}
	return &Steady{Beat: b, Beats: beats, Residual: res, Warm: Warm{State: x, jac: jac, hasJac: haveJac, ok: true}}, nil
}

// residual is the relative size of the beat-map residual r at x.
func residual(r [2]float64, x State) float64 {
	a := math.Abs(r[0]) / math.Max(math.Abs(x.V), 10)
	b := math.Abs(r[1]) / math.Max(math.Abs(x.Pc), 10)
	if math.IsNaN(a) || math.IsNaN(b) {
		return math.Inf(1)
	}
	return math.Max(a, b)
}

// jacobian is the forward-difference Jacobian of the beat map at x (F(x) = fx).
// It leaves the dense record holding a perturbed beat.
func (s *Solver) jacobian(x, fx State, eval func(State) (State, error)) ([2][2]float64, error) {
	var j [2][2]float64
	hv := 1e-4 * math.Max(math.Abs(x.V), 10)
	hp := 1e-4 * math.Max(math.Abs(x.Pc), 10)
	f1, err := eval(State{x.V + hv, x.Pc})
	if err != nil {
		return j, err
	}
	f2, err := eval(State{x.V, x.Pc + hp})
	if err != nil {
		return j, err
	}
	j[0][0], j[1][0] = (f1.V-fx.V)/hv, (f1.Pc-fx.Pc)/hv
	j[0][1], j[1][1] = (f2.V-fx.V)/hp, (f2.Pc-fx.Pc)/hp
	return j, nil
}

// newtonStep solves (J − I)·dx = −r for the two-component state by Cramer's rule.
func newtonStep(j [2][2]float64, r [2]float64) ([2]float64, bool) {
	a, b, c, d := j[0][0]-1, j[0][1], j[1][0], j[1][1]-1
	det := a*d - b*c
	if det == 0 || math.IsNaN(det) {
		return [2]float64{}, false
	}
	return [2]float64{(-r[0]*d + r[1]*b) / det, (-r[1]*a + r[0]*c) / det}, true
}

// limitStep keeps a Newton step within half the state's scale, so one poor
// Jacobian cannot throw the state out of the physiological region.
func limitStep(dx *[2]float64, x State) {
	sv := 0.5 * math.Max(math.Abs(x.V), 20)
	sp := 0.5 * math.Max(math.Abs(x.Pc), 20)
	f := math.Max(math.Abs(dx[0])/sv, math.Abs(dx[1])/sp)
	if f > 1 {
		dx[0] /= f
		dx[1] /= f
	}
}

// broyden applies Broyden's rank-one update to the beat-map Jacobian J so that
// J·dx = df.
func broyden(j *[2][2]float64, dx, df [2]float64) {
	n := dx[0]*dx[0] + dx[1]*dx[1]
	if n == 0 {
		return
	}
	u0 := df[0] - (j[0][0]*dx[0] + j[0][1]*dx[1])
	u1 := df[1] - (j[1][0]*dx[0] + j[1][1]*dx[1])
	j[0][0] += u0 * dx[0] / n
	j[0][1] += u0 * dx[1] / n
	j[1][0] += u1 * dx[0] / n
	j[1][1] += u1 * dx[1] / n
}

// coldGuess estimates the start-of-beat state without integrating: the
// ventricle filled to the filling pressure, and the arterial pressure of a
// two-element Windkessel fed by the stroke volume of the coupling estimate
// SV = (EDV − V0)·Ees/(Ees + Ea) with Ea ≈ R_total/T (docs/science.md §3).
func (p Params) coldGuess() State {
	period := 60 / p.HeartRate
	edv := p.FilledVolume()
	ea := (p.Resistance + p.Zc) / period
	sv := math.Max(0, (edv-p.V0)*p.Ees/(p.Ees+ea))
	q := math.Exp(-period / (p.Resistance * p.Compliance))
	// Pc jumps by SV/C at ejection, then decays by q over the beat.
	pc := p.VenousPressure + sv/p.Compliance*q/(1-q)
	return State{V: edv, Pc: pc}
}
