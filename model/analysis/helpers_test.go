package analysis

import (
	"bytes"
	"testing"

	"pvcouple/internal/synthrec"
	"pvcouple/model"
	"pvcouple/presets"
)

// presetParams returns a built-in preset's parameters.
func presetParams(tb testing.TB, name string) model.Params {
	tb.Helper()
	sc, err := presets.Get(name)
	if err != nil {
		tb.Fatal(err)
	}
	return sc.Params
}

// occlusion is a synthetic recording made by the model (synthrec): steady
// beats, a caval occlusion of our own lowering the filling pressure by 12 %
// per beat for 10 beats, and recovery.
func occlusion(p model.Params) synthrec.Spec {
	return synthrec.Spec{Params: p, SteadyBeats: 8, OcclusionBeats: 10, OcclusionStep: 0.88, RecoveryBeats: 4, Rate: 1000, Seed: 1}
}

// makeRecording runs a spec and reads it back through ReadCSV, as a file
// would be.
func makeRecording(tb testing.TB, spec synthrec.Spec, o ReadOptions) (*synthrec.Recording, *Recording) {
	tb.Helper()
	sr, err := synthrec.Make(spec)
	if err != nil {
		tb.Fatal(err)
	}
	var buf bytes.Buffer
	if err := sr.WriteCSV(&buf, "time_s", "pressure_mmhg", "volume_ml", ""); err != nil {
		tb.Fatal(err)
	}
	rec, err := ReadCSV(&buf, "synthetic.csv", o)
	if err != nil {
		tb.Fatal(err)
	}
	return sr, rec
}

// analysedSteady is a steady synthetic recording of a preset (the occlusion
// spec without its occlusion; noise SD in mmHg and mL, and its seed), read
// and analysed with the default options.
func analysedSteady(tb testing.TB, preset string, noise float64, seed uint64) (*synthrec.Recording, *Recording, *Analysis) {
	tb.Helper()
	spec := occlusion(presetParams(tb, preset))
	spec.OcclusionBeats, spec.RecoveryBeats = 0, 0
	spec.NoiseP, spec.NoiseV, spec.Seed = noise, noise, seed
	sr, rec := makeRecording(tb, spec, ReadOptions{})
	a, err := Analyze(rec, Options{})
	if err != nil {
		tb.Fatal(err)
	}
	return sr, rec, a
}
