package cli

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"pvcouple/model"
	"pvcouple/model/analysis"
	"pvcouple/presets"
)

func TestProtocolListAndShow(t *testing.T) {
	code, out, errs := runCLI(t, "protocol", "list")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, n := range []string{"preload-reduction", "volume-challenge", "afterload-challenge", "inotrope-challenge", "rate-steps"} {
		if !strings.Contains(out, n) {
			t.Errorf("list lacks %s:\n%s", n, out)
		}
	}
	if !regexp.MustCompile(`(?m)^preload-reduction +25 +25 `).MatchString(out) || !strings.HasPrefix(out, "Built-in protocols: invented by us, labelled so") {
		t.Errorf("list should give the beats of each protocol:\n%s", out)
	}
	code, out, _ = runCLI(t, "protocol", "show", "preload-reduction")
	src, _ := presets.ProtocolSource("preload-reduction")
	if code != 0 || out != string(src) || !strings.Contains(out, "# ") {
		t.Errorf("show: exit %d, output differs from the built-in's source with comments:\n%s", code, out)
	}
	code, out, _ = runCLI(t, "protocol", "--help")
	if code != 0 || !strings.Contains(out, "protocol run NAME|FILE") || !strings.Contains(out, "{factor: F}") {
		t.Errorf("protocol --help: exit %d\n%s", code, out)
	}
	// The example in the help is a protocol file as it stands.
	i, j := strings.Index(out, "  version: 1"), strings.LastIndex(out, "      beats: 5\n")
	if i < 0 || j < i {
		t.Fatalf("help has no example protocol:\n%s", out)
	}
	pr, err := presets.ParseProtocol([]byte(out[i:j+len("      beats: 5\n")]), "help")
	if err != nil || len(pr.Steps) != 6 || pr.TotalBeats(model.Held) != 23 || pr.TotalBeats(model.Closed) != 23 {
		t.Fatalf("the help's example protocol: %v, %+v", err, pr)
	}
	for _, c := range []model.Circulation{model.Held, model.Closed} {
		sc, _ := presets.Get("normal")
		if err := sc.SetCirculation(c); err != nil {
			t.Fatal(err)
		}
		if _, err := pr.Expand(sc.Params); err != nil {
			t.Errorf("the help's example protocol in the %s circulation: %v", c, err)
		}
	}
}

