package cli

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat"

	"pvcouple/model"
	"pvcouple/presets"
)

// writeRecording writes a synthetic recording made by the model (normal
// preset; steady beats, then a caval occlusion of our own when occlusion > 0;
// seed 1) and returns its path.
func writeRecording(t *testing.T, steady, occlusion int, header ...string) string {
	t.Helper()
	spec := normalSpec(t)
	spec.SteadyBeats, spec.OcclusionBeats = steady, occlusion
	if len(header) == 0 {
		header = []string{"time_s", "pressure_mmhg", "volume_ml"}
	}
	return writeSpec(t, spec, [3]string(header), 1)
}

func TestAnalyzeJSON(t *testing.T) {
	out := runOK(t, "analyze", writeRecording(t, 8, 10), "--format", "json")
	var doc struct {
		Beats []map[string]any `json:"beats"`
		ESPVR *struct {
			Ees    float64 `json:"ees_mmhg_per_ml"`
			V0     float64 `json:"v0_ml"`
			R2     float64 `json:"r2"`
			Beats  int     `json:"beats"`
			Method string  `json:"method"`
		} `json:"espvr"`
		EDPVR      map[string]any `json:"edpvr"`
		SingleBeat struct {
			Chen  map[string]any `json:"chen_2001"`
			Klotz map[string]any `json:"klotz_2006"`
		} `json:"single_beat"`
		PRSW *struct {
			Mw float64 `json:"mw_mmhg"`
			Vw float64 `json:"vw_ml"`
			R2 float64 `json:"r2"`
		} `json:"prsw"`
		Runs []struct {
			First int `json:"first_beat"`
			Last  int `json:"last_beat"`
		} `json:"runs"`
		SteadyMedian map[string]any `json:"steady_median"`
		V0Source     string         `json:"v0_source"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("not JSON: %v", err)
	}
	if doc.ESPVR == nil || doc.ESPVR.Beats < 5 || doc.ESPVR.Method != "iterated-max-elastance-linear" || doc.V0Source != "espvr" {
		t.Errorf("espvr %+v, v0 source %q", doc.ESPVR, doc.V0Source)
	}
	if ees, _ := doc.SingleBeat.Chen["ees_mmhg_per_ml"].(float64); doc.EDPVR == nil || ees <= 0 || doc.SingleBeat.Klotz["beta"] == nil ||
		doc.SingleBeat.Chen["basis"] == nil || doc.SingleBeat.Klotz["v0_basis"] == nil {
		t.Errorf("edpvr %v, single beat %+v", doc.EDPVR, doc.SingleBeat)
	}
	if doc.SteadyMedian["ees_basis"] != basisMeasured {
		t.Errorf("steady median Ees basis %v", doc.SteadyMedian["ees_basis"])
	}
	// PRSW (Glower 1985) from the output agrees within 2 % with our own fit
	// of SW on EDV (gonum) to the run's beats as printed.
	if len(doc.Runs) != 1 || doc.PRSW == nil {
		t.Fatalf("runs %v, prsw %v", doc.Runs, doc.PRSW)
	}
	var edv, sw []float64
	for _, b := range doc.Beats {
		if n := int(b["beat"].(float64)); n >= doc.Runs[0].First && n <= doc.Runs[0].Last && b["kept"] == true {
			edv, sw = append(edv, b["edv_ml"].(float64)), append(sw, b["sw_mmhg_ml"].(float64))
		}
	}
	alpha, beta := stat.LinearRegression(edv, sw, nil, false)
	if math.Abs(doc.PRSW.Mw/beta-1) > 0.02 || math.Abs(doc.PRSW.Vw/(-alpha/beta)-1) > 0.02 {
		t.Errorf("prsw %+v; SW on EDV of the printed beats: Mw %.4g, Vw %.4g", doc.PRSW, beta, -alpha/beta)
	}
	if len(doc.Beats) < 17 {
		t.Fatalf("%d beats", len(doc.Beats))
	}
	for _, b := range doc.Beats {
		for _, k := range append([]string{"beat", "start_s", "end_s", "kept", "drop_reason"}, metricKeys()...) {
			if _, ok := b[k]; !ok {
				t.Fatalf("beat row lacks %s: %v", k, b)
			}
		}
		if b["kept"] == true && (b["map_mmhg"] != nil || b["edv_ml"] == nil) {
			t.Errorf("kept beat: MAP %v (LV-only: want null), EDV %v", b["map_mmhg"], b["edv_ml"])
		}
		if b["kept"] == false && b["drop_reason"] == nil {
			t.Errorf("dropped beat without a reason: %v", b)
		}
	}
}

func metricKeys() []string {
	var k []string
	for _, s := range model.MetricSpecs {
		k = append(k, s.Key)
	}
	return k
}

func TestAnalyzeTable(t *testing.T) {
	path := writeRecording(t, 8, 10, "Time (ms)", "LV Pressure (mmHg)", "LV Volume [ml]")
	// The header says ms but the values are seconds: refused with a hint.
	code, _, errs := runCLI(t, "analyze", path)
	if code != 1 || !strings.Contains(errs, "--time-unit s") {
		t.Errorf("exit %d: %s", code, errs)
	}
	code, out, errs := runCLI(t, "analyze", path, "--time-unit", "s")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"ESPVR (iterated-max-elastance-linear", "EDPVR", "PRSW", "dP/dt max–EDV", "Emax(t)", "Chen et al. 2001", "an estimate",
		"Klotz et al. 2006", "dropped: incomplete", "kept, run 1", "EDV mL", "Warning: column \"Time (ms)\" is named in ms"} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
}

func TestAnalyzeBadInput(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.csv")
	os.WriteFile(bad, []byte("time_s,pressure_mmhg,volume_ml\n0,10,abc\n"), 0o644)
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"analyze"}, 2, "needs a recording"},
		{[]string{"analyze", "a.csv", "b.csv"}, 2, "one recording"},
		{[]string{"analyze", filepath.Join(dir, "none.csv")}, 1, "no such file"},
		{[]string{"analyze", bad}, 1, `bad.csv:2:6: column "volume_ml": "abc" is not a number`},
		{[]string{"analyze", bad, "--format", "xml"}, 2, "--format"},
		{[]string{"analyze", bad, "--smooth-ms", "5000"}, 2, "--smooth-ms"},
		{[]string{"analyze", writeRecording(t, 8, 0), "--smooth-ms", "500"}, 2, "for this recording"},
		{[]string{"analyze", bad, "--species", "cat"}, 2, "--species \"cat\": allowed human, pig, dog, sheep, rat, mouse"},
		{[]string{"analyze", bad, "--alpha", "9"}, 2, "--alpha 9: allowed 0.1 to 5"},
		{[]string{"analyze", bad, "--rate", "6000"}, 2, "--rate 6000: allowed 200 to 5000 Hz"},
		{[]string{"analyze", bad, "--parallel-volume", "10", "--volume-offset", "5"}, 2, "not both"},
		{[]string{"analyze", bad, "--calibration", "c.yaml", "--alpha", "1"}, 2, "not both"},
		{[]string{"analyze", bad, "--espvr", "cubic"}, 2, "--espvr"},
	} {
		code, _, errs := runCLI(t, c.args...)
		if code != c.code || !strings.Contains(errs, c.want) || strings.Contains(errs, "goroutine") {
			t.Errorf("%v: exit %d, stderr %q; want %d and %q", c.args, code, errs, c.code, c.want)
		}
	}
}

func TestFitWritesScenario(t *testing.T) {
	path := writeRecording(t, 10, 0)
	out := filepath.Join(t.TempDir(), "fitted.yaml")
	code, stdout, errs := runCLI(t, "fit", path, "-o", out, "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Residual map[string]float64 `json:"residual"`
		Fitted   []struct {
			Key, Note string
			Value     float64
		} `json:"fitted"`
		ScenarioFile string `json:"scenario_file"`
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Fitted) != 8 || doc.Residual["rms_pressure_mmhg"] > 2 || doc.ScenarioFile != out {
		t.Errorf("fit output %+v", doc)
	}
	sc, err := presets.LoadScenario(out)
	if err != nil {
		t.Fatal(err)
	}
	if sc.Baseline == nil || !strings.Contains(sc.Notes, "Fitted by pvcouple fit") || !strings.Contains(sc.Notes, "rec.csv") {
		t.Errorf("scenario: baseline %v, notes %q", sc.Baseline, sc.Notes)
	}
	// The scenario opens in the other commands.
	if code, _, errs := runCLI(t, "solve", "--scenario", out); code != 0 {
		t.Errorf("solve --scenario: exit %d: %s", code, errs)
	}
	// No overwrite without --force.
	code, _, errs = runCLI(t, "fit", path, "-o", out)
	if code != 1 || !strings.Contains(errs, "--force") {
		t.Errorf("overwrite: exit %d: %s", code, errs)
	}
	code, table, errs := runCLI(t, "fit", path, "-o", out, "--force")
	if code != 0 || !strings.Contains(table, "DETERMINACY") || !strings.Contains(table, "Wrote") {
		t.Errorf("--force: exit %d: %s\n%s", code, errs, table)
	}
}

func TestFitRefusesOcclusionOnly(t *testing.T) {
	path := writeRecording(t, 2, 10)
	code, _, errs := runCLI(t, "fit", path)
	if code != 1 || !strings.Contains(errs, "steady beats") {
		t.Errorf("exit %d: %s", code, errs)
	}
}
