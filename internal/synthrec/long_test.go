package synthrec

import (
	"flag"
	"os"
	"testing"

	"pvcouple/presets"
)

var longOut = flag.String("long-out", "", "write a 60-minute recording to this file")

func TestLongRecording(t *testing.T) {
	if *longOut == "" {
		t.Skip("no -long-out")
	}
	sc, _ := presets.Get("normal")
	spec := Spec{Params: sc.Params, SteadyBeats: 120, OcclusionBeats: 10, OcclusionStep: 0.88, RecoveryBeats: 120, Repeats: 18, Rate: 1000, Seed: 11, NoiseP: 0.5, NoiseV: 0.5}
	f, _ := os.Create(*longOut)
	if err := Stream(spec, f, "time_s", "pressure_mmhg", "volume_ml", 1); err != nil {
		t.Fatal(err)
	}
	f.Close()
}
