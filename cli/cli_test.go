package cli

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"pvcouple/model"
)

// runCLI runs pvcouple with args and returns exit code, stdout and stderr.
func runCLI(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	env := &Env{Stdin: strings.NewReader(""), Stdout: &out, Stderr: &errb, IsTerminal: func() bool { return false }}
	code := Main(args, env)
	return code, out.String(), errb.String()
}

func TestSolveJSONShape(t *testing.T) {
	code, out, errs := runCLI(t, "solve", "--format", "json", "--set", "heart_rate_bpm=80")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Params  map[string]float64  `json:"params"`
		Metrics map[string]*float64 `json:"metrics"`
		Timing  map[string]float64  `json:"timing"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, out)
	}
	for _, k := range model.Keys() {
		if _, ok := doc.Params[k]; !ok {
			t.Errorf("params lacks %s", k)
		}
	}
	if doc.Params["heart_rate_bpm"] != 80 {
		t.Errorf("--set not applied: heart_rate_bpm %g", doc.Params["heart_rate_bpm"])
	}
	for _, k := range strings.Fields(`edv_ml esv_ml sv_ml ef_pct edp_mmhg esp_mmhg ea_mmhg_per_ml ees_mmhg_per_ml
		ea_ees_ratio co_l_per_min map_mmhg sbp_mmhg dbp_mmhg sw_mmhg_ml pe_mmhg_ml pva_mmhg_ml efficiency
		vo2_ml_per_beat dpdt_max_mmhg_per_s dpdt_min_mmhg_per_s tau_ms ed_wall_stress_kdyn_cm2 es_wall_stress_kdyn_cm2`) {
		if v, ok := doc.Metrics[k]; !ok || v == nil {
			t.Errorf("metrics lacks %s", k)
		}
	}
	if doc.Timing["solve_ms"] <= 0 || doc.Timing["beats"] < 1 {
		t.Errorf("timing %v", doc.Timing)
	}
}

func TestSolveTable(t *testing.T) {
	code, out, _ := runCLI(t, "solve", "--preset", "hfref")
	if code != 0 || !strings.Contains(out, "Scenario hfref") || !strings.Contains(out, "Ea/Ees") || !strings.Contains(out, "mmHg/mL") {
		t.Errorf("exit %d, table:\n%s", code, out)
	}
}

func TestLoopCSV(t *testing.T) {
	code, out, errs := runCLI(t, "loop")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	// Closed: the compartments' pressures and volumes follow, and the volumes
	// sum to the same blood volume at every sample (conservation).
	if got := strings.Join(rows[0], ","); !strings.HasPrefix(got, "t_s,p_lv_mmhg,v_lv_ml,p_ao_mmhg,q_in_ml_s,q_out_ml_s,q_pump_ml_s,p_sa_mmhg,") ||
		!strings.Contains(got, ",v_sv_ml,") || !strings.Contains(got, ",p_ra_mmhg,") || !strings.Contains(got, ",p_la_mmhg,") {
		t.Errorf("header %s", got)
	}
	var first float64
	for i, r := range rows[1:] {
		var sum float64
		for j, name := range rows[0] {
			if strings.HasPrefix(name, "v_") {
				v, _ := strconv.ParseFloat(r[j], 64)
				sum += v
			}
		}
		if i == 0 {
			first = sum
		}
		if math.Abs(sum-first) > 1e-6*first {
			t.Fatalf("sample %d: the volumes sum to %.9g mL, at the first sample %.9g mL", i, sum, first)
		}
	}
	code, held, _ := runCLI(t, "loop", "--circulation", "held")
	if h, _, _ := strings.Cut(held, "\n"); code != 0 || h != "t_s,p_lv_mmhg,v_lv_ml,p_ao_mmhg,q_in_ml_s,q_out_ml_s,q_pump_ml_s" {
		t.Errorf("held header %s", h)
	}
	// 1 kHz over a 70-bpm beat (0.857 s) plus the valve events.
	if n := len(rows) - 1; n < 857 || n > 870 {
		t.Errorf("%d samples", n)
	}
	code, out, _ = runCLI(t, "loop", "--format", "json")
	var doc struct {
		Samples map[string][]float64 `json:"samples"`
	}
	if code != 0 || json.Unmarshal([]byte(out), &doc) != nil || len(doc.Samples["v_lv_ml"]) != len(rows)-1 {
		t.Errorf("loop json: exit %d, %d volume samples", code, len(doc.Samples["v_lv_ml"]))
	}
}

func TestInfoCommands(t *testing.T) {
	for _, c := range []struct {
		args []string
		want []string
	}{
		{[]string{"params"}, []string{"filling_pressure_mmhg", "mmHg", "1", "40", "preload"}},
		{[]string{"presets"}, []string{"invented cases of our own, labelled so", "normal", "hfref", "hfpef", "(default)"}},
		{[]string{"--help"}, []string{"solve", "loop", "not for treating", "clinical judgement"}},
		{[]string{"--version"}, []string{"pvcouple " + Version}},
		{[]string{"solve", "--help"}, []string{"--preset", "--scenario", "--set", "--format"}},
		{nil, []string{"Commands:"}},
	} {
		code, out, errs := runCLI(t, c.args...)
		if code != 0 {
			t.Errorf("%v: exit %d %s", c.args, code, errs)
		}
		for _, w := range c.want {
			if !strings.Contains(out, w) {
				t.Errorf("%v: output lacks %q:\n%s", c.args, w, out)
			}
		}
	}
}

// Bad input exits non-zero with a message naming the key or file, the
// value, and the allowed range and unit; never a panic trace.
func TestBadInput(t *testing.T) {
	dir := t.TempDir()
	broken := filepath.Join(dir, "broken.yaml")
	os.WriteFile(broken, []byte("version: 1\nparams: [\n"), 0o644)
	outOfRange := filepath.Join(dir, "range.yaml")
	os.WriteFile(outOfRange, []byte("version: 1\nbase: normal\nparams:\n  ees_mmhg_per_ml: 40\n"), 0o644)
	cases := []refusal{
		// Impossible hearts from in-range levers: refused, the levers named, in both circulations.
		{[]string{"solve", "--circulation", "held", "--set", "v0_ml=-30", "--set", "filling_pressure_mmhg=1"}, 1,
			[]string{"no physiological beat", "-15.9 mL", "v0_ml = -30 mL", "filling_pressure_mmhg = 1 mmHg"}},
		{[]string{"solve", "--set", "v0_ml=-30", "--set", "filling_pressure_mmhg=1"}, 1, []string{"no physiological beat", "v0_ml = -30 mL", "stressed_volume_ml"}},
		{[]string{"loop", "--circulation", "held", "--set", "v0_ml=-30", "--set", "filling_pressure_mmhg=1"}, 1, []string{"no physiological beat"}},
		{[]string{"solve", "--circulation", "sideways"}, 2, []string{"--circulation", "held", "closed"}},
		{[]string{"solve", "--circulation", "held", "--set", "caval_occlusion_pct=50"}, 2, []string{"caval_occlusion_pct", "acts only in the closed circulation", "--circulation closed"}},
		{[]string{"solve", "--set", "filling_pressure_mmhg=12", "--set", "stressed_volume_ml=1500"}, 2, []string{"give one"}},
		{[]string{"solve", "--set", "hr=80"}, 2, []string{"hr", "unknown parameter", "heart_rate_bpm"}},
		{[]string{"solve", "--set", "heart_rate_bpm=fast"}, 2, []string{"heart_rate_bpm", `"fast" is not a number`, "30 to 180 bpm"}},
		{[]string{"solve", "--set", "heart_rate_bpm=NaN"}, 2, []string{"heart_rate_bpm", "not a finite number", "bpm"}},
		{[]string{"solve", "--set", "ees_mmhg_per_ml=Inf"}, 2, []string{"ees_mmhg_per_ml", "not a finite number", "mmHg/mL"}},
		{[]string{"solve", "--set", "heart_rate_bpm=500"}, 2, []string{"heart_rate_bpm = 500", "out of range", "allowed 30 to 180 bpm"}},
		{[]string{"solve", "--set", "heart_rate_bpm"}, 2, []string{"KEY=VALUE"}},
		{[]string{"solve", "--preset", "athlete"}, 2, []string{`unknown preset "athlete"`, "normal"}},
		{[]string{"solve", "--scenario", filepath.Join(dir, "none.yaml")}, 1, []string{"none.yaml", "no such file"}},
		{[]string{"solve", "--scenario", broken}, 1, []string{"broken.yaml", "not valid YAML"}},
		{[]string{"solve", "--scenario", outOfRange}, 1, []string{"range.yaml:4", "ees_mmhg_per_ml = 40", "allowed 0.2 to 10 mmHg/mL"}},
		{[]string{"solve", "--preset", "normal", "--scenario", broken}, 2, []string{"not both"}},
		{[]string{"solve", "--format", "xml"}, 2, []string{"--format", "xml", "table, json"}},
		{[]string{"solve", "--bogus"}, 2, []string{"bogus"}},
		{[]string{"solve", "extra"}, 2, []string{"no arguments"}},
		{[]string{"frobnicate"}, 2, []string{`unknown command "frobnicate"`, "solve"}},
		// One rule for every way of giving a value.
		{[]string{"solve", "--scenario", ""}, 2, []string{"--scenario is empty"}},
		{[]string{"solve", "--preset", " "}, 2, []string{"--preset is empty"}},
		{[]string{"solve", "--set", "heart_rate_bpm=80", "--set", "heart_rate_bpm=90"}, 2, []string{"--set heart_rate_bpm is given twice", `"80"`, `"90"`}},
		{[]string{"solve", "--set", "heart_rate_bpm=0x50"}, 2, []string{`"0x50" is not a decimal number`, "30 to 180 bpm"}},
		{[]string{"solve", "--set", "heart_rate_bpm=0x1p6"}, 2, []string{`"0x1p6" is not a decimal number`}},
		{[]string{"solve", "--set", "heart_rate_bpm=8_0"}, 2, []string{`"8_0" is not a number`}},
		{[]string{"solve", "--set", "heart_rate_bpm=1e999"}, 2, []string{"not a finite number"}},
	}
	checkRefusals(t, cases)
}

// refusal is a command line that must fail: its exit code and what stderr
// must say.
type refusal struct {
	args []string
	code int
	want []string
}

// checkRefusals runs each command line and checks that it fails with the
// exit code, writes nothing to stdout, names what stderr must name, and shows
// no panic trace.
func checkRefusals(t *testing.T, cases []refusal) {
	t.Helper()
	for _, c := range cases {
		code, out, errs := runCLI(t, c.args...)
		if code != c.code {
			t.Errorf("%v: exit %d, want %d (stderr %q)", c.args, code, c.code, errs)
		}
		if out != "" {
			t.Errorf("%v: wrote to stdout on error: %q", c.args, out)
		}
		for _, w := range c.want {
			if !strings.Contains(errs, w) {
				t.Errorf("%v: stderr %q lacks %q", c.args, errs, w)
			}
		}
		if strings.Contains(errs, "goroutine") || strings.Contains(errs, "panic") {
			t.Errorf("%v: panic trace: %s", c.args, errs)
		}
	}
}
