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

// benchmarkSteadyState times SteadyState(q) from the steady state of p when
// warm, from nothing otherwise, and reports the beats it takes.
func benchmarkSteadyState(b *testing.B, p, q model.Params, warm bool) {
	s := model.NewSolver()
	var w *model.Warm
	if warm {
		base, err := s.SteadyState(p, nil)
		if err != nil {
			b.Fatal(err)
		}
		w = &base.Warm
	}
	b.ReportAllocs()
	beats := 0
	for b.Loop() {
		st, err := s.SteadyState(q, w)
		if err != nil {
			b.Fatal(err)
		}
		beats = st.Beats
	}
	b.ReportMetric(float64(beats), "beats")
}

// BenchmarkSteadyStateCold solves the default preset in the held circulation
// from nothing (target ≤ 2 ms).
func BenchmarkSteadyStateCold(b *testing.B) {
	p := inCirculation(b, "normal", model.Held)
	benchmarkSteadyState(b, p, p, false)
}

// BenchmarkSteadyStateWarm re-solves the held default preset after a 5 % nudge
// of the filling pressure, starting from the previous steady state (target ≤
// 0.5 ms).
func BenchmarkSteadyStateWarm(b *testing.B) {
	p := inCirculation(b, "normal", model.Held)
	q := p
	q.FillingPressure *= 1.05
	benchmarkSteadyState(b, p, q, true)
}

// BenchmarkSteadyStateClosedCold solves the default preset in the closed
// circulation, at the stressed volume calibrated when it was loaded, from
// nothing.
func BenchmarkSteadyStateClosedCold(b *testing.B) {
	p := inCirculation(b, "normal", model.Closed)
	benchmarkSteadyState(b, p, p, false)
}

// BenchmarkSteadyStateClosedWarm re-solves the closed default preset after a
// 5 % nudge of its stressed volume (its preload), starting from the previous
// steady state.
func BenchmarkSteadyStateClosedWarm(b *testing.B) {
	p := inCirculation(b, "normal", model.Closed)
	q := p
	q.StressedVolume *= 1.05
	benchmarkSteadyState(b, p, q, true)
}
