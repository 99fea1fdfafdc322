package presets

import (
	"errors"
	"strings"
	"testing"

	"pvcouple/model"
)

// The schedule of a protocol that uses every step kind, against values
// computed by hand from the normal preset in the held circulation (FP 8 mmHg,
// R 0.85, HR 70, Ees 2.5, C 1.5). A ramp over N beats moves k/N of the way on its k-th beat; a factor
// applies to the value at the step's start, `initial` to the run's start.
func TestExpandMatchesHandComputedSchedule(t *testing.T) {
	doc := protoHead + `  - {label: rest, hold: 2}
  - label: fall
    ramp: {filling_pressure_mmhg: {factor: 0.4}}
    beats: 4
  - label: double
    scale: {resistance_mmhg_s_per_ml: 2, filling_pressure_mmhg: 2}
    beats: 2
  - label: pace
    set: {heart_rate_bpm: 90, filling_pressure_mmhg: initial}
  - label: unpace
    ramp: {heart_rate_bpm: initial}
    beats: 2
  - label: drug
    ramp: {ees_mmhg_per_ml: 4, compliance_ml_per_mmhg: {factor: 0.5}}
    beats: 3
`
	pr, err := ParseProtocol([]byte(doc), "p.yaml")
	if err != nil {
		t.Fatal(err)
	}
	sc := heldPreset(t, "normal")
	pl, err := pr.Expand(sc.Params)
	if err != nil {
		t.Fatal(err)
	}
	//            FP    R     HR  Ees  C     step
	want := [][6]float64{
		{8, 0.85, 70, 2.5, 1.5, 0},
		{8, 0.85, 70, 2.5, 1.5, 0},
		{6.8, 0.85, 70, 2.5, 1.5, 1},
		{5.6, 0.85, 70, 2.5, 1.5, 1},
		{4.4, 0.85, 70, 2.5, 1.5, 1},
		{3.2, 0.85, 70, 2.5, 1.5, 1},
		{6.4, 1.7, 70, 2.5, 1.5, 2},
		{6.4, 1.7, 70, 2.5, 1.5, 2},
		{8, 1.7, 90, 2.5, 1.5, 3},
		{8, 1.7, 80, 2.5, 1.5, 4},
		{8, 1.7, 70, 2.5, 1.5, 4},
		{8, 1.7, 70, 3, 1.25, 5},
		{8, 1.7, 70, 3.5, 1, 5},
		{8, 1.7, 70, 4, 0.75, 5},
	}
	if len(pl.Params) != len(want) || len(pl.Steps) != len(want) {
		t.Fatalf("%d beats planned, want %d", len(pl.Params), len(want))
	}
	// The ramps' fractions k/N are exact here except thirds: 2.5 + 1.5·(1/3)
	// may differ from 3 in the last bit.
	const tol = 1e-12
	for i, w := range want {
		p := pl.Params[i]
		got := [6]float64{p.FillingPressure, p.Resistance, p.HeartRate, p.Ees, p.Compliance, float64(pl.Steps[i])}
		for j := range got {
			if d := got[j] - w[j]; d > tol || d < -tol {
				t.Errorf("beat %d: got FP, R, HR, Ees, C, step = %v, want %v", i+1, got, w)
				break
			}
		}
		rest := p
		rest.FillingPressure, rest.Resistance, rest.HeartRate, rest.Ees, rest.Compliance = sc.Params.FillingPressure,
			sc.Params.Resistance, sc.Params.HeartRate, sc.Params.Ees, sc.Params.Compliance
		if rest != sc.Params {
			t.Errorf("beat %d: a lever no step names changed: %+v", i+1, p)
		}
	}
	if got := pl.First; len(got) != 6 || got[0] != 0 || got[1] != 2 || got[2] != 6 || got[3] != 8 || got[4] != 9 || got[5] != 11 {
		t.Errorf("first beats of the steps %v", got)
	}
	if pl.Label(0) != "rest" || pl.Label(13) != "drug" || pl.Initial != sc.Params {
		t.Errorf("labels %q %q", pl.Label(0), pl.Label(13))
	}
}

func TestExpandRefusesLeversOutOfRange(t *testing.T) {
	sc := heldPreset(t, "normal")
	cases := []struct {
		doc  string
		want []string
	}{
		{"  - label: occlude\n    ramp: {filling_pressure_mmhg: {factor: 0.05}}\n    beats: 3\n",
			[]string{"p.yaml:5", "steps[1].ramp.filling_pressure_mmhg", "from filling_pressure_mmhg = 8", "= 0.4", "allowed 1 to 40 mmHg"}},
		{"  - {label: a, hold: 1}\n  - label: up\n    scale: {heart_rate_bpm: 3}\n",
			[]string{"p.yaml:6", "steps[2].scale.heart_rate_bpm", "heart_rate_bpm = 210", "30 to 180 bpm"}},
		{"  - label: stiff\n    ramp: {filling_pressure_mmhg: 1, edpvr_a_mmhg: 5}\n    beats: 3\n",
			[]string{"p.yaml:4", "steps[1]", `step "stiff", beat 3 of the run`, "fill only", "mL"}},
		{"  - label: occlude\n    ramp: {caval_occlusion_pct: 80}\n    beats: 3\n",
			[]string{"p.yaml:5", "steps[1].ramp.caval_occlusion_pct", "acts only in the closed circulation", "circulation: closed"}},
	}
	for _, c := range cases {
		pr, err := ParseProtocol([]byte(protoHead+c.doc), "p.yaml")
		if err != nil {
			t.Fatal(err)
		}
		_, err = pr.Expand(sc.Params)
		var fe *FileError
		if !errors.As(err, &fe) {
			t.Errorf("%q: got %v, want a *FileError", c.doc, err)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%q lacks %q", err.Error(), w)
			}
		}
	}
	// A closed run does not hold the filling pressure: the step must say it is for held runs.
	closed, _ := Get("normal")
	pr, _ := ParseProtocol([]byte(protoHead+"  - label: fall\n    ramp: {filling_pressure_mmhg: 5}\n    beats: 3\n"), "p.yaml")
	if _, err := pr.Expand(closed.Params); err == nil || !strings.Contains(err.Error(), "p.yaml:5") ||
		!strings.Contains(err.Error(), "caval_occlusion_pct") || !strings.Contains(err.Error(), "circulation: held") {
		t.Errorf("filling pressure in a closed run: %v", err)
	}
	pr, _ = GetProtocol("preload-reduction")
	bad := sc.Params
	bad.HeartRate = 500
	if _, err := pr.Expand(bad); err == nil || !strings.Contains(err.Error(), "heart_rate_bpm = 500") {
		t.Errorf("invalid starting parameters: %v", err)
	}
}

// heldPreset returns a built-in preset moved to the held circulation.
func heldPreset(t *testing.T, name string) *Scenario {
	t.Helper()
	sc, err := Get(name)
	if err != nil {
		t.Fatal(err)
	}
	if err := sc.SetCirculation(model.Held); err != nil {
		t.Fatal(err)
	}
	return sc
}
