package presets

import (
	"regexp"
	"strings"
	"testing"

	"pvcouple/model"
)

func TestBuiltinsLoadAndDescribeThemselves(t *testing.T) {
	names := Names()
	if len(names) < 5 || names[0] != Default {
		t.Fatalf("presets %v: want at least 5 with %q first", names, Default)
	}
	for _, n := range names {
		sc, err := Get(n)
		if err != nil {
			t.Errorf("%s: %v", n, err)
			continue
		}
		if sc.Name != n || sc.Description == "" || strings.Contains(sc.Description, "\n") {
			t.Errorf("%s: name %q, description %q (want the file name and one line)", n, sc.Name, sc.Description)
		}
		if !strings.Contains(sc.Notes, "Invented") {
			t.Errorf("%s: notes should label the scenario as our own invention", n)
		}
	}
	if _, err := Get("nosuch"); err == nil || !strings.Contains(err.Error(), "normal") {
		t.Errorf("unknown preset: %v", err)
	}
	if _, err := Get("../normal"); err == nil {
		t.Error("a path is not a preset name")
	}
}

// Each value of a built-in carries where it comes from, in a comment.
func TestBuiltinValuesCiteTheirSource(t *testing.T) {
	source := regexp.MustCompile(`#.*(\[(memory|cited|paper|derived|common practice, no source)|as normal)`)
	for _, n := range Names() {
		src, err := Source(n)
		if err != nil {
			t.Fatal(err)
		}
		for _, line := range strings.Split(string(src), "\n") {
			key := strings.TrimSpace(strings.Split(line, ":")[0])
			if _, ok := model.SpecByKey(key); ok && !source.MatchString(line) {
				t.Errorf("%s: %q has no source comment", n, strings.TrimSpace(line))
			}
		}
	}
}

// The disease presets must show what their names promise. hfref: EF < 40 %
// and Ea/Ees > 1.5 (docs/science.md §3 [memory]: HFrEF Ea/Ees 1.5–4); hfpef: EF ≥ 50 %
// with EDP above the 16 mmHg cut-off (Paulus 2007 [memory]).
func TestDiseasePresetsMeetTheirDefinitions(t *testing.T) {
	m := func(name string) model.Metrics {
		sc, err := Get(name)
		if err != nil {
			t.Fatal(err)
		}
		st, err := model.NewSolver().SteadyState(sc.Params, nil)
		if err != nil {
			t.Fatal(err)
		}
		return st.Metrics
	}
	if h := m("hfref"); !(h.EF < 40 && h.EaEes > 1.5) {
		t.Errorf("hfref: EF %.1f %%, Ea/Ees %.2f; want EF < 40 and Ea/Ees > 1.5", h.EF, h.EaEes)
	}
	if h := m("hfpef"); !(h.EF >= 50 && h.EDP > 16) {
		t.Errorf("hfpef: EF %.1f %%, EDP %.1f; want EF ≥ 50 and EDP > 16", h.EF, h.EDP)
	}
	n := m("normal")
	// Moderate exercise roughly doubles cardiac output [common practice, no source].
	if e := m("exercise"); !(e.CO > 1.7*n.CO) {
		t.Errorf("exercise CO %.1f L/min, rest %.1f: want about double", e.CO, n.CO)
	}
	if h := m("hypertensive"); !(h.MAP > n.MAP+15) {
		t.Errorf("hypertensive MAP %.0f, normal %.0f", h.MAP, n.MAP)
	}
	if h := m("hypovolemic"); !(h.EDV < n.EDV && h.SV < n.SV) {
		t.Errorf("hypovolemic EDV %.0f SV %.0f vs normal %.0f %.0f", h.EDV, h.SV, n.EDV, n.SV)
	}
	if v := m("vasodilated"); !(v.Ea < n.Ea && v.MAP < n.MAP) {
		t.Errorf("vasodilated Ea %.2f MAP %.0f vs normal %.2f %.0f", v.Ea, v.MAP, n.Ea, n.MAP)
	}
}

// Each Get gives a scenario of its own: changing one (its parameters, its
// baseline, its circulation) leaves the next Get of the preset as it was.
func TestGetGivesACopy(t *testing.T) {
	for _, name := range Names() {
		a, err := Get(name)
		if err != nil {
			t.Fatal(err)
		}
		want := *a
		var wantBase model.Params
		if a.Baseline != nil {
			wantBase = *a.Baseline
			a.Baseline.Ees *= 2
		}
		a.Params.Ees *= 2
		if err := a.SetCirculation(model.Held); err != nil {
			t.Fatal(err)
		}
		b, err := Get(name)
		if err != nil {
			t.Fatal(err)
		}
		if b.Params != want.Params || (b.Baseline != nil && *b.Baseline != wantBase) {
			t.Errorf("%s: a change to one Get shows in the next", name)
		}
	}
}
