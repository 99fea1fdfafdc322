package presets

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"testing"

	"pvcouple/model"
)

func TestSaveLoadRoundTripIsExact(t *testing.T) {
	dir := t.TempDir()
	for i, n := range append(Names(), Names()...) {
		sc, err := Get(n)
		if err != nil {
			t.Fatal(err)
		}
		if i >= len(Names()) {
			if err := sc.SetCirculation(model.Held); err != nil {
				t.Fatal(err)
			}
			n += "-held"
		}
		sc.Params.Ees = 2.123456789012345 // not a short decimal
		if sc.Params.Circulation == model.Closed {
			// A closed scenario keeps its filling pressure as the mean LAP its volume gives.
			st, err := model.NewSolver().SteadyState(sc.Params, nil)
			if err != nil {
				t.Fatal(err)
			}
			sc.Params = st.Settled()
		}
		base := sc.Params
		base.HeartRate = 61
		if base.Circulation == model.Closed {
			st, err := model.NewSolver().SteadyState(base, nil)
			if err != nil {
				t.Fatal(err)
			}
			base = st.Settled()
		}
		sc.Baseline = &base
		path := filepath.Join(dir, n+".yaml")
		if err := SaveScenario(path, sc, false); err != nil {
			t.Fatal(err)
		}
		back, err := LoadScenario(path)
		if err != nil {
			t.Fatalf("%s: saved file does not load: %v", n, err)
		}
		if back.Params != sc.Params || *back.Baseline != *sc.Baseline || back.Name != sc.Name ||
			back.Description != sc.Description || back.Notes != sc.Notes {
			t.Errorf("%s: round trip changed the scenario:\n%+v\n%+v", n, sc, back)
		}
		a, err := model.NewSolver().SteadyState(sc.Params, nil)
		if err != nil {
			t.Fatal(err)
		}
		b, err := model.NewSolver().SteadyState(back.Params, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, ms := range model.MetricSpecs {
			x, y := ms.Get(&a.Metrics), ms.Get(&b.Metrics)
			if x != y && !(math.IsNaN(x) && math.IsNaN(y)) {
				t.Errorf("%s: saved scenario solves to a different %s: %v, %v", n, ms.Key, x, y)
			}
		}
	}
}

func TestSaveRefusesToOverwrite(t *testing.T) {
	path := filepath.Join(t.TempDir(), "s.yaml")
	os.WriteFile(path, []byte("keep me"), 0o644)
	sc, _ := Get("normal")
	if err := SaveScenario(path, sc, false); !errors.Is(err, ErrExists) {
		t.Fatalf("got %v, want ErrExists", err)
	}
	if data, _ := os.ReadFile(path); string(data) != "keep me" {
		t.Errorf("file changed: %q", data)
	}
	if err := SaveScenario(path, sc, true); err != nil {
		t.Fatal(err)
	}
	if _, err := LoadScenario(path); err != nil {
		t.Errorf("forced save unreadable: %v", err)
	}
}
