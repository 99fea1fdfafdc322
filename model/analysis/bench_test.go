package analysis

import (
	"bytes"
	"testing"

	"pvcouple/internal/synthrec"
)

// BenchmarkAnalyze60s1kHz reads and analyses a 60-s recording at 1 kHz made
// by the model (steady beats, a caval occlusion, recovery; noise added):
// target under 1 s.
func BenchmarkAnalyze60s1kHz(b *testing.B) {
	spec := occlusion(presetParams(b, "normal"))
	spec.SteadyBeats, spec.OcclusionBeats, spec.RecoveryBeats = 20, 10, 41
	spec.NoiseP, spec.NoiseV = 0.5, 0.5
	sr, err := synthrec.Make(spec)
	if err != nil {
		b.Fatal(err)
	}
	var buf bytes.Buffer
	if err := sr.WriteCSV(&buf, "time_s", "pressure_mmhg", "volume_ml", ""); err != nil {
		b.Fatal(err)
	}
	data := buf.Bytes()
	b.ReportAllocs()
	var a *Analysis
	for b.Loop() {
		rec, err := ReadCSV(bytes.NewReader(data), "bench.csv", ReadOptions{})
		if err != nil {
			b.Fatal(err)
		}
		if a, err = Analyze(rec, Options{}); err != nil {
			b.Fatal(err)
		}
	}
	if d := a.Recording.Duration(); d < 60 {
		b.Fatalf("recording lasts %g s", d)
	}
	b.ReportMetric(float64(len(a.Beats)), "beats")
}

// BenchmarkFitSteady fits the model to a steady 12-beat recording at 1 kHz:
// target under 5 s.
func BenchmarkFitSteady(b *testing.B) {
	spec := occlusion(presetParams(b, "normal"))
	spec.SteadyBeats, spec.OcclusionBeats, spec.RecoveryBeats = 12, 0, 0
	spec.NoiseP, spec.NoiseV = 0.5, 0.5
	_, rec := makeRecording(b, spec, ReadOptions{})
	a, err := Analyze(rec, Options{})
	if err != nil {
		b.Fatal(err)
	}
	base := presetParams(b, "normal")
	var r *FitResult
	for b.Loop() {
		if r, err = FitModel(a, FitOptions{Base: base}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(r.Evaluations), "solves")
	b.ReportMetric(r.RMSPressure, "rms_mmHg")
}
