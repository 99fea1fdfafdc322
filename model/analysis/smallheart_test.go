package analysis

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"pvcouple/internal/synthrec"
)

// scaledHeart is a synthetic recording of a heart of another size: the
// model's normal beat at hr bpm with times scaled by ts and volumes by vs,
// sampled at rate Hz, written with volumes in µL when ul is set. Its truth
// is Ees/vs, V0·vs and hr/ts.
func scaledHeart(tb testing.TB, hr, ts, vs, rate float64, ul bool, seed uint64, o ReadOptions) (synthrec.Spec, *synthrec.Recording, *Recording) {
	tb.Helper()
	p := presetParams(tb, "normal")
	p.HeartRate = hr
	spec := occlusion(p)
	spec.TimeScale, spec.VolumeScale, spec.Rate, spec.Seed = ts, vs, rate, seed
	// Noise as a share of the heart's size: 0.5 mmHg, and 0.7 % of EDV in
	// volume (0.3 µL for a mouse of 45 µL; 1 mL in a human ventricle of 140).
	spec.NoiseP, spec.NoiseV = 0.5, 0.9*vs
	sr, err := synthrec.Make(spec)
	if err != nil {
		tb.Fatal(err)
	}
	var buf bytes.Buffer
	col, f := "volume_ml", 1.0
	if ul {
		col, f = "volume_ul", 1000
	}
	if err := sr.WriteCSVScaled(&buf, "time_s", "pressure_mmhg", col, "", f); err != nil {
		tb.Fatal(err)
	}
	rec, err := ReadCSV(&buf, "small.csv", o)
	if err != nil {
		tb.Fatal(err)
	}
	return spec, sr, rec
}

// A mouse-sized synthetic recording (600 bpm, 2 kHz, volumes in µL; the
// model's beat at 60 bpm scaled by 0.1 in time and 1/3000 in volume, seeds
// 1–3): at least 75 % of the beats are kept and the occlusion's Ees is within
// 10 % of the truth, with the species hint and without; volumes are shown in
// µL.
func TestMouseSizedRecording(t *testing.T) {
	mouse, err := SpeciesByName("mouse")
	if err != nil {
		t.Fatal(err)
	}
	for seed := uint64(1); seed <= 3; seed++ {
		for _, sp := range []*Species{mouse, nil} {
			spec, sr, rec := scaledHeart(t, 60, 0.1, 1.0/3000, 2000, true, seed, ReadOptions{Species: sp})
			a, err := Analyze(rec, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if k := len(a.Kept()); float64(k) < 0.75*float64(len(sr.Beats)) {
				t.Errorf("seed %d: %d of %d beats kept", seed, k, len(sr.Beats))
			}
			truth := spec.Params.Ees / spec.VolumeScale
			if len(a.Runs) != 1 || a.Runs[0].ESPVR == nil || math.Abs(a.Runs[0].ESPVR.Ees/truth-1) > 0.1 {
				t.Errorf("seed %d: runs %v, Ees truth %.4g mmHg/mL; notes %v", seed, a.Runs, truth, a.Notes)
			}
			if a.Unit.Name != "µL" || math.Abs(60/a.Period-600) > 6 {
				t.Errorf("seed %d: unit %q, %.4g bpm", seed, a.Unit.Name, 60/a.Period)
			}
		}
	}
}

// Heart rates from 30 to 800 bpm and sampling up to 5 kHz: each synthetic
// recording (the model's beat, scaled in time and volume where the model's
// own range ends) has its beats found and its Ees recovered within 5 %.
func TestRatesAcrossSpecies(t *testing.T) {
	for _, c := range []struct {
		hr, ts, vs, rate float64
	}{{30, 1, 1, 1000}, {180, 1, 1, 500}, {60, 0.4 / 3, 1.0 / 300, 2000}, {60, 0.075, 1.0 / 3000, 5000}, {60, 0.075, 1.0 / 3000, 2000}} {
		spec, sr, rec := scaledHeart(t, c.hr, c.ts, c.vs, c.rate, c.vs < 1, 1, ReadOptions{})
		a, err := Analyze(rec, Options{})
		if err != nil {
			t.Fatalf("%+v: %v", c, err)
		}
		bpm := c.hr / c.ts
		if math.Abs(60/a.Period/bpm-1) > 0.01 || float64(len(a.Kept())) < 0.75*float64(len(sr.Beats)) {
			t.Errorf("%.0f bpm at %g Hz: period %.4g s, %d of %d kept", bpm, c.rate, a.Period, len(a.Kept()), len(sr.Beats))
		}
		truth := spec.Params.Ees / c.vs
		if len(a.Runs) != 1 || a.Runs[0].ESPVR == nil || math.Abs(a.Runs[0].ESPVR.Ees/truth-1) > 0.05 {
			t.Errorf("%.0f bpm at %g Hz: runs %v, Ees truth %.4g", bpm, c.rate, a.Runs, truth)
		}
	}
}

// A species hint refuses volumes in the wrong unit and warns of a rate
// outside the species' range.
func TestSpeciesHint(t *testing.T) {
	mouse, _ := SpeciesByName("Mouse")
	human, _ := SpeciesByName("human")
	if _, err := SpeciesByName("cat"); err == nil {
		t.Error("unknown species accepted")
	}
	// A mouse recording with its µL values in a column read as mL.
	p := presetParams(t, "normal")
	spec := occlusion(p)
	spec.TimeScale, spec.VolumeScale, spec.Rate = 0.1, 1.0/3000, 2000
	sr, err := synthrec.Make(spec)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := sr.WriteCSVScaled(&buf, "time_s", "pressure_mmhg", "volume", "", 1000); err != nil {
		t.Fatal(err)
	}
	data := buf.String()
	if _, err := ReadCSV(bytes.NewBufferString(data), "m.csv", ReadOptions{Species: mouse}); err == nil || !strings.Contains(err.Error(), "look like µL") {
		t.Errorf("mouse µL read as mL: %v", err)
	}
	// A human recording analysed as a mouse: the rate is far off.
	_, rec := makeRecording(t, occlusion(p), ReadOptions{Species: human})
	if _, err := Analyze(rec, Options{}); err != nil {
		t.Fatal(err)
	}
	_, rec = makeRecording(t, occlusion(p), ReadOptions{Species: &Species{Name: "test", MinHR: 300, MaxHR: 700, MinEDV: 50, MaxEDV: 300, Source: "test"}})
	if _, err := Analyze(rec, Options{}); err == nil || !strings.Contains(err.Error(), "outside the") {
		t.Errorf("rate outside the species' search: %v", err)
	}
}
