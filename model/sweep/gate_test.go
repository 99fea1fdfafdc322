package sweep_test

import (
	"context"
	"errors"
	"sync"
	"sync/atomic"
	"testing"

	"pvcouple/model"
	"pvcouple/model/sweep"
)

// countingGate runs each point at once and counts them; it never lets more
// than one run at a time, so it is a gate of one slot.
type countingGate struct {
	mu sync.Mutex
	n  atomic.Int64
}

func (g *countingGate) Do(_ context.Context, fn func()) error {
	g.mu.Lock()
	defer g.mu.Unlock()
	g.n.Add(1)
	fn()
	return nil
}

// refusingGate lets the first few points through and refuses the rest.
type refusingGate struct{ left atomic.Int64 }

var errRefused = errors.New("refused")

func (g *refusingGate) Do(_ context.Context, fn func()) error {
	if g.left.Add(-1) < 0 {
		return errRefused
	}
	fn()
	return nil
}

// Every point goes through the gate once, and the numbers are bit for bit
// those of a sweep without one.
func TestGateRunsEveryPointOnce(t *testing.T) {
	g := coupling(t, 6, 5)
	ref := run(t, g, sweep.Options{Workers: 1})
	var gate countingGate
	res := run(t, g, sweep.Options{Workers: 3, Gate: &gate})
	if int(gate.n.Load()) != g.Size() {
		t.Errorf("%d points through the gate, want %d", gate.n.Load(), g.Size())
	}
	for i := range res.Points {
		for _, s := range model.MetricSpecs {
			if x, y := s.Get(&res.Points[i].Metrics), s.Get(&ref.Points[i].Metrics); !sameBits(x, y) {
				t.Fatalf("point %d: %s %v with a gate, %v without", i, s.Key, x, y)
			}
		}
	}
}

// A gate that refuses a point ends the sweep with its error; the points
// solved before stay in the result.
func TestGateRefusalEndsSweep(t *testing.T) {
	g := coupling(t, 6, 5)
	gate := &refusingGate{}
	gate.left.Store(7)
	res, err := sweep.Run(context.Background(), g, sweep.Options{Workers: 2, Gate: gate})
	if !errors.Is(err, errRefused) {
		t.Fatalf("err %v, want the gate's", err)
	}
	if n := g.Size() - res.Count(sweep.NotRun); n != 7 {
		t.Errorf("%d points solved, want the 7 the gate let through", n)
	}
}
