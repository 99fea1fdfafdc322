package model

import (
	"errors"
	"fmt"
	"math"

	"pvcouple/model/ode"
)

// State is the model's state at the start of a beat (onset of activation).
type State struct {
	V  float64 // LV volume, mL
	Pc float64 // pressure across the Windkessel compliance, mmHg
}

// ValveTimes are the times of the valve events within a beat, in seconds from
// the start of the beat; NaN where the event did not happen in the beat.
type ValveTimes struct {
	MitralClose, AorticOpen, AorticClose, MitralOpen float64
}

// Beat is one simulated beat with its samples and measurements. Sample times
// run from 0 (activation onset) to Period inclusive.
type Beat struct {
	Params     Params
	Start, End State     // state at the beginning and end of the beat
	Period     float64   // s
	T          []float64 // s from the start of the beat
	PLV        []float64 // LV pressure, mmHg
	VLV        []float64 // LV volume, mL
	PAO        []float64 // proximal aortic pressure, mmHg
	QIn        []float64 // mitral flow, mL/s
	QOut       []float64 // aortic flow, mL/s
	DPdt       []float64 // dP/dt of LV pressure, mmHg/s
	Valves     ValveTimes
	Metrics    Metrics
}

// DefaultSampleInterval is the spacing of a beat's samples, s (1 kHz, a common
// conductance-catheter rate).
const DefaultSampleInterval = 1e-3

// maxSwitches caps valve events in one beat; a heart has four.
const maxSwitches = 24

// isovolumicMaxStep is the largest step, as a fraction of the time to peak elastance, while both
// valves are shut (about 16 ms at rest).
const isovolumicMaxStep = 0.05

// Integration tolerances. The beat map must be computed well below the 1e-6
// steady-state tolerance, or its noise would stall Newton's method.
const (
	relTol = 1e-8
	absTol = 1e-6
)

// Solver integrates beats of the model. It keeps its work arrays between
// calls and is not safe for concurrent use: make one per goroutine.
type Solver struct {
	// SampleInterval is the spacing of the samples of returned beats, s.
	SampleInterval float64

	p      Params
	act    Activation
	mitral bool // mitral valve open
	aortic bool // aortic valve open
	ode    *ode.Solver
	dense  *ode.Dense
	events []ode.Event
	y      []float64
	valves ValveTimes

	grid actGrid // activation on the sample grid

	// Cache of the last LV pressure computed by rhs: the events are evaluated
	// at the end point of each step, where rhs has just been evaluated (FSAL).
	cacheT, cacheV, cacheP float64
}

// NewSolver returns a Solver sampling beats at DefaultSampleInterval.
func NewSolver() *Solver {
	s := &Solver{SampleInterval: DefaultSampleInterval, y: make([]float64, 2)}
	s.ode = ode.NewSolver(2, s.rhs, ode.Options{RTol: relTol, ATol: absTol, MaxSteps: 20000})
	s.dense = ode.NewDense(2)
	s.events = []ode.Event{
		{G: func(t float64, y []float64) float64 { return s.p.FillingPressure - s.plv(t, y[0]) }},
		{G: func(t float64, y []float64) float64 { return s.plv(t, y[0]) - y[1] }},
	}
	return s
}

// setParams makes p the parameters of the following beats.
func (s *Solver) setParams(p Params) {
	s.cacheT = math.NaN()
	if p.HeartRate != s.p.HeartRate || s.act.Period == 0 {
		s.act = NewActivation(p.HeartRate)
	}
	s.p = p
}

// plv is LV pressure at time t in the beat and volume v, cached.
func (s *Solver) plv(t, v float64) float64 {
	if t == s.cacheT && v == s.cacheV {
		return s.cacheP
	}
	p := s.p.Pressure(s.act.E(t), v)
	s.cacheT, s.cacheV, s.cacheP = t, v, p
	return p
}

// rhs is the model: y = (V, Pc).
func (s *Solver) rhs(t float64, y, dy []float64) {
	plv := s.plv(t, y[0])
	var qin, qout float64
	if s.mitral {
		qin = (s.p.FillingPressure - plv) / s.p.MitralResistance
	}
	if s.aortic {
		qout = (plv - y[1]) / (s.p.AorticResistance + s.p.Zc)
	}
	dy[0] = qin - qout
	dy[1] = (qout - (y[1]-s.p.VenousPressure)/s.p.Resistance) / s.p.Compliance
}

// errNotFinite marks a beat whose state left the finite numbers.
var errNotFinite = errors.New("state is not finite")

// integrate runs one beat from x with the current parameters, recording its
// dense output and valve events, and returns the state at its end.
func (s *Solver) integrate(x State) (State, error) {
	y := s.y
	y[0], y[1] = x.V, x.Pc
	s.dense.Reset()
	nan := math.NaN()
	s.valves = ValveTimes{nan, nan, nan, nan}
	plv := s.p.Pressure(0, x.V)
	s.mitral = s.p.FillingPressure > plv
	s.aortic = plv > x.Pc
	s.ode.SetInitialStep(0)
	t, period := 0.0, s.act.Period
	for n := 0; t < period; n++ {
		if n > maxSwitches {
			return State{}, fmt.Errorf("valves switched more than %d times in one beat", maxSwitches)
		}
		s.events[0].Direction = direction(s.mitral)
		s.events[1].Direction = direction(s.aortic)
		// With both valves shut the state ignores the activation, so the error
		// control would take long steps straight over a valve opening and
		// closing; cap the step to the time scale of contraction.
		if s.mitral || s.aortic {
			s.ode.SetMaxStep(0)
		} else {
			s.ode.SetMaxStep(isovolumicMaxStep * s.act.TPeak)
		}
		res, err := s.ode.Solve(t, period, y, s.events, s.dense.Add)
		if err != nil {
			return State{}, err
		}
		t = res.T
		s.ode.SetInitialStep(res.LastStep)
		switch res.Event {
		case 0:
			s.mitral = !s.mitral
			if s.mitral {
				setOnce(&s.valves.MitralOpen, t)
			} else {
				setOnce(&s.valves.MitralClose, t)
			}
		case 1:
			s.aortic = !s.aortic
			if s.aortic {
				setOnce(&s.valves.AorticOpen, t)
			} else {
				setOnce(&s.valves.AorticClose, t)
			}
		}
	}
	end := State{V: y[0], Pc: y[1]}
	if !finite(end.V) || !finite(end.Pc) {
		return end, errNotFinite
	}
	return end, nil
}

