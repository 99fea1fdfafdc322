package model

import (
	"errors"
	"fmt"
	"math"

	"pvcouple/model/ode"
)

// ValveTimes are the times of the left heart's valve events within a beat, in
// seconds from the start of the beat; NaN where the event did not happen in
// the beat.
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
	QIn        []float64 // mitral flow, mL/s, negative for regurgitant backflow
	QOut       []float64 // aortic valve flow, mL/s, negative for regurgitant backflow
	QPump      []float64 // flow of a pump from the LV to the aorta, mL/s (0 when off)
	DPdt       []float64 // dP/dt of LV pressure, mmHg/s
	// V and P hold the volume (mL) and pressure (mmHg) of every compartment:
	// all of them in a closed circulation, the left ventricle and systemic
	// arteries in a held one (nil elsewhere). V[LeftVentricle] is VLV and
	// P[LeftVentricle] is PLV.
	V, P [NumCompartments][]float64
	// QTricuspid and QPulmonic are the right heart's valve flows, mL/s (closed only).
	QTricuspid, QPulmonic []float64
	// LAPMean is the time mean of left-atrial pressure over the beat, mmHg
	// (over the two beats of a 1:2 balloon cycle in a steady state).
	LAPMean float64
	// DiastoleStart is where diastole begins, s: the aortic valve's closure
	// after its opening, or where the activation has fallen to half its
	// peak when the valve does not open (a pump carrying the output).
	DiastoleStart float64
	// BalloonOnset is where an aortic balloon began to inflate, s; NaN when
	// it did not inflate in this beat.
	BalloonOnset float64
	Valves       ValveTimes
	Metrics      Metrics
}

// DefaultSampleInterval is the spacing of a beat's samples, s (1 kHz, a common
// conductance-catheter rate).
const DefaultSampleInterval = 1e-3

// valveHysteresis is how far past zero a valve's driving pressure must go to
// switch it, mmHg: far below any pressure that matters (through the smallest
// valve resistance it passes under 0.5 mL/s), far above the integrator's error.
const valveHysteresis = 1e-3

// maxSwitches caps valve events in one beat; a heart has eight.
const maxSwitches = 40

// isovolumicMaxStep is the largest step, as a fraction of the time to peak
// elastance, while a ventricle has both valves shut (about 16 ms at rest).
const isovolumicMaxStep = 0.05

// Integration tolerances. The beat map must be computed well below the 1e-6
// steady-state tolerance, or its noise would stall Newton's method.
const (
	relTol = 1e-7
	absTol = 1e-6
)

// Solver integrates beats of the model. It keeps its work arrays between
// calls and is not safe for concurrent use: make one per goroutine.
type Solver struct {
	// SampleInterval is the spacing of the samples of returned beats, s.
	SampleInterval float64

	p      Params
	c      circuit
	odes   [2]*ode.Solver // held, closed
	denses [2]*ode.Dense
	ode    *ode.Solver // of the current circuit
	dense  *ode.Dense
	events []ode.Event
	y      []float64
	valves ValveTimes
	// diastole is the time of the beat's first aortic valve closure after an
	// opening, or where it stood in for one (devices.go); NaN before.
	diastole float64
	// cycleStart is the start of the last beat of the last cycle (devices.go).
	cycleStart State
	// leftEvents are the times of every mitral and aortic valve event of the
	// beat, which become samples (a valve with a lesion may switch more than
	// once).
	leftEvents []float64

	grid actGrid // activation on the sample grid
}

// NewSolver returns a Solver sampling beats at DefaultSampleInterval.
func NewSolver() *Solver {
	s := &Solver{SampleInterval: DefaultSampleInterval, y: make([]float64, closedDim)}
	s.events = make([]ode.Event, numValves)
	for i := range s.events {
		// A valve switches when its driving pressure passes the hysteresis
		// band on the far side from its state, so that the solver's error
		// near a switch cannot open and close it over and over.
		s.events[i].G = func(t float64, y []float64) float64 {
			if s.c.valves[i].open {
				return s.c.valveDrive(i, t, y) + valveHysteresis
			}
			return s.c.valveDrive(i, t, y) - valveHysteresis
		}
	}
	return s
}

