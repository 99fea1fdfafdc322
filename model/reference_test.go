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
// reference.py, an implementation of both circulations of its own, written
// from docs/science.md: it integrates the equations with SciPy's solve_ivp
// (DOP853, rtol 1e-11, valve switches as terminal events, Debian's
// python3-scipy), reaches steady state by plain repetition of beats (not
// Newton shooting) and measures the last beat with numpy. They are an outside
// check of the integrator, the steady-state solver and every metric.

const referenceDir = "../testdata/reference"

// referenceTol is the agreement bound of every metric: 0.5 % relative.
const referenceTol = 0.005

// calibrationTol bounds the relative difference between a closed reference's
// stressed volume and the one pvcouple calibrates for the preset today: far
// looser than the calibration's own accuracy, far tighter than any change of
// the preset would move it.
const calibrationTol = 1e-4

type referenceDoc struct {
	Circulation string              `json:"circulation"`
	Params      map[string]*float64 `json:"params"`
	Metrics     map[string]*float64 `json:"metrics"` // null where the circulation has no such measurement
	Timing      struct {
		SolveMS float64 `json:"solve_ms"`
		Beats   int     `json:"beats"`
	} `json:"timing"`
}

// referenceFile is the golden file of a preset in a circulation.
func referenceFile(name string, c model.Circulation) string {
	if c == model.Closed {
		return filepath.Join(referenceDir, name+".closed.json")
	}
	return filepath.Join(referenceDir, name+".json")
}

// referenceParams rebuilds the parameters a reference was computed for.
func referenceParams(t *testing.T, name string, ref referenceDoc) model.Params {
	t.Helper()
	c, err := model.ParseCirculation(ref.Circulation)
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	p := model.Params{Circulation: c}
	for _, s := range model.Specs {
		v := ref.Params[s.Key]
		if v == nil {
			if s.ActsIn(c) {
				t.Fatalf("%s: reference lacks parameter %s", name, s.Key)
			}
			continue
		}
		s.Set(&p, *v)
	}
	return p
}

// compareWithReference solves the reference's parameters with pvcouple and
// compares every metric.
func compareWithReference(t *testing.T, name string, ref referenceDoc) {
	t.Helper()
	st := solve(t, referenceParams(t, name, ref))
	for _, ms := range model.MetricSpecs {
		want, ok := ref.Metrics[ms.Key]
		if !ok {
			t.Errorf("%s: reference lacks metric %s", name, ms.Key)
			continue
		}
		got := ms.Get(&st.Metrics)
		switch {
		case want == nil && math.IsNaN(got):
		case want == nil:
			t.Errorf("%s: %s = %.6g, SciPy reference has none", name, ms.Key, got)
		case math.IsNaN(got):
			t.Errorf("%s: %s is NaN, SciPy reference %.6g", name, ms.Key, *want)
		default:
			if d := math.Abs(got-*want) / math.Max(math.Abs(*want), 1e-9); !(d <= referenceTol) {
				t.Errorf("%s: %s = %.6g, SciPy reference %.6g (%.2g%% apart)", name, ms.Key, got, *want, 100*d)
			}
		}
	}
}

// checkReferenceIsCurrent reports a reference computed for other values than
// the preset's in circulation c. A closed preset's stressed volume is the
// one calibrated at load; the reference's measured mean LAP must then equal
// the preset's filling pressure, the calibration's target.
func checkReferenceIsCurrent(t *testing.T, name string, c model.Circulation, ref referenceDoc) {
	t.Helper()
	if ref.Circulation != c.String() {
		t.Errorf("%s: reference is of the %q circulation, want %s", name, ref.Circulation, c)
		return
	}
	p := inCirculation(t, name, c)
	for _, s := range model.Specs {
		if !s.ActsIn(c) {
			continue
		}
		now := s.Get(p)
		v := ref.Params[s.Key]
		if v == nil {
			t.Errorf("%s: reference lacks parameter %s", name, s.Key)
			continue
		}
		switch {
		case c == model.Closed && s.Key == "stressed_volume_ml":
			if relDiff(*v, now) > calibrationTol {
				t.Errorf("%s: reference was computed at %s = %.6g, the preset now calibrates to %.6g (run testdata/reference/regen.sh)",
					name, s.Key, *v, now)
			}
		case c == model.Closed && s.Key == "filling_pressure_mmhg":
			lap := ref.Metrics["lap_mean_mmhg"]
			if lap == nil || relDiff(*lap, now) > referenceTol {
				t.Errorf("%s: the calibrated volume gives SciPy a mean LAP of %v mmHg, the preset's filling pressure is %g",
					name, lap, now)
			}
		case *v != now:
			t.Errorf("%s: reference was computed for %s = %g, preset now has %g (run testdata/reference/regen.sh)",
				name, s.Key, *v, now)
		}
	}
}

