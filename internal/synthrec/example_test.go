package synthrec

import (
	"flag"
	"os"
	"path/filepath"
	"testing"

	"pvcouple/presets"
)

var exampleOut = flag.String("example-out", "", "write the example recordings to this directory")

// TestExampleRecordings writes the synthetic example recordings kept in
// testdata/recordings when run with -example-out; see the README there.
//
//	go test ./internal/synthrec -run TestExampleRecordings -example-out ../../testdata/recordings
func TestExampleRecordings(t *testing.T) {
	if *exampleOut == "" {
		t.Skip("no -example-out")
	}
	sc, err := presets.Get("normal")
	if err != nil {
		t.Fatal(err)
	}
	for name, spec := range map[string]Spec{
		"occlusion-synthetic.csv": {Params: sc.Params, SteadyBeats: 8, OcclusionBeats: 10, OcclusionStep: 0.88, RecoveryBeats: 3,
			Rate: 250, Seed: 7, NoiseP: 0.5, NoiseV: 0.5, DriftP: 0.5},
		"steady-synthetic.csv": {Params: sc.Params, SteadyBeats: 12, Rate: 250, Seed: 8, NoiseP: 0.5, NoiseV: 0.5},
	} {
		r, err := Make(spec)
		if err != nil {
			t.Fatal(err)
		}
		f, err := os.Create(filepath.Join(*exampleOut, name))
		if err != nil {
			t.Fatal(err)
		}
		if err := r.WriteCSV(f, "time_s", "pressure_mmhg", "volume_ml", ""); err != nil {
			t.Fatal(err)
		}
		if err := f.Close(); err != nil {
			t.Fatal(err)
		}
	}
}
