package cli

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"math"
	"strconv"
	"strings"
	"testing"
	"time"

	"pvcouple/model"
	"pvcouple/model/sweep"
)

func TestSweepCSV(t *testing.T) {
	code, out, errs := runCLI(t, "sweep", "--vary", "resistance_mmhg_s_per_ml=0.5:1.5:3", "--vary", "heart_rate_bpm=60:90:4", "--preset", "hfref")
	if code != 0 || errs != "" {
		t.Fatalf("exit %d: %s", code, errs)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	head := rows[0]
	want := []string{"resistance_mmhg_s_per_ml", "heart_rate_bpm", "status", "beats"}
	for _, s := range model.MetricSpecs {
		want = append(want, s.Key)
	}
	want = append(want, "error")
	if strings.Join(head, ",") != strings.Join(want, ",") {
		t.Errorf("header\n%v\nwant\n%v", head, want)
	}
	if len(rows) != 13 {
		t.Fatalf("%d rows, want 12 and a header", len(rows)-1)
	}
	col := map[string]int{}
	for i, h := range head {
		col[h] = i
	}
	// The first axis varies slowest.
	for i, r := range rows[1:] {
		wantR := []string{"0.5", "1", "1.5"}[i/4]
		wantHR := []string{"60", "70", "80", "90"}[i%4]
		if r[0] != wantR || r[1] != wantHR || r[col["status"]] != "ok" || r[col["error"]] != "" {
			t.Errorf("row %d: %v", i, r[:4])
		}
		if hr, _ := strconv.ParseFloat(r[col["hr_bpm"]], 64); math.Abs(hr-mustFloat(t, wantHR)) > 1e-9 {
			t.Errorf("row %d: measured HR %v for heart_rate_bpm %s", i, hr, wantHR)
		}
	}
	// A row carries the same numbers as `solve` for its parameters, to the
	// steady-state tolerance (see model/sweep TestPointsMatchColdSolves).
	code, sout, _ := runCLI(t, "solve", "--preset", "hfref", "--set", "resistance_mmhg_s_per_ml=1", "--set", "heart_rate_bpm=80", "--format", "json")
	var doc struct {
		Metrics map[string]*float64 `json:"metrics"`
	}
	if code != 0 || json.Unmarshal([]byte(sout), &doc) != nil {
		t.Fatal("solve failed")
	}
	r := rows[1+1*4+2]
	for _, s := range model.MetricSpecs {
		v := doc.Metrics[s.Key]
		cell := r[col[s.Key]]
		if v == nil {
			if cell != "" {
				t.Errorf("%s: %q, solve gives null", s.Key, cell)
			}
			continue
		}
		if got := mustFloat(t, cell); math.Abs(got-*v) > 1e-4*math.Abs(*v)+1e-9 {
			t.Errorf("%s: sweep %v, solve %v", s.Key, got, *v)
		}
	}
}

func mustFloat(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("%q: %v", s, err)
	}
	return v
}

// A varied Ees replaces the metric of the same key, so no column is doubled.
func TestSweepNoDuplicateColumns(t *testing.T) {
	code, out, _ := runCLI(t, "sweep", "--vary", "ees_mmhg_per_ml=1:2:2")
	head, _ := csv.NewReader(strings.NewReader(out)).Read()
	seen := map[string]bool{}
	for _, h := range head {
		if seen[h] {
			t.Errorf("column %s twice", h)
		}
		seen[h] = true
	}
	if code != 0 || head[0] != "ees_mmhg_per_ml" || !seen["ea_ees_ratio"] {
		t.Errorf("exit %d, header %v", code, head)
	}
}

// Points the model refuses are reported in their rows, with empty (CSV) or
// null (JSON) measurements, and the run still succeeds.
func TestSweepReportsFailedPoints(t *testing.T) {
	args := []string{"sweep", "--set", "filling_pressure_mmhg=2", "--vary", "edpvr_a_mmhg=0.5:10:5"}
	code, out, errs := runCLI(t, args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(errs, "2 of 5 points") || !strings.Contains(errs, "2 invalid") {
		t.Errorf("stderr %q", errs)
	}
	rows, _ := csv.NewReader(strings.NewReader(out)).ReadAll()
	last := rows[5]
	if last[1] != "invalid" || last[3] != "" || !strings.Contains(last[len(last)-1], "filling_pressure_mmhg") {
		t.Errorf("failed row %v", last)
	}
	code, out, _ = runCLI(t, append(args, "--format", "json")...)
	var doc struct {
		Summary map[string]float64            `json:"summary"`
		Vary    []map[string]any              `json:"vary"`
		Points  []map[string]*json.RawMessage `json:"points"`
	}
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, out)
	}
	if len(doc.Points) != 5 || doc.Summary["invalid"] != 2 || doc.Summary["ok"] != 3 || doc.Vary[0]["unit"] != "mmHg" {
		t.Fatalf("summary %v, vary %v, %d points", doc.Summary, doc.Vary, len(doc.Points))
	}
	if p := doc.Points[4]; p["sv_ml"] != nil || p["error"] == nil || string(*p["status"]) != `"invalid"` {
		t.Errorf("failed point %v", p)
	}
	if p := doc.Points[0]; p["sv_ml"] == nil || p["error"] != nil || len(p) != 1+3+len(model.MetricSpecs) {
		t.Errorf("good point has %d members", len(p))
	}
}