func readReference(t *testing.T, file string) (referenceDoc, bool) {
	t.Helper()
	var ref referenceDoc
	data, err := os.ReadFile(file)
	if err != nil {
		t.Errorf("no reference solution: %v (run testdata/reference/regen.sh)", err)
		return ref, false
	}
	if err := json.Unmarshal(data, &ref); err != nil {
		t.Errorf("%s: %v", file, err)
		return ref, false
	}
	return ref, true
}

func TestAgainstSciPyGoldenFiles(t *testing.T) {
	for _, c := range circulations {
		for _, name := range presets.Names() {
			t.Run(c.String()+"/"+name, func(t *testing.T) {
				ref, ok := readReference(t, referenceFile(name, c))
				if !ok {
					return
				}
				checkReferenceIsCurrent(t, name, c, ref)
				compareWithReference(t, name, ref)
			})
		}
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

// runReference runs reference.py on p and returns its answer.
func runReference(t *testing.T, py string, p model.Params) referenceDoc {
	t.Helper()
	params := map[string]float64{}
	for _, s := range model.Specs {
		if s.ActsIn(p.Circulation) {
			params[s.Key] = s.Get(p)
		}
	}
	in, err := json.Marshal(map[string]any{"circulation": p.Circulation.String(), "params": params})
	if err != nil {
		t.Fatal(err)
	}
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
	t.Logf("SciPy reference: %.0f ms for %d beats (wall %v)", ref.Timing.SolveMS, ref.Timing.Beats, time.Since(start))
	return ref
}

// TestAgainstSciPyLive runs the reference script now, in each circulation, on
// scenarios that are not presets (one of them with valve lesions and support
// devices), so the check does not rest on committed files alone.
func TestAgainstSciPyLive(t *testing.T) {
	if testing.Short() {
		t.Skip("runs SciPy")
	}
	py := scipyPython()
	if py == "" {
		t.Skip("python3 with SciPy not found (Debian: apt-get install python3-scipy)")
	}
	held := inCirculation(t, "normal", model.Held)
	held.Ees, held.Resistance, held.HeartRate, held.FillingPressure = 1.7, 1.3, 95, 14

	// Closed: weaker, faster, more loaded, with more blood, a slower
	// conduction, a stiffer lung circulation and a half-inflated caval balloon.
	closed := inCirculation(t, "normal", model.Closed)
	closed.Ees, closed.Resistance, closed.HeartRate = 1.8, 1.1, 96
	closed.StressedVolume += 150
	closed.PRInterval, closed.PulmonaryResistance, closed.RVEes = 170, 0.12, 0.8
	closed.AtrialEmax, closed.CavalOcclusion, closed.Zc = 0.4, 30, 0.07

	// With lesions and devices: stenosis and regurgitation of both valves, a
	// pump, and a balloon at 1:2 (held) and 1:1 (closed).
	heldDev := inCirculation(t, "normal", model.Held)
	heldDev.AorticValveArea, heldDev.MitralRegurgitantArea, heldDev.PumpFlow = 0.9, 0.25, 2
	heldDev.BalloonVolume, heldDev.BalloonRatio = 35, 2
	closedDev := inCirculation(t, "hfref", model.Closed)
	closedDev.AorticRegurgitantArea, closedDev.MitralValveArea, closedDev.PumpFlow, closedDev.PumpHead = 0.2, 1.5, 3, 120
	closedDev.BalloonVolume = 40

	for _, p := range []model.Params{held, closed, heldDev, closedDev} {
		name := p.Circulation.String()
		if p.HasDevice() {
			name += "/devices"
		}
		t.Run(name, func(t *testing.T) {
			t.Parallel()
			compareWithReference(t, "live "+name, runReference(t, py, p))
		})
	}
}
