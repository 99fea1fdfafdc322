package model_test

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"testing"
	"time"

	"pvcouple/model"
	"pvcouple/presets"
)

// The reference solutions in testdata/reference were computed by
// reference.py, which integrates the same equations with SciPy's solve_ivp
// (DOP853, rtol 1e-11, Debian's python3-scipy), reaches steady state by plain
// repetition of beats and measures the last beat with numpy. They are an
// outside check of the integrator, the steady-state solver and every metric.

const referenceDir = "../testdata/reference"

// referenceTol is the agreement bound: 0.5 % relative.
const referenceTol = 0.005

type referenceDoc struct {
	Params  map[string]float64 `json:"params"`
	Metrics map[string]float64 `json:"metrics"`
	Timing  struct {
		SolveMS float64 `json:"solve_ms"`
		Beats   int     `json:"beats"`
	} `json:"timing"`
}

func compareWithReference(t *testing.T, name string, ref referenceDoc) {
	t.Helper()
	var p model.Params
	for _, s := range model.Specs {
		v, ok := ref.Params[s.Key]
		if !ok {
			t.Fatalf("%s: reference lacks parameter %s", name, s.Key)
		}
		s.Set(&p, v)
	}
	st := solve(t, p)
	for _, ms := range model.MetricSpecs {
		want, ok := ref.Metrics[ms.Key]
		if !ok {
			t.Errorf("%s: reference lacks metric %s", name, ms.Key)
			continue
		}
		got := ms.Get(&st.Metrics)
		if d := math.Abs(got-want) / math.Max(math.Abs(want), 1e-9); !(d <= referenceTol) {
			t.Errorf("%s: %s = %.6g, SciPy reference %.6g (%.2g%% apart)", name, ms.Key, got, want, 100*d)
		}
	}
}

func TestAgainstSciPyGoldenFiles(t *testing.T) {
	for _, name := range presets.Names() {
		data, err := os.ReadFile(filepath.Join(referenceDir, name+".json"))
		if err != nil {
			t.Errorf("preset %s has no reference solution: %v (run testdata/reference/regen.sh)", name, err)
			continue
		}
		var ref referenceDoc
		if err := json.Unmarshal(data, &ref); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		sc, err := presets.Get(name)
		if err != nil {
			t.Fatal(err)
		}
		for _, s := range model.Specs {
			if ref.Params[s.Key] != s.Get(sc.Params) {
				t.Errorf("%s: reference was computed for %s = %g, preset now has %g (run testdata/reference/regen.sh)",
					name, s.Key, ref.Params[s.Key], s.Get(sc.Params))
			}
		}
		compareWithReference(t, name, ref)
	}
}

// scipyPython returns a python3 that can import SciPy, or "".
func scipyPython() string {
	for _, py := range []string{"/usr/bin/python3", "python3"} {
		if exec.Command(py, "-c", "import scipy").Run() == nil {
			return py
		}
	}
	return ""
}

// TestAgainstSciPyLive runs the reference script now, on a scenario that is
// not a preset, so the check does not rest on committed files alone.
func TestAgainstSciPyLive(t *testing.T) {
	if testing.Short() {
		t.Skip("runs SciPy")
	}
	py := scipyPython()
	if py == "" {
		t.Skip("python3 with SciPy not found (Debian: apt-get install python3-scipy)")
	}
	p := normalParams(t)
	p.Ees, p.Resistance, p.HeartRate, p.FillingPressure = 1.7, 1.3, 95, 14
	params := map[string]float64{}
	for _, s := range model.Specs {
		params[s.Key] = s.Get(p)
	}
	in, _ := json.Marshal(map[string]any{"params": params})
	cmd := exec.Command(py, filepath.Join(referenceDir, "reference.py"))
	cmd.Stdin = bytes.NewReader(in)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	start := time.Now()
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("reference.py: %v\n%s", err, stderr.String())
	}
	var ref referenceDoc
	if err := json.Unmarshal(out, &ref); err != nil {
		t.Fatal(err)
	}
	compareWithReference(t, "live", ref)
	t.Logf("SciPy reference: %.0f ms for %d beats (wall %v)", ref.Timing.SolveMS, ref.Timing.Beats, time.Since(start))
}
