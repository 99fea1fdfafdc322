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
