package cli

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pvcouple/internal/synthrec"
	"pvcouple/presets"
)

// writeSpec writes a synthetic recording (made by the model; the spec's seed
// is its noise) under the given time, pressure and volume header, volumes
// multiplied by vFactor.
func writeSpec(t *testing.T, spec synthrec.Spec, header [3]string, vFactor float64) string {
	t.Helper()
	sr, err := synthrec.Make(spec)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "rec.csv")
	if err := sr.WriteFile(path, header[0], header[1], header[2], vFactor); err != nil {
		t.Fatal(err)
	}
	return path
}

// runOK runs the command line and returns its output, failing the test on a
// non-zero exit.
func runOK(t *testing.T, args ...string) string {
	t.Helper()
	code, out, errs := runCLI(t, args...)
	if code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, errs)
	}
	return out
}

// normalSpec is 10 steady beats of the normal preset at 1 kHz (seed 1).
func normalSpec(t *testing.T) synthrec.Spec {
	sc, err := presets.Get("normal")
	if err != nil {
		t.Fatal(err)
	}
	return synthrec.Spec{Params: sc.Params, SteadyBeats: 10, OcclusionStep: 0.88, Rate: 1000, Seed: 1, NoiseP: 0.5, NoiseV: 0.5}
}

// A steady recording has no ESPVR: Ees is the single-beat estimate, and the
// JSON and the table say so beside Ees and Ea/Ees, with a caution.
func TestAnalyzeLabelsEstimates(t *testing.T) {
	path := writeRecording(t, 10, 0)
	out := runOK(t, "analyze", path, "--format", "json")
	var doc struct {
		EesSource string           `json:"ees_source"`
		Known     map[string]any   `json:"known"`
		Median    map[string]any   `json:"steady_median"`
		Beats     []map[string]any `json:"beats"`
		Notes     []string         `json:"notes"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.EesSource != "single-beat" || doc.Known["ees_basis"] != basisEstimate || doc.Median["ees_basis"] != basisEstimate {
		t.Errorf("source %q, known %v, median basis %v", doc.EesSource, doc.Known["ees_basis"], doc.Median["ees_basis"])
	}
	for _, b := range doc.Beats {
		if b["kept"] == true && b["ees_basis"] != basisEstimate {
			t.Errorf("beat %v: basis %v", b["beat"], b["ees_basis"])
		}
	}
	if !strings.Contains(strings.Join(doc.Notes, " "), "Ea/Ees from it is an estimate") {
		t.Errorf("no caution in the notes: %v", doc.Notes)
	}
	out = runOK(t, "analyze", path)
	if !strings.Contains(out, "(estimate: Ees from one beat, Chen 2001 — caution)") || !strings.Contains(out, "an estimate (Chen et al. 2001") {
		t.Errorf("table lacks the estimate labels:\n%s", out)
	}
}

// A mouse-sized recording (the model's beat scaled to 600 bpm and 1/3000 of
// the volume, 2 kHz, µL column) is shown in µL in the table, and JSON keeps
// its per-mL keys with the values in mL.
func TestAnalyzeSmallHeartUnits(t *testing.T) {
	spec := normalSpec(t)
	spec.Params.HeartRate = 60
	spec.OcclusionBeats, spec.RecoveryBeats = 10, 4
	spec.TimeScale, spec.VolumeScale, spec.Rate, spec.NoiseV = 0.1, 1.0/3000, 2000, 0.3e-3
	path := writeSpec(t, spec, [3]string{"time_s", "pressure_mmhg", "LV Volume [µL]"}, 1000)
	out := runOK(t, "analyze", path, "--species", "mouse")
	for _, want := range []string{"Volumes in µL", "EDV µL", "mmHg/µL", "(600 bpm)"} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
	out = runOK(t, "analyze", path, "--species", "mouse", "--format", "json")
	var doc struct {
		Recording struct {
			Shown   string `json:"volumes_shown_in"`
			Species string `json:"species"`
		} `json:"recording"`
		Median map[string]any `json:"steady_median"`
		ESPVR  struct {
			Ees float64 `json:"ees_mmhg_per_ml"`
		} `json:"espvr"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	edv, _ := doc.Median["edv_ml"].(float64)
	truth := spec.Params.Ees / spec.VolumeScale
	if doc.Recording.Shown != "µL" || doc.Recording.Species != "mouse" || !(edv > 0.02 && edv < 0.08) || math.Abs(doc.ESPVR.Ees/truth-1) > 0.1 {
		t.Errorf("recording %+v, EDV %v mL, Ees %.4g mmHg/mL (truth %.4g)", doc.Recording, doc.Median["edv_ml"], doc.ESPVR.Ees, truth)
	}
}

// calibrate finds the parallel volume of a synthetic saline run (the model's
// beats through a conductance signal with Vp 50 mL and α 0.8, seed 1), writes
// the file atomically, refuses to replace it without --force, and analyze
// reads it back; a bad file is refused with its line and column.
func TestCalibrateAndAnalyze(t *testing.T) {
	spec := normalSpec(t)
	spec.SteadyBeats = 28
	spec.SalineStart, spec.SalineBeats, spec.SalineGain = 6, 16, 0.25
	spec.OffsetV, spec.Alpha = 50, 0.8
	path := writeSpec(t, spec, [3]string{"time_s", "pressure_mmhg", "volume_ml"}, 1)
	sc, _ := presets.Get("normal")
	ref, err := synthrec.Make(synthrec.Spec{Params: sc.Params, SteadyBeats: 3, Rate: 1000})
	if err != nil {
		t.Fatal(err)
	}
	hi, lo := math.Inf(-1), math.Inf(1)
	for _, v := range ref.Beats[0].VLV {
		hi, lo = math.Max(hi, v), math.Min(lo, v)
	}
	sv := formatCSV(hi - lo)
	cal := filepath.Join(t.TempDir(), "cal.yaml")
	out := runOK(t, "calibrate", path, "--reference-sv", sv, "-o", cal, "--format", "json")
	var doc struct {
		Vp    float64 `json:"parallel_volume_ml"`
		Alpha float64 `json:"alpha"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if math.Abs(doc.Vp/50-1) > 0.05 || math.Abs(doc.Alpha/0.8-1) > 0.05 {
		t.Errorf("Vp %.4g mL (set 50), α %.4g (set 0.8)", doc.Vp, doc.Alpha)
	}
	if code, _, errs := runCLI(t, "calibrate", path, "-o", cal); code != 1 || !strings.Contains(errs, "file exists") {
		t.Errorf("replaced without --force: exit %d %s", code, errs)
	}
	out = runOK(t, "analyze", path, "--calibration", cal, "--format", "json")
	var an struct {
		Recording struct {
			Cal map[string]any `json:"calibration"`
		} `json:"recording"`
		Median map[string]any `json:"steady_median"`
	}
	if err := json.Unmarshal([]byte(out), &an); err != nil {
		t.Fatal(err)
	}
	if edv := an.Median["edv_ml"].(float64); math.Abs(edv/ref.Beats[0].Metrics.EDV-1) > 0.05 || an.Recording.Cal["file"] != cal {
		t.Errorf("calibrated EDV %.4g mL, the model's %.4g; calibration %v", edv, ref.Beats[0].Metrics.EDV, an.Recording.Cal)
	}
	bad := filepath.Join(t.TempDir(), "bad.yaml")
	os.WriteFile(bad, []byte("version: 1\nparallel_volume_ml: 10\nalpha: 0.05\n"), 0o644)
	if code, _, errs := runCLI(t, "analyze", path, "--calibration", bad); code != 1 || !strings.Contains(errs, "bad.yaml:3:8: column \"alpha\": 0.05 is out of range; allowed 0.1 to 5") {
		t.Errorf("bad calibration: exit %d %s", code, errs)
	}
	if code, _, errs := runCLI(t, "calibrate", writeRecording(t, 10, 0)); code != 1 || !strings.Contains(errs, "no saline bolus") {
		t.Errorf("steady file calibrated: exit %d %s", code, errs)
	}
}
