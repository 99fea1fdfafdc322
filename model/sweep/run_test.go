package sweep_test

import (
	"context"
	"errors"
	"math"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"pvcouple/model"
	"pvcouple/model/sweep"
)

// coupling returns a grid of contractility against resistance around the
// normal preset with ny × nx points.
func coupling(t testing.TB, nx, ny int) sweep.Grid {
	t.Helper()
	g, err := sweep.MapAround(normal(t), "resistance_mmhg_s_per_ml", "ees_mmhg_per_ml", nx, ny)
	if err != nil {
		t.Fatal(err)
	}
	return g
}

func run(t testing.TB, g sweep.Grid, opt sweep.Options) *sweep.Result {
	t.Helper()
	res, err := sweep.Run(context.Background(), g, opt)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func sameBits(a, b float64) bool { return math.Float64bits(a) == math.Float64bits(b) }

// The chunks and their warm-start chains depend on the grid alone, so the
// numbers must be bit for bit the same whatever the number of workers.
func TestWorkersDoNotChangeResults(t *testing.T) {
	g := coupling(t, 12, 9) // 108 points in 7 chunks of 16
	ref := run(t, g, sweep.Options{Workers: 1})
	if ref.Count(sweep.OK) != len(ref.Points) {
		t.Fatalf("%d of %d points settled", ref.Count(sweep.OK), len(ref.Points))
	}
	for _, w := range []int{2, 3, 8} {
		res := run(t, g, sweep.Options{Workers: w})
		if res.Workers != min(w, 7) {
			t.Errorf("%d workers asked, %d used", w, res.Workers)
		}
		for i := range res.Points {
			a, b := &ref.Points[i], &res.Points[i]
			if a.Status != b.Status || a.Beats != b.Beats {
				t.Fatalf("workers %d, point %d: %v/%d beats vs %v/%d", w, i, b.Status, b.Beats, a.Status, a.Beats)
			}
			for _, s := range model.MetricSpecs {
				if x, y := s.Get(&b.Metrics), s.Get(&a.Metrics); !sameBits(x, y) {
					t.Fatalf("workers %d, point %d: %s %v vs %v with one worker", w, i, s.Key, x, y)
				}
			}
		}
	}
}

// A warm-started point must agree with the same parameters solved from a cold
// start within the steady-state tolerance. Both are fixed points of the beat
// map to a residual below model.SteadyTol (1e-6 of the state); the beat map
// contracts (rate exp(−T/RC) ≈ 0.7 here), so the two start states differ by a
// few 1e-6 and the metrics, smooth in the start state, by about as much
// relatively. 1e-4 leaves room for a sample-grid quantity (end-systole is the
// sample of maximal P/(V−V0)) while catching any mix-up of points.
func TestPointsMatchColdSolves(t *testing.T) {
	g := coupling(t, 7, 6)
	res := run(t, g, sweep.Options{})
	s := model.NewSolver()
	idx := make([]int, 2)
	worst := 0.0
	for i, pt := range res.Points {
		g.Index(i, idx)
		p := g.Params(idx)
		if v := res.Values(i); v[0] != p.Ees || v[1] != p.Resistance {
			t.Fatalf("point %d: values %v, params Ees %g R %g", i, v, p.Ees, p.Resistance)
		}
		st, err := s.SteadyState(p, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, k := range []string{"edv_ml", "sv_ml", "esp_mmhg", "map_mmhg", "sw_mmhg_ml", "efficiency", "ea_ees_ratio"} {
			spec, _ := model.MetricByKey(k)
			got, want := spec.Get(&pt.Metrics), spec.Get(&st.Metrics)
			d := math.Abs(got-want) / math.Abs(want)
			worst = math.Max(worst, d)
			if d > 1e-4 {
				t.Errorf("point %d (Ees %g, R %g): %s %v, cold solve %v", i, p.Ees, p.Resistance, k, got, want)
			}
		}
	}
	t.Logf("largest relative difference from cold solves: %.2g", worst)
}

// Progress is reported with Done rising to Total, from one caller at a time
// (the race detector checks the unguarded counter).
func TestProgress(t *testing.T) {
	g := coupling(t, 20, 10)
	calls, last := 0, 0
	res := run(t, g, sweep.Options{Workers: 2, Progress: func(p sweep.Progress) {
		calls++
		if p.Done < last || p.Done > p.Total || p.Total != 200 {
			t.Errorf("progress %+v after %d", p, last)
		}
		last = p.Done
	}})
	if last != 200 || calls < 2 {
		t.Errorf("last progress %d after %d calls", last, calls)
	}
	if res.Elapsed <= 0 {
		t.Error("no elapsed time")
	}
	p := sweep.Progress{Done: 25, Total: 100, Elapsed: time.Second}
	if p.Fraction() != 0.25 || p.Remaining() != 3*time.Second {
		t.Errorf("fraction %v, remaining %v", p.Fraction(), p.Remaining())
	}
	if (sweep.Progress{Total: 5}).Remaining() != -1 || (sweep.Progress{Done: 5, Total: 5}).Remaining() != 0 {
		t.Error("remaining at the ends")
	}
}

// Cancelling stops the workers early; the points solved so far are kept and
// the rest are NotRun.
func TestCancel(t *testing.T) {
	g := coupling(t, 60, 60)
	var job *sweep.Job
	var cancelled atomic.Bool
	ready := make(chan struct{})
	job, err := sweep.Start(context.Background(), g, sweep.Options{Progress: func(sweep.Progress) {
		<-ready
		if !cancelled.Swap(true) {
			job.Cancel()
		}
	}})
	if err != nil {
		t.Fatal(err)
	}
	close(ready)
	res, err := job.Wait()
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want context.Canceled", err)
	}
	done := job.Progress().Done
	if ok, notRun := res.Count(sweep.OK), res.Count(sweep.NotRun); ok != done || notRun != 3600-done || notRun == 0 {
		t.Errorf("%d ok, %d not run, progress %d", ok, notRun, done)
	}
	f, err := job.Field("sv_ml")
	if err != nil {
		t.Fatal(err)
	}
	nan := 0
	for _, v := range f {
		if math.IsNaN(v) {
			nan++
		}
	}
	if nan != 3600-done {
		t.Errorf("%d NaN in the partial map, want %d", nan, 3600-done)
	}

	// A context that is already done solves nothing.
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	res, err = sweep.Run(ctx, g, sweep.Options{})
	if !errors.Is(err, context.Canceled) || res.Count(sweep.NotRun) != 3600 {
		t.Errorf("pre-cancelled: %v, %d not run", err, res.Count(sweep.NotRun))
	}
}

// A combination the model refuses is reported in its point; the others are
// solved. With filling pressure 2 mmHg and EDPVR B 0.027/mL the ventricle
// fills ln(1 + 2/A)/B mL above V0, under the 10 mL the model needs once
// A > 6.4 mmHg.
func TestInvalidPointsAreReported(t *testing.T) {
	base := normal(t)
	base.FillingPressure = 2
	g := sweep.Grid{Base: base, Axes: []sweep.Axis{{Key: "edpvr_a_mmhg", From: 0.5, To: 10, N: 5}}}
	res := run(t, g, sweep.Options{})
	want := []sweep.Status{sweep.OK, sweep.OK, sweep.OK, sweep.Invalid, sweep.Invalid}
	for i, pt := range res.Points {
		if pt.Status != want[i] {
			t.Errorf("A = %g: %v (%v), want %v", res.Values(i)[0], pt.Status, pt.Err, want[i])
		}
	}
	if err := res.Points[4].Err; err == nil || !strings.Contains(err.Error(), "filling_pressure_mmhg") {
		t.Errorf("error %v does not name the key", err)
	}
	f, _ := res.Field("sv_ml")
	if math.IsNaN(f[0]) || !math.IsNaN(f[4]) {
		t.Errorf("field %v", f)
	}
	if _, err := res.Field("nope"); err == nil {
		t.Error("unknown metric accepted")
	}
}
