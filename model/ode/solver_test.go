package ode

import (
	"errors"
	"math"
	"testing"
)

// Exact solutions used below are textbook calculus, checked by differentiation.

func decay(t float64, y, dy []float64) { dy[0] = -y[0] }

func oscillator(t float64, y, dy []float64) { dy[0], dy[1] = y[1], -y[0] }

// y' = y·cos t, y(0) = 1 has y = exp(sin t).
func expSin(t float64, y, dy []float64) { dy[0] = y[0] * math.Cos(t) }

func TestDecayMeetsTolerance(t *testing.T) {
	for _, rtol := range []float64{1e-4, 1e-6, 1e-8, 1e-10} {
		s := NewSolver(1, decay, Options{RTol: rtol, ATol: rtol * 1e-3})
		y := []float64{1}
		if _, err := s.Solve(0, 5, y, nil, nil); err != nil {
			t.Fatal(err)
		}
		want := math.Exp(-5)
		// The global error of a tolerance-controlled method is a small multiple of
		// the tolerance for this non-stiff, contracting problem.
		if rel := math.Abs(y[0]-want) / want; rel > 20*rtol {
			t.Errorf("rtol %g: y(5) = %.12g, want %.12g (rel err %.2g)", rtol, y[0], want, rel)
		}
	}
}

func TestOscillatorOverManyPeriods(t *testing.T) {
	s := NewSolver(2, oscillator, Options{RTol: 1e-10, ATol: 1e-12})
	y := []float64{0, 1} // y = sin t
	tEnd := 20 * math.Pi
	if _, err := s.Solve(0, tEnd, y, nil, nil); err != nil {
		t.Fatal(err)
	}
	if math.Abs(y[0]-math.Sin(tEnd)) > 1e-8 || math.Abs(y[1]-math.Cos(tEnd)) > 1e-8 {
		t.Errorf("after 10 periods y = %v, want (sin, cos) = (%g, %g)", y, math.Sin(tEnd), math.Cos(tEnd))
	}
}

// observedOrder integrates expSin with fixed steps h and h/2 and returns
// log2(err(h)/err(h/2)) for the end value and for the dense output at the
// middle of every step.
func observedOrder(t *testing.T, h float64) (endOrder, denseOrder float64) {
	run := func(h float64) (endErr, denseErr float64) {
		s := NewSolver(1, expSin, Options{FixedStep: h})
		y := []float64{1}
		buf := []float64{0}
		obs := func(st *Step) {
			tm := 0.5 * (st.Start() + st.End())
			st.Interpolate(tm, buf)
			denseErr = math.Max(denseErr, math.Abs(buf[0]-math.Exp(math.Sin(tm))))
		}
		if _, err := s.Solve(0, 2, y, nil, obs); err != nil {
			t.Fatal(err)
		}
		return math.Abs(y[0] - math.Exp(math.Sin(2))), denseErr
	}
	e1, d1 := run(h)
	e2, d2 := run(h / 2)
	return math.Log2(e1 / e2), math.Log2(d1 / d2)
}

func TestOrderOfConvergence(t *testing.T) {
	// Dormand–Prince is fifth order; its continuous extension is fourth order
	// (Hairer, Nørsett & Wanner 1993, §II.6). Allow a little asymptotic slack.
	endOrder, denseOrder := observedOrder(t, 0.05)
	if endOrder < 4.7 || endOrder > 5.6 {
		t.Errorf("observed order of the end value %.2f, want ≈ 5", endOrder)
	}
	if denseOrder < 3.8 {
		t.Errorf("observed order of the dense output %.2f, want ≥ 4", denseOrder)
	}
}

func TestEventLocation(t *testing.T) {
	// y' = -y from 1 reaches 0.5 at t = ln 2 exactly.
	s := NewSolver(1, decay, Options{RTol: 1e-10, ATol: 1e-12})
	y := []float64{1}
	ev := []Event{{G: func(_ float64, y []float64) float64 { return y[0] - 0.5 }, Direction: -1}}
	res, err := s.Solve(0, 5, y, ev, nil)
	if err != nil {
		t.Fatal(err)
	}
	if res.Event != 0 || math.Abs(res.T-math.Ln2) > 1e-9 || math.Abs(y[0]-0.5) > 1e-9 {
		t.Errorf("event %d at t=%.12g y=%.12g, want event 0 at ln2=%.12g, y=0.5", res.Event, res.T, y[0], math.Ln2)
	}
	if y[0]-0.5 > 0 {
		t.Errorf("located time is before the crossing: g = %g", y[0]-0.5)
	}
}