// protocolCSV runs a protocol and returns its CSV rows, header first.
func protocolCSV(t *testing.T, args ...string) [][]string {
	t.Helper()
	code, out, errs := runCLI(t, append([]string{"protocol", "run"}, args...)...)
	if code != 0 {
		t.Fatalf("protocol run %v: exit %d: %s", args, code, errs)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return rows
}

// The per-beat CSV: the columns the study plan names, one row per beat,
// beat onsets spaced by the beat period and the lever schedule of the
// built-in computed by hand: held, the filling pressure 8 mmHg falling by
// 0.4 mmHg a beat to 3.2, back to 8 in three beats of 1.6 mmHg; closed, the
// cava 70 % occluded for 12 beats and open again.
func TestProtocolRunCSV(t *testing.T) {
	closed := protocolCSV(t, "preload-reduction")
	if h := closed[0]; h[len(h)-1] != "lever_caval_occlusion_pct" || len(closed) != 26 {
		t.Fatalf("closed run: levers %v, %d rows", h[len(h)-1], len(closed))
	}
	for i, r := range closed[1:] {
		want := "0"
		if i >= 5 && i < 17 {
			want = "70"
		}
		if r[len(r)-1] != want || (want == "70") != (r[1] == "caval occlusion") {
			t.Errorf("closed beat %d: %s, caval occlusion %s %%, want %s", i+1, r[1], r[len(r)-1], want)
		}
	}
	rows := protocolCSV(t, "preload-reduction", "--circulation", "held")
	want := []string{"beat", "step", "t_start_s"}
	for _, m := range model.MetricSpecs {
		want = append(want, m.Key)
	}
	want = append(want, "lever_filling_pressure_mmhg")
	if strings.Join(rows[0], ",") != strings.Join(want, ",") {
		t.Fatalf("header\n%v\nwant\n%v", rows[0], want)
	}
	if len(rows) != 26 {
		t.Fatalf("%d beats, want 25", len(rows)-1)
	}
	fp := []float64{8, 8, 8, 8, 8, 7.6, 7.2, 6.8, 6.4, 6, 5.6, 5.2, 4.8, 4.4, 4, 3.6, 3.2, 4.8, 6.4, 8, 8, 8, 8, 8, 8}
	steps := "baseline×5 occlusion×12 release×3 recovery×5"
	var got []string
	for i, r := range rows[1:] {
		if r[0] != strconv.Itoa(i+1) {
			t.Errorf("row %d: beat %s", i+1, r[0])
		}
		if len(got) == 0 || !strings.HasPrefix(got[len(got)-1], r[1]+"×") {
			got = append(got, r[1]+"×0")
		}
		last := got[len(got)-1]
		n, _ := strconv.Atoi(last[strings.Index(last, "×")+len("×"):])
		got[len(got)-1] = r[1] + "×" + strconv.Itoa(n+1)
		ts, _ := strconv.ParseFloat(r[2], 64)
		if math.Abs(ts-float64(i)*60/70) > 0.6e-6 { // printed to the microsecond
			t.Errorf("beat %d starts at %s s, want %g", i+1, r[2], float64(i)*60/70)
		}
		lever, _ := strconv.ParseFloat(r[len(r)-1], 64)
		if math.Abs(lever-fp[i]) > 1e-9 {
			t.Errorf("beat %d: filling pressure %s, want %g", i+1, r[len(r)-1], fp[i])
		}
	}
	if strings.Join(got, " ") != steps {
		t.Errorf("steps %s, want %s", strings.Join(got, " "), steps)
	}
}

// JSON carries the same per-beat keys with the names of the protocol and the
// scenario, the steps, and an ESPVR fitted to the run's loops that finds the
// model's own Ees and V0 within 3 % (docs/science.md §6, iterated fit).
func TestProtocolRunJSON(t *testing.T) {
	code, out, errs := runCLI(t, "protocol", "run", "preload-reduction", "--preset", "hypertensive", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Protocol string             `json:"protocol"`
		Scenario string             `json:"scenario"`
		Params   map[string]float64 `json:"params"`
		Levers   []string           `json:"levers"`
		Steps    []map[string]any   `json:"steps"`
		Beats    []map[string]any   `json:"beats"`
		Fit      *struct {
			Ees float64 `json:"ees_mmhg_per_ml"`
			V0  float64 `json:"v0_ml"`
		} `json:"espvr_fit"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Protocol != "preload-reduction" || doc.Scenario != "hypertensive" || len(doc.Beats) != 25 || len(doc.Steps) != 4 ||
		len(doc.Levers) != 1 || doc.Params["ees_mmhg_per_ml"] != 3.2 {
		t.Fatalf("document: protocol %q scenario %q, %d beats, %d steps, levers %v", doc.Protocol, doc.Scenario, len(doc.Beats), len(doc.Steps), doc.Levers)
	}
	keys := []string{"beat", "step", "t_start_s", "lever_caval_occlusion_pct"}
	for _, m := range model.MetricSpecs {
		keys = append(keys, m.Key)
	}
	for _, k := range keys {
		if doc.Beats[3][k] == nil {
			t.Errorf("beat lacks %s", k)
		}
	}
	if doc.Beats[3]["step"] != "baseline" || doc.Beats[3]["beat"] != 4.0 {
		t.Errorf("beat 4: %v", doc.Beats[3])
	}
	if doc.Fit == nil {
		t.Fatal("no ESPVR fit")
	}
	if math.Abs(doc.Fit.Ees-3.2)/3.2 > 0.03 || math.Abs(doc.Fit.V0-5)/5 > 0.03 {
		t.Errorf("ESPVR fit Ees %g (model 3.2), V0 %g (model 5)", doc.Fit.Ees, doc.Fit.V0)
	}
	// A protocol that changes Ees has no single ESPVR to fit.
	_, out, _ = runCLI(t, "protocol", "run", "inotrope-challenge", "--format", "json")
	if !strings.Contains(out, `"espvr_fit": null`) || !strings.Contains(out, "changes ees_mmhg_per_ml") {
		t.Errorf("inotrope-challenge should not fit one ESPVR")
	}
}

// readSamples reads a --samples file.
func readSamples(t *testing.T, path string) (tm, p, v []float64) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(rows[0], ",") != "time_s,pressure_mmhg,volume_ml" {
		t.Fatalf("samples header %v", rows[0])
	}
	for _, r := range rows[1:] {
		x := make([]float64, 3)
		for j := range x {
			if x[j], err = strconv.ParseFloat(r[j], 64); err != nil {
				t.Fatal(err)
			}
		}
		tm, p, v = append(tm, x[0]), append(p, x[1]), append(v, x[2])
	}
	return tm, p, v
}

// --samples writes what a catheter recording holds: pressure and volume on
// one uniform 1 kHz clock across the run, no sample repeated at a beat
// boundary. Cut into beats at the onsets of the per-beat output, the
// recording alone gives back the model's ESPVR by the iterated fit
// (docs/science.md §6) within 3 %.
func TestProtocolRunSamples(t *testing.T) {
	path := filepath.Join(t.TempDir(), "run.csv")
	rows := protocolCSV(t, "preload-reduction", "--preset", "vasodilated", "--samples", path)
	tm, p, v := readSamples(t, path)
	sc, _ := presets.Get("vasodilated")
	period := 60 / sc.Params.HeartRate
	if want := int(math.Floor(25*period*1000+1e-6)) + 1; len(tm) != want {
		t.Errorf("%d samples over 25 beats of %.4f s, want %d", len(tm), period, want)
	}
	for i := range tm {
		if tm[i] != float64(i)/1000 {
			t.Fatalf("sample %d at %v s, want %v", i, tm[i], float64(i)/1000)
		}
	}
	var loops []model.BeatSamples
	j := 0
	for _, r := range rows[1:] {
		if r[1] != "caval occlusion" {
			continue
		}
		t0, _ := strconv.ParseFloat(r[2], 64)
		for j < len(tm) && tm[j] < t0 {
			j++
		}
		k := j
		for k < len(tm) && tm[k] < t0+period {
			k++
		}
		loops = append(loops, model.BeatSamples{T: tm[j:k], P: p[j:k], V: v[j:k]})
	}
	fit, err := analysis.FitESPVR(loops, 0)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(fit.Ees-sc.Params.Ees)/sc.Params.Ees > 0.03 || math.Abs(fit.V0-sc.Params.V0)/sc.Params.V0 > 0.03 {
		t.Errorf("ESPVR from the recording: Ees %g (model %g), V0 %g (model %g)", fit.Ees, sc.Params.Ees, fit.V0, sc.Params.V0)
	}

	// The file is not replaced without --force; with it, it is.
	code, out, errs := runCLI(t, "protocol", "run", "rate-steps", "--samples", path)
	if code != 1 || out != "" || !strings.Contains(errs, "file exists") {
		t.Errorf("overwrite without --force: exit %d, stderr %q", code, errs)
	}
	if tm2, _, _ := readSamples(t, path); len(tm2) != len(tm) {
		t.Error("refused run changed the samples file")
	}
	if code, _, errs := runCLI(t, "protocol", "run", "rate-steps", "--samples", path, "--force"); code != 0 {
		t.Fatalf("--force: exit %d: %s", code, errs)
	}
	if tm2, _, _ := readSamples(t, path); len(tm2) == len(tm) {
		t.Error("--force did not replace the samples file")
	}
}

// A protocol file and a scenario file together, with --set on top.
func TestProtocolRunFiles(t *testing.T) {
	dir := t.TempDir()
	proto := filepath.Join(dir, "pace.yaml")
	os.WriteFile(proto, []byte("version: 1\nsteps:\n  - {label: rest, hold: 2}\n  - label: paced\n    set: {heart_rate_bpm: 100}\n    beats: 3\n"), 0o644)
	scen := filepath.Join(dir, "me.yaml")
	os.WriteFile(scen, []byte("version: 1\nname: me\nbase: hfref\nparams: {heart_rate_bpm: 60}\n"), 0o644)
	code, out, errs := runCLI(t, "protocol", "run", proto, "--scenario", scen, "--set", "resistance_mmhg_s_per_ml=1", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Protocol, Scenario string
		Params             map[string]float64
		Beats              []map[string]any
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Protocol != "pace" || doc.Scenario != "me" || len(doc.Beats) != 5 || doc.Params["heart_rate_bpm"] != 60 ||
		doc.Params["resistance_mmhg_s_per_ml"] != 1 || doc.Beats[1]["hr_bpm"].(float64) != 60 || math.Abs(doc.Beats[2]["hr_bpm"].(float64)-100) > 1e-9 {
		t.Errorf("protocol %q scenario %q params %v, %d beats", doc.Protocol, doc.Scenario, doc.Params, len(doc.Beats))
	}
	// A run without a load change has no ESPVR to fit.
	hold := filepath.Join(dir, "hold.yaml")
	os.WriteFile(hold, []byte("version: 1\nsteps:\n  - {label: rest, hold: 8}\n"), 0o644)
	_, out, _ = runCLI(t, "protocol", "run", hold, "--format", "json")
	if !strings.Contains(out, `"espvr_fit": null`) || !strings.Contains(out, "preload did not change enough") {
		t.Errorf("a steady run should not fit an ESPVR")
	}
}

func TestProtocolBadInput(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.yaml")
	os.WriteFile(bad, []byte("version: 1\nsteps:\n  - label: x\n    ramp: {heart_rate_bpm: 80}\n"), 0o644)
	deep := filepath.Join(dir, "deep.yaml")
	os.WriteFile(deep, []byte("version: 1\nsteps:\n  - label: deep\n    scale: {filling_pressure_mmhg: 0.1}\n"), 0o644)
	existing := filepath.Join(dir, "old.csv")
	os.WriteFile(existing, []byte("old"), 0o644)
	cases := []refusal{
		{[]string{"protocol"}, 2, []string{"run, list or show"}},
		{[]string{"protocol", "play"}, 2, []string{`"play"`, "run, list or show"}},
		{[]string{"protocol", "run"}, 2, []string{"one protocol", "protocol list"}},
		{[]string{"protocol", "run", "a", "b"}, 2, []string{"one protocol"}},
		{[]string{"protocol", "run", "caval"}, 1, []string{`unknown protocol "caval"`, "preload-reduction", ".yaml"}},
		{[]string{"protocol", "run", filepath.Join(dir, "none.yaml")}, 1, []string{"none.yaml", "no such file"}},
		{[]string{"protocol", "run", bad}, 1, []string{"bad.yaml:3", "steps[1].beats", "ramp needs"}},
		{[]string{"protocol", "run", deep, "--preset", "hypovolemic", "--circulation", "held"}, 1, []string{"deep.yaml:4", "filling_pressure_mmhg = 0.4", "allowed 1 to 40 mmHg", "scenario hypovolemic"}},
		{[]string{"protocol", "run", deep, "--preset", "hypovolemic"}, 1, []string{"deep.yaml:4", "closed circulation does not hold the filling pressure", "caval_occlusion_pct", "circulation: held"}},
		{[]string{"protocol", "run", "rate-steps", "--format", "xml"}, 2, []string{"--format", "csv, json"}},
		{[]string{"protocol", "run", "rate-steps", "--samples", filepath.Join(dir, "s.txt")}, 2, []string{"ends in .csv"}},
		{[]string{"protocol", "run", "rate-steps", "--force"}, 2, []string{"--force only applies with --samples"}},
		{[]string{"protocol", "run", "rate-steps", "--samples", existing}, 1, []string{"old.csv", "file exists", "--force"}},
		{[]string{"protocol", "run", "rate-steps", "--set", "heart_rate_bpm=fast"}, 2, []string{"heart_rate_bpm", "30 to 180 bpm"}},
		{[]string{"protocol", "run", "rate-steps", "--preset", "athlete"}, 2, []string{`unknown preset "athlete"`}},
		{[]string{"protocol", "show"}, 2, []string{"one built-in protocol name", "rate-steps"}},
		{[]string{"protocol", "show", "nosuch"}, 1, []string{`unknown protocol "nosuch"`}},
		{[]string{"protocol", "list", "x"}, 2, []string{"no arguments"}},
	}
	checkRefusals(t, cases)
	if data, _ := os.ReadFile(existing); string(data) != "old" {
		t.Errorf("existing samples file changed to %q", data)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 3 {
		t.Errorf("failed runs left files behind: %v", entries)
	}
}
