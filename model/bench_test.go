package model_test

import (
	"testing"

	"pvcouple/model"
	"pvcouple/presets"
)

func normalParams(tb testing.TB) model.Params {
	tb.Helper()
	sc, err := presets.Get("normal")
	if err != nil {
		tb.Fatal(err)
	}
	return sc.Params
}

// benchmarkSteadyState times SteadyState(q) from nothing when cold; warm, it
// times nudges as the explorer makes them: q and p in turn (a nudge up, then
// back), each from the steady state of the one before. It reports the beats
// of the last solve.
func benchmarkSteadyState(b *testing.B, p, q model.Params, warm bool) {
	s := model.NewSolver()
	prev, err := s.SteadyState(p, nil)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	beats := 0
	for i := 0; b.Loop(); i++ {
		target, w := q, &prev.Warm
		if !warm {
			w = nil
		} else if i%2 == 1 {
			target = p
		}
		st, err := s.SteadyState(target, w)
		if err != nil {
			b.Fatal(err)
		}
		if warm {
			prev = st
		}
		beats = st.Beats
	}
	b.ReportMetric(float64(beats), "beats")
}

// BenchmarkSteadyStateCold solves the default preset in the held circulation
// from nothing (target ≤ 0.2 ms).
func BenchmarkSteadyStateCold(b *testing.B) {
	p := inCirculation(b, "normal", model.Held)
	benchmarkSteadyState(b, p, p, false)
}

// BenchmarkSteadyStateWarm re-solves the held default preset after 5 % nudges
// of the filling pressure, up and back, each from the previous steady state
// (target ≤ 0.12 ms).
func BenchmarkSteadyStateWarm(b *testing.B) {
	p := inCirculation(b, "normal", model.Held)
	q := p
	q.FillingPressure *= 1.05
	benchmarkSteadyState(b, p, q, true)
}

// BenchmarkSteadyStateClosedCold solves the default preset in the closed
// circulation, at the stressed volume calibrated when it was loaded, from
// nothing (target ≤ 1.5 ms).
func BenchmarkSteadyStateClosedCold(b *testing.B) {
	p := inCirculation(b, "normal", model.Closed)
	benchmarkSteadyState(b, p, p, false)
}

// BenchmarkSteadyStateClosedWarm re-solves the closed default preset after
// 5 % nudges of its stressed volume (its preload), up and back, each from the
// previous steady state (target ≤ 0.4 ms).
func BenchmarkSteadyStateClosedWarm(b *testing.B) {
	p := inCirculation(b, "normal", model.Closed)
	q := p
	q.StressedVolume *= 1.05
	benchmarkSteadyState(b, p, q, true)
}
