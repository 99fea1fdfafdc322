package sweep_test

import (
	"context"
	"testing"

	"pvcouple/model"
	"pvcouple/model/sweep"
	"pvcouple/presets"
)

func normal(tb testing.TB) model.Params {
	tb.Helper()
	sc, err := presets.Get("normal")
	if err != nil {
		tb.Fatal(err)
	}
	return sc.Params
}

// bench10k solves a 100 × 100 map of contractility against resistance around
// the normal preset in circulation c (Ees 1.25–5 mmHg/mL, R 0.425–1.7
// mmHg·s/mL).
func bench10k(b *testing.B, c model.Circulation, workers int) {
	p := normal(b)
	if c == model.Held {
		p.Circulation, p.StressedVolume = model.Held, 0
	}
	g, err := sweep.MapAround(p, "resistance_mmhg_s_per_ml", "ees_mmhg_per_ml", 100, 100)
	if err != nil {
		b.Fatal(err)
	}
	var res *sweep.Result
	for b.Loop() {
		if res, err = sweep.Run(context.Background(), g, sweep.Options{Workers: workers}); err != nil {
			b.Fatal(err)
		}
	}
	beats := 0
	for _, p := range res.Points {
		beats += p.Beats
	}
	b.ReportMetric(float64(len(res.Points))*float64(b.N)/b.Elapsed().Seconds(), "points/s")
	b.ReportMetric(float64(beats)/float64(len(res.Points)), "beats/point")
	b.ReportMetric(float64(len(res.Points)-res.Count(sweep.OK)), "failed")
	b.ReportMetric(float64(res.Workers), "workers")
}

// BenchmarkSweep10k is the speed target of the sweep: a 10,000-point grid of
// the held circulation in at most 5 s on two cores, with every core in use.
func BenchmarkSweep10k(b *testing.B) { bench10k(b, model.Held, 0) }

// BenchmarkSweep10kOneWorker is the same grid on one worker, to show the scaling.
func BenchmarkSweep10kOneWorker(b *testing.B) { bench10k(b, model.Held, 1) }

// BenchmarkSweep10kClosed is the grid in the closed circulation, at the
// stressed volume of the normal preset: at most 10 s on two cores.
func BenchmarkSweep10kClosed(b *testing.B) { bench10k(b, model.Closed, 0) }
