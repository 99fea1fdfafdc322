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
// testdata/recordings when run with -example-out; see the README there for
// what each holds, its seed and its truth.
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
	mouse := sc.Params
	mouse.HeartRate = 60
	for _, x := range []struct {
		name, volumeCol string
		vFactor         float64
		spec            Spec
	}{
		{"occlusion-synthetic.csv", "volume_ml", 1, Spec{Params: sc.Params, SteadyBeats: 8, OcclusionBeats: 10, OcclusionStep: 0.88, RecoveryBeats: 3,
			Rate: 250, Seed: 7, NoiseP: 0.5, NoiseV: 0.5, DriftP: 0.5}},
		{"steady-synthetic.csv", "volume_ml", 1, Spec{Params: sc.Params, SteadyBeats: 12, Rate: 250, Seed: 8, NoiseP: 0.5, NoiseV: 0.5}},
		{"saline-synthetic.csv", "volume_ml", 1, Spec{Params: sc.Params, SteadyBeats: 28, Rate: 250, Seed: 9, NoiseP: 0.5, NoiseV: 0.5,
			OffsetV: 50, Alpha: 0.8, SalineStart: 6, SalineBeats: 16, SalineGain: 0.25}},
		{"mouse-synthetic.csv", "volume_ul", 1000, Spec{Params: mouse, SteadyBeats: 10, OcclusionBeats: 10, OcclusionStep: 0.88, RecoveryBeats: 4,
			Rate: 2000, Seed: 10, NoiseP: 0.5, NoiseV: 0.3e-3, TimeScale: 0.1, VolumeScale: 1.0 / 3000}},
	} {
		r, err := Make(x.spec)
		if err != nil {
			t.Fatal(err)
		}
		f, err := os.Create(filepath.Join(*exampleOut, x.name))
		if err != nil {
			t.Fatal(err)
		}
		if err := r.WriteCSVScaled(f, "time_s", "pressure_mmhg", x.volumeCol, "", x.vFactor); err != nil {
			t.Fatal(err)
		}
		if err := f.Close(); err != nil {
			t.Fatal(err)
		}
	}
}