// direction is the crossing that switches a valve: an open valve closes when
// its driving pressure falls through zero, a closed one opens when it rises.
func direction(open bool) int {
	if open {
		return -1
	}
	return +1
}

func setOnce(dst *float64, t float64) {
	if math.IsNaN(*dst) {
		*dst = t
	}
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// Step integrates one beat of p from the state x, as in a beat-by-beat
// protocol where the levers change between beats, and returns it sampled and
// measured. The beat's End is the next beat's start.
func (s *Solver) Step(p Params, x State) (*Beat, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	s.setParams(p)
	end, err := s.integrate(x)
	if err != nil {
		return nil, fmt.Errorf("beat could not be integrated: %w", err)
	}
	return s.sample(x, end)
}

// sample turns the dense record of the last integrated beat into a Beat.
func (s *Solver) sample(start, end State) (*Beat, error) {
	p := &s.p
	period := s.act.Period
	dt := s.SampleInterval
	if !(dt > 0) {
		dt = DefaultSampleInterval
	}
	n := int(math.Floor(period/dt+1e-9)) + 1
	extra := []float64{s.valves.MitralClose, s.valves.AorticOpen, s.valves.AorticClose, s.valves.MitralOpen}
	times := make([]float64, 0, n+len(extra)+1)
	for i := 0; i < n; i++ {
		times = append(times, float64(i)*dt)
	}
	if last := times[len(times)-1]; period-last > 1e-9 {
		times = append(times, period)
	} else {
		times[len(times)-1] = period
	}
	times = mergeTimes(times, extra)

	b := &Beat{Params: *p, Start: start, End: end, Period: period, T: times, Valves: s.valves}
	m := len(times)
	buf := make([]float64, 6*m)
	b.PLV, b.VLV, b.PAO, b.QIn, b.QOut, b.DPdt = buf[0:m], buf[m:2*m], buf[2*m:3*m], buf[3*m:4*m], buf[4*m:5*m], buf[5*m:6*m]
	s.dense.Eval(times, [][]float64{b.VLV, b.PAO}) // PAO holds Pc until converted below
	grid := s.activationGrid(dt, n)
	j := 0 // next time of the uniform grid
	for i, t := range times {
		var e, de float64
		if j < len(grid.e) && t == float64(j)*dt {
			e, de = grid.e[j], grid.de[j]
			j++
		} else {
			e, de = s.act.EDeriv(t)
		}
		v, pc := b.VLV[i], b.PAO[i]
		plv, dpdv, dpde := p.pressureAndSlopes(e, v)
		qin := math.Max(0, (p.FillingPressure-plv)/p.MitralResistance)
		qout := math.Max(0, (plv-pc)/(p.AorticResistance+p.Zc))
		b.PLV[i] = plv
		b.QIn[i], b.QOut[i] = qin, qout
		b.PAO[i] = pc + p.Zc*qout
		b.DPdt[i] = dpde*de + dpdv*(qin-qout)
	}
	m2, err := Measure(BeatSamples{T: b.T, P: b.PLV, V: b.VLV, DPdt: b.DPdt, Pao: b.PAO}, p.Known())
	if err != nil {
		return nil, err
	}
	b.Metrics = m2
	return b, nil
}

// actGrid holds e(t) and de/dt on the uniform sample grid of one beat period.
type actGrid struct {
	period, dt float64
	e, de      []float64
}

// activationGrid returns the activation on the first n times of the grid
// i·dt, computed once per heart rate and sample interval: the steady states
// of a session share them, and evaluating them is a good part of sampling.
func (s *Solver) activationGrid(dt float64, n int) *actGrid {
	g := &s.grid
	if g.period != s.act.Period || g.dt != dt || len(g.e) != n {
		g.period, g.dt = s.act.Period, dt
		g.e, g.de = make([]float64, n), make([]float64, n)
		for i := range g.e {
			g.e[i], g.de[i] = s.act.EDeriv(float64(i) * dt)
		}
	}
	return g
}

// mergeTimes inserts the finite values of extra into the sorted times, skipping
// ones that fall on an existing time.
func mergeTimes(times, extra []float64) []float64 {
	for _, t := range extra {
		if !finite(t) {
			continue
		}
		i := 0
		for i < len(times) && times[i] < t {
			i++
		}
		if i < len(times) && times[i]-t < 1e-9 || i > 0 && t-times[i-1] < 1e-9 {
			continue
		}
		times = append(times, 0)
		copy(times[i+1:], times[i:])
		times[i] = t
	}
	return times
}

// Known returns what the model knows of its own heart and load, for Measure.
func (p Params) Known() Known {
	return Known{
		V0: p.V0, Ees: p.Ees, EdpvrA: p.EdpvrA, EdpvrB: p.EdpvrB,
		WallVolume: p.WallVolume, Resistance: p.Resistance + p.Zc, Compliance: p.Compliance,
	}
}
