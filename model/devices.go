package model

import "math"

// The beat's timing of the support devices and of diastole (docs/science.md
// §12): diastole starts at the first aortic valve closure that follows an
// opening within the beat, and the balloon inflates there; in a beat whose
// aortic valve does not open, at the stand-in for the end of systole
// (balloon.go) instead.

// beginDevices prepares the devices for a beat from x.
func (s *Solver) beginDevices(x State) {
	s.diastole = math.NaN()
	s.leftEvents = s.leftEvents[:0]
	s.c.bal.begin(x.BalloonRested)
}

// relaxTime returns the stand-in for the end of systole, found once per
// heart rate.
func (c *circuit) relaxTime() float64 {
	if math.IsNaN(c.bal.relax) {
		c.bal.relax = halfRelaxed(&c.act)
	}
	return c.bal.relax
}

// devicesStop returns where the integration from t must stop: at the
// stand-in for the end of systole while a balloon waits to inflate, else at
// the end of the beat.
func (s *Solver) devicesStop(t, period float64) float64 {
	b := &s.c.bal
	if !b.on() || b.skip || b.inflated() {
		return period
	}
	if r := s.c.relaxTime(); t < r && r < period {
		return r
	}
	return period
}

// devicesAt acts on a stop of the integration at t: a valve event (event ≥ 0)
// or a stop of devicesStop.
func (s *Solver) devicesAt(event int, t float64) {
	if event == mitralValve || event == aorticValve {
		s.leftEvents = append(s.leftEvents, t)
	}
	if !math.IsNaN(s.diastole) {
		return
	}
	opened := !math.IsNaN(s.valves.AorticOpen)
	shut := !s.c.valves[aorticValve].open
	switch {
	case event == aorticValve && opened && shut:
	case event < 0 && s.c.bal.on() && t == s.c.bal.relax && !opened && shut:
	default:
		return
	}
	s.diastole = t
	s.c.bal.inflate(t)
	s.c.cacheT = -1
}

// diastoleStart returns the start of the last beat's diastole: its aortic
// valve closure, or the stand-in where the valve did not open.
func (s *Solver) diastoleStart() float64 {
	if math.IsNaN(s.diastole) {
		return s.c.relaxTime()
	}
	return s.diastole
}

// cycle integrates one period of the steady state from x and returns its end
// and its mean left-atrial pressure: one beat, or two when a balloon inflates
// every other beat (the first rests, the second inflates, so the period's
// last beat is the assisted one). The start of its last beat is kept in
// s.cycleStart.
func (s *Solver) cycle(x State) (State, float64, error) {
	s.cycleStart = x
	if s.cycleBeats() == 1 {
		return s.integrate(x)
	}
	x.BalloonRested = false
	mid, lap1, err := s.integrate(x)
	if err != nil {
		return mid, lap1, err
	}
	s.cycleStart = mid
	end, lap2, err := s.integrate(mid)
	return end, 0.5 * (lap1 + lap2), err
}

// cycleBeats is the number of beats in one period of the steady state.
func (s *Solver) cycleBeats() int {
	if s.c.bal.on() && s.c.bal.ratio == 2 {
		return 2
	}
	return 1
}
