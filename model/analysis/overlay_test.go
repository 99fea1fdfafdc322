package analysis

import (
	"bytes"
	"math"
	"testing"

	"pvcouple/internal/synthrec"
)

// Overlay gives the TUI closed, finite loops of the kept beats
// within their bounds, and a representative steady loop.
func TestOverlay(t *testing.T) {
	spec := occlusion(presetParams(t, "normal"))
	spec.NoiseP, spec.NoiseV = 0.5, 0.5
	sr, err := synthrec.Make(spec)
	if err != nil {
		t.Fatal(err)
	}
	var csv bytes.Buffer
	if err := sr.WriteCSV(&csv, "time_s", "pressure_mmhg", "volume_ml", ""); err != nil {
		t.Fatal(err)
	}
	rec, err := ReadCSV(&csv, "rec.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	a, err := Analyze(rec, Options{})
	if err != nil {
		t.Fatal(err)
	}
	ov := a.Overlay()
	if len(ov.Loops) > len(a.Kept()) || len(ov.Loops) < 15 {
		t.Errorf("%d loops for %d kept beats", len(ov.Loops), len(a.Kept()))
	}
	if ov.Representative < 0 || !ov.Loops[ov.Representative].Steady || ov.ESPVR == nil {
		t.Errorf("representative %d, ESPVR %v", ov.Representative, ov.ESPVR)
	}
	for _, l := range ov.Loops {
		if len(l.V) != len(l.P) || len(l.V) < 100 {
			t.Fatalf("beat %d: %d/%d points", l.Beat, len(l.V), len(l.P))
		}
		for i := range l.V {
			if math.IsNaN(l.V[i]+l.P[i]) || l.V[i] < ov.VMin || l.V[i] > ov.VMax || l.P[i] < ov.PMin || l.P[i] > ov.PMax {
				t.Fatalf("beat %d point %d (%g, %g) outside bounds %+v", l.Beat, i, l.V[i], l.P[i], ov)
			}
		}
	}
}