// setParams makes p the parameters of the following beats.
func (s *Solver) setParams(p Params) {
	s.p = p
	s.c.setParams(&s.p)
	k := 0
	if s.c.closed {
		k = 1
	}
	if s.odes[k] == nil {
		n := s.c.dim()
		s.odes[k] = ode.NewSolver(n, s.c.rhs, ode.Options{RTol: relTol, ATol: absTol, MaxSteps: 20000})
		s.denses[k] = ode.NewDense(n)
	}
	s.ode, s.dense = s.odes[k], s.denses[k]
}

// errNotFinite marks a beat whose state left the finite numbers.
var errNotFinite = errors.New("state is not finite")

// load writes the state x into the ODE vector.
func (s *Solver) load(x State) []float64 {
	y := s.y[:s.c.dim()]
	copy(y, x.V[:])
	if s.c.closed {
		y[lapInt] = 0
	}
	return y
}

// integrate runs one beat from x with the current parameters, recording its
// dense output and valve events, and returns the state at its end and the
// beat's mean left-atrial pressure.
func (s *Solver) integrate(x State) (State, float64, error) {
	y := s.load(x)
	s.dense.Reset()
	nan := math.NaN()
	s.valves = ValveTimes{nan, nan, nan, nan}
	nv := s.c.numValvesOf()
	for i := 0; i < nv; i++ {
		s.c.valves[i].open = s.c.valveDrive(i, 0, y) > 0
	}
	events := s.events[:nv]
	s.ode.SetInitialStep(0)
	t, period := 0.0, s.c.act.Period
	s.beginDevices(x)
	for n := 0; t < period; n++ {
		if n > maxSwitches {
			return State{}, nan, fmt.Errorf("valves switched more than %d times in one beat", maxSwitches)
		}
		for i := range events {
			events[i].Direction = direction(s.c.valves[i].open)
		}
		// With a ventricle's valves shut its volume ignores the activation, so
		// the error control would take long steps straight over a valve opening
		// and closing; cap the step to the time scale of contraction.
		if s.c.isovolumic() {
			s.ode.SetMaxStep(isovolumicMaxStep * s.c.act.TPeak)
		} else {
			s.ode.SetMaxStep(0)
		}
		res, err := s.ode.Solve(t, s.devicesStop(t, period), y, events, s.dense.Add)
		if err != nil {
			return State{}, nan, err
		}
		t = res.T
		s.ode.SetInitialStep(res.LastStep)
		if res.Event >= 0 {
			v := &s.c.valves[res.Event]
			v.open = !v.open
			s.noteValve(res.Event, v.open, t)
		}
		s.devicesAt(res.Event, t)
	}
	var end State
	copy(end.V[:], y[:s.c.dim()])
	end.BalloonRested = !s.c.bal.inflated()
	for _, v := range y {
		if !finite(v) {
			return end, nan, errNotFinite
		}
	}
	lap := s.p.FillingPressure
	if s.c.closed {
		lap = y[lapInt] / period
	}
	return end, lap, nil
}

// noteValve records the first opening or closing of a left-heart valve.
func (s *Solver) noteValve(i int, open bool, t float64) {
	switch {
	case i == mitralValve && open:
		setOnce(&s.valves.MitralOpen, t)
	case i == mitralValve:
		setOnce(&s.valves.MitralClose, t)
	case i == aorticValve && open:
		setOnce(&s.valves.AorticOpen, t)
	case i == aorticValve:
		setOnce(&s.valves.AorticClose, t)
	}
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
// measured. The beat's End is the next beat's start. In a closed circulation
// the state's blood volume is p's: a stressed volume that differs from the
// state's is given to or taken from the systemic veins at the beat's onset,
// as an infusion or a withdrawal would.
func (s *Solver) Step(p Params, x State) (*Beat, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	s.setParams(p)
	if d := p.StressedVolume - p.stressedVolumeOf(x); s.c.closed && math.Abs(d) > volumeSlack {
		x.V[SystemicVeins] += d
	}
	end, lap, err := s.integrate(x)
	if err != nil {
		return nil, fmt.Errorf("beat could not be integrated: %w", err)
	}
	return s.sample(x, end, lap)
}

// volumeSlack is the difference between a state's and the parameters'
// stressed volume, mL, below which Step takes it for rounding, not an infusion.
const volumeSlack = 1e-6

// stressedVolumeOf returns the volume of x above the unstressed volumes of
// p's compartments, mL.
func (p *Params) stressedVolumeOf(x State) float64 {
	u := p.unstressed()
	var sum float64
	for i := range x.V {
		sum += x.V[i] - u[i]
	}
	return sum
}