func TestSweepBadInput(t *testing.T) {
	for _, c := range []struct {
		args []string
		want []string
	}{
		{nil, []string{"at least one --vary"}},
		{[]string{"--vary", "ees"}, []string{"KEY=FROM:TO:N"}},
		{[]string{"--vary", "ees=1:2:3"}, []string{"ees", "unknown parameter", "ees_mmhg_per_ml"}},
		{[]string{"--vary", "ees_mmhg_per_ml=1:2"}, []string{"FROM:TO:N"}},
		{[]string{"--vary", "ees_mmhg_per_ml=x:2:3"}, []string{`FROM: "x" is not a number`, "allowed 0.2 to 10 mmHg/mL"}},
		{[]string{"--vary", "ees_mmhg_per_ml=1:12:3"}, []string{"TO = 12 is out of range", "allowed 0.2 to 10 mmHg/mL"}},
		{[]string{"--vary", "ees_mmhg_per_ml=NaN:2:3"}, []string{"FROM: \"NaN\" is not a finite number", "mmHg/mL"}},
		{[]string{"--vary", "ees_mmhg_per_ml=1:2:0"}, []string{`N "0"`, "≥ 1"}},
		{[]string{"--vary", "ees_mmhg_per_ml=1:2:1"}, []string{"N = 1", "must be equal"}},
		{[]string{"--vary", "ees_mmhg_per_ml=1:2:2", "--vary", "ees_mmhg_per_ml=1:2:2"}, []string{"varied twice"}},
		{[]string{"--vary", "ees_mmhg_per_ml=1:2:600", "--vary", "heart_rate_bpm=60:90:600"}, []string{"360000 points", "250000"}},
		{[]string{"--vary", "ees_mmhg_per_ml=1:2:2", "--set", "ees_mmhg_per_ml=2"}, []string{"both varied", "--set"}},
		{[]string{"--vary", "ees_mmhg_per_ml=1:2:2", "--format", "xml"}, []string{"--format", "csv, json"}},
		{[]string{"--vary", "ees_mmhg_per_ml=1:2:2", "--workers", "-2"}, []string{"--workers -2"}},
		{[]string{"--vary", "ees_mmhg_per_ml=1:2:2", "more"}, []string{"no arguments"}},
	} {
		code, out, errs := runCLI(t, append([]string{"sweep"}, c.args...)...)
		if code != 2 || out != "" {
			t.Errorf("%v: exit %d, stdout %q", c.args, code, out)
		}
		for _, w := range c.want {
			if !strings.Contains(errs, w) {
				t.Errorf("%v: stderr %q lacks %q", c.args, errs, w)
			}
		}
	}
}

// The bar stays away until a run has lasted progressDelay and promises to
// last progressMinRun, fits the terminal, and is cleared at the end.
func TestProgressBar(t *testing.T) {
	var buf bytes.Buffer
	now := time.Unix(0, 0)
	b := &progressBar{w: &buf, width: 60, label: "sweep", now: func() time.Time { return now }}
	b.update(sweep.Progress{Done: 10, Total: 100, Elapsed: 100 * time.Millisecond})
	b.update(sweep.Progress{Done: 90, Total: 100, Elapsed: 400 * time.Millisecond}) // 0.44 s in all
	if buf.Len() != 0 {
		t.Fatalf("short run drew %q", buf.String())
	}
	b.update(sweep.Progress{Done: 25, Total: 100, Failed: 2, Elapsed: 500 * time.Millisecond})
	line := buf.String()
	b.width = 90
	wide := b.line(sweep.Progress{Done: 25, Total: 100, Failed: 2, Elapsed: 500 * time.Millisecond})
	if !strings.Contains(wide, "1.5s left, 2 without steady state") {
		t.Errorf("wide bar %q", wide)
	}
	b.width = 60
	if !strings.HasPrefix(line, "\rsweep [") || !strings.Contains(line, "25/100 points  25%") ||
		!strings.Contains(line, "1.5s left") {
		t.Errorf("bar %q", line)
	}
	if n := len([]rune(strings.TrimPrefix(line, "\r"))); n > 59 {
		t.Errorf("bar is %d columns on a 60-column terminal", n)
	}
	buf.Reset()
	b.update(sweep.Progress{Done: 30, Total: 100, Elapsed: 550 * time.Millisecond})
	if buf.Len() != 0 {
		t.Error("redrawn within progressRefresh")
	}
	pts := make([]sweep.Point, 100)
	for i := range pts {
		pts[i].Status = sweep.OK
	}
	b.finish(&sweep.Result{Points: pts, Workers: 2, Elapsed: 1234 * time.Millisecond})
	if s := buf.String(); !strings.Contains(s, "\r"+strings.Repeat(" ", 59)+"\r") || !strings.Contains(s, "100 points in 1.2s on 2 workers\n") {
		t.Errorf("finish %q", s)
	}
	// Not a terminal: no bar at all.
	if newProgressBar(&Env{Stderr: &buf}, "sweep") != nil {
		t.Error("bar on a buffer")
	}
}

// Points no heart could give (a ventricle below zero volume from a negative
// V0 and a low filling) are reported invalid with the levers named, never ok.
func TestSweepRefusesImpossibleHearts(t *testing.T) {
	code, out, errs := runCLI(t, "sweep", "--circulation", "held", "--set", "filling_pressure_mmhg=1", "--vary", "v0_ml=-30:0:4")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	rows, _ := csv.NewReader(strings.NewReader(out)).ReadAll()
	for _, r := range rows[1:] {
		ef, _ := strconv.ParseFloat(r[6], 64)
		switch {
		case r[1] == "ok" && !(ef > 0 && ef <= 100):
			t.Errorf("V0 %s: EF %s reported ok", r[0], r[6])
		case r[1] == "invalid" && !strings.Contains(r[len(r)-1], "v0_ml = "):
			t.Errorf("V0 %s: error %q names no lever", r[0], r[len(r)-1])
		}
	}
	if rows[1][1] != "invalid" || rows[4][1] != "ok" {
		t.Errorf("statuses %s … %s, want invalid at V0 −30 and ok at 0", rows[1][1], rows[4][1])
	}
}