func TestEventDirection(t *testing.T) {
	// y = sin t falls through zero at π and rises through zero at 2π.
	g := func(_ float64, y []float64) float64 { return y[0] }
	for _, c := range []struct {
		dir  int
		want float64
	}{{-1, math.Pi}, {+1, 2 * math.Pi}, {0, math.Pi}} {
		s := NewSolver(2, oscillator, Options{RTol: 1e-10, ATol: 1e-12})
		y := []float64{math.Sin(0.5), math.Cos(0.5)}
		res, err := s.Solve(0.5, 10, y, []Event{{G: g, Direction: c.dir}}, nil)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(res.T-c.want) > 1e-8 {
			t.Errorf("direction %d: stopped at %.10g, want %.10g", c.dir, res.T, c.want)
		}
	}
}

// A solution that starts exactly on the event surface and leaves it in the
// event's direction crosses at the start (a hybrid system resuming on a switching
// surface must switch); leaving it the other way is no crossing.
func TestEventAtStartCounts(t *testing.T) {
	g := func(_ float64, y []float64) float64 { return y[0] }
	s := NewSolver(2, oscillator, Options{RTol: 1e-10, ATol: 1e-12})
	y := []float64{0, 1} // sin t rises from zero
	res, err := s.Solve(0, 10, y, []Event{{G: g, Direction: +1}}, nil)
	if err != nil || res.Event != 0 || res.T > 1e-9 {
		t.Errorf("rising from zero: event %d at %g (err %v), want event 0 at once", res.Event, res.T, err)
	}
	if y[0] <= 0 {
		t.Errorf("stopped at g = %g, want just past the crossing", y[0])
	}
	y = []float64{0, 1}
	res, err = s.Solve(0, 10, y, []Event{{G: g, Direction: -1}}, nil)
	if err != nil || res.Event != 0 || math.Abs(res.T-math.Pi) > 1e-8 {
		t.Errorf("falling: event %d at %g (err %v), want π", res.Event, res.T, err)
	}
}

func TestEarliestOfSeveralEvents(t *testing.T) {
	s := NewSolver(1, decay, Options{RTol: 1e-9, ATol: 1e-12, MaxStep: 10})
	y := []float64{1}
	ev := []Event{
		{G: func(_ float64, y []float64) float64 { return y[0] - 0.1 }},
		{G: func(_ float64, y []float64) float64 { return y[0] - 0.5 }},
	}
	res, err := s.Solve(0, 10, y, ev, nil)
	if err != nil {
		t.Fatal(err)
	}
	if res.Event != 1 || math.Abs(res.T-math.Ln2) > 1e-8 {
		t.Errorf("got event %d at %g, want event 1 at ln 2", res.Event, res.T)
	}
}

func TestDenseRecordAcrossRestarts(t *testing.T) {
	s := NewSolver(2, oscillator, Options{RTol: 1e-10, ATol: 1e-12})
	d := NewDense(2)
	y := []float64{0, 1}
	g := []Event{{G: func(_ float64, y []float64) float64 { return y[0] }}}
	tNow := 0.0
	for tNow < 7 {
		res, err := s.Solve(tNow, 7, y, g, d.Add)
		if err != nil {
			t.Fatal(err)
		}
		tNow = res.T
	}
	buf := make([]float64, 2)
	for _, tt := range []float64{0, 0.3, 1.7, math.Pi, 4.4, 6.9, 7} {
		d.At(tt, buf)
		if math.Abs(buf[0]-math.Sin(tt)) > 1e-8 {
			t.Errorf("dense record at %g: %g, want sin = %g", tt, buf[0], math.Sin(tt))
		}
	}
	if a, b := d.Span(); a != 0 || b != 7 {
		t.Errorf("span %g..%g, want 0..7", a, b)
	}
}

func TestNonFiniteIsAnError(t *testing.T) {
	f := func(t float64, y, dy []float64) { dy[0] = math.NaN() }
	s := NewSolver(1, f, Options{})
	_, err := s.Solve(0, 1, []float64{1}, nil, nil)
	if !errors.Is(err, ErrStepSize) {
		t.Errorf("got %v, want ErrStepSize", err)
	}
}

func TestBackwardSpanIsAnError(t *testing.T) {
	s := NewSolver(1, decay, Options{})
	if _, err := s.Solve(1, 1, []float64{1}, nil, nil); err == nil {
		t.Error("empty span accepted")
	}
}

func TestMaxStepsCap(t *testing.T) {
	s := NewSolver(2, oscillator, Options{RTol: 1e-12, ATol: 1e-14, MaxSteps: 10})
	if _, err := s.Solve(0, 100, []float64{0, 1}, nil, nil); err == nil {
		t.Error("step cap not enforced")
	}
}

func TestSolveDoesNotAllocate(t *testing.T) {
	s := NewSolver(2, oscillator, Options{RTol: 1e-8})
	y := []float64{0, 1}
	ev := []Event{{G: func(_ float64, y []float64) float64 { return y[0] - 2 }}}
	allocs := testing.AllocsPerRun(20, func() {
		y[0], y[1] = 0, 1
		if _, err := s.Solve(0, 10, y, ev, nil); err != nil {
			t.Fatal(err)
		}
	})
	if allocs != 0 {
		t.Errorf("Solve allocated %.0f times per run", allocs)
	}
}
