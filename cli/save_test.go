package cli

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pvcouple/presets"
)

// solveJSON runs solve with args and returns its params and metrics as raw JSON.
func solveJSON(t *testing.T, args ...string) (params, metrics string) {
	t.Helper()
	code, out, errs := runCLI(t, append([]string{"solve", "--format", "json"}, args...)...)
	if code != 0 {
		t.Fatalf("solve %v: exit %d: %s", args, code, errs)
	}
	var doc map[string]json.RawMessage
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	return string(doc["params"]), string(doc["metrics"])
}

// A scenario saved by solve --save solves to exactly the same numbers when
// loaded with --scenario: every parameter and every measurement, to the bit
// (JSON numbers are written as the shortest decimal that reads back exactly).
func TestSolveSaveRoundTripIsExact(t *testing.T) {
	path := filepath.Join(t.TempDir(), "study.yaml")
	sets := []string{"--preset", "hfpef", "--set", "heart_rate_bpm=83.7", "--set", "filling_pressure_mmhg=17.123456789012345"}
	p1, m1 := solveJSON(t, append(sets, "--save", path)...)
	p2, m2 := solveJSON(t, "--scenario", path)
	if p1 != p2 || m1 != m2 {
		t.Errorf("saved scenario solves differently:\n%s\n%s\n%s\n%s", p1, p2, m1, m2)
	}
	if !strings.Contains(p1, `"heart_rate_bpm": 83.7`) {
		t.Errorf("--set not applied before saving: %s", p1)
	}
	sc, err := presets.LoadScenario(path)
	if err != nil {
		t.Fatal(err)
	}
	if sc.Name != "study" || !strings.Contains(sc.Notes, "from preset hfpef with --set heart_rate_bpm=83.7") ||
		!strings.Contains(sc.Description, "heart_rate_bpm=83.7") {
		t.Errorf("saved scenario does not say where it came from: %+v", sc)
	}
}

// The saved scenario keeps the baseline of the scenario it came from.
func TestSolveSaveKeepsBaseline(t *testing.T) {
	dir := t.TempDir()
	src := filepath.Join(dir, "src.yaml")
	os.WriteFile(src, []byte("version: 1\nname: src\nbase: normal\nparams:\n  ees_mmhg_per_ml: 3\nbaseline:\n  ees_mmhg_per_ml: 2\n"), 0o644)
	out := filepath.Join(dir, "out.yaml")
	if code, _, errs := runCLI(t, "solve", "--scenario", src, "--set", "resistance_mmhg_s_per_ml=1.1", "--save", out); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	sc, err := presets.LoadScenario(out)
	if err != nil {
		t.Fatal(err)
	}
	if sc.Baseline == nil || sc.Baseline.Ees != 2 || sc.Baseline.Resistance != 0.85 || sc.Params.Ees != 3 || sc.Params.Resistance != 1.1 {
		t.Errorf("params %+v, baseline %+v", sc.Params, sc.Baseline)
	}
}

func TestSolveSaveRefusesToOverwrite(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "keep.yaml")
	os.WriteFile(path, []byte("keep me"), 0o644)
	code, out, errs := runCLI(t, "solve", "--save", path)
	if code != 1 || out != "" || !strings.Contains(errs, "file exists") || !strings.Contains(errs, "--force") {
		t.Errorf("exit %d, stdout %q, stderr %q", code, out, errs)
	}
	if data, _ := os.ReadFile(path); string(data) != "keep me" {
		t.Errorf("file changed to %q", data)
	}
	if code, _, errs := runCLI(t, "solve", "--save", path, "--force"); code != 0 {
		t.Fatalf("--force: exit %d: %s", code, errs)
	}
	if _, err := presets.LoadScenario(path); err != nil {
		t.Errorf("forced save unreadable: %v", err)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"solve", "--save", filepath.Join(dir, "s.json")}, "ends in .yaml"},
		{[]string{"solve", "--force"}, "--force only applies with --save"},
		{[]string{"solve", "--save", filepath.Join(dir, "nodir", "s.yaml")}, "nodir"},
		{[]string{"solve", "--set", "heart_rate_bpm=999", "--save", filepath.Join(dir, "bad.yaml")}, "heart_rate_bpm = 999"},
	} {
		code, out, errs := runCLI(t, c.args...)
		if code == 0 || out != "" || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stdout %q, stderr %q (want %q)", c.args, code, out, errs, c.want)
		}
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("refused saves left files: %v", entries)
	}
}
