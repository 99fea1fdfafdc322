package presets

import (
	"regexp"
	"strings"
	"testing"

	"pvcouple/model"
)

const protoHead = "version: 1\nname: t\nsteps:\n"

func TestBuiltinProtocolsLoadAndDescribeThemselves(t *testing.T) {
	names := ProtocolNames()
	for _, want := range []string{"preload-reduction", "volume-challenge", "afterload-challenge", "inotrope-challenge", "rate-steps"} {
		found := false
		for _, n := range names {
			found = found || n == want
		}
		if !found {
			t.Errorf("built-in protocol %s missing from %v", want, names)
		}
	}
	for _, n := range names {
		pr, err := GetProtocol(n)
		if err != nil {
			t.Errorf("%s: %v", n, err)
			continue
		}
		if pr.Name != n || pr.Description == "" || strings.Contains(pr.Description, "\n") {
			t.Errorf("%s: name %q, description %q (want the file name and one line)", n, pr.Name, pr.Description)
		}
		if !strings.HasPrefix(pr.Notes, "Invented") || !strings.Contains(strings.Join(strings.Fields(pr.Notes), " "), "not for treating patients") {
			t.Errorf("%s: notes should label the protocol as our own invention, for planning only", n)
		}
		if len(pr.Levers(model.Held)) == 0 || pr.TotalBeats(model.Held) < 10 {
			t.Errorf("%s: changes %v over %d beats", n, pr.Levers(model.Held), pr.TotalBeats(model.Held))
		}
	}
	for _, bad := range []string{"nosuch", "../presets/protocols/rate-steps", "", "rate-steps.yaml"} {
		if _, err := GetProtocol(bad); err == nil || !strings.Contains(err.Error(), "preload-reduction") {
			t.Errorf("GetProtocol(%q): %v, want an error listing the built-ins", bad, err)
		}
	}
}

// Every lever change of a built-in carries where its number comes from.
func TestBuiltinProtocolChangesCiteTheirSource(t *testing.T) {
	source := regexp.MustCompile(`#.*(\[(memory|cited|paper|derived|common practice, no source)|as above)`)
	for _, n := range ProtocolNames() {
		src, err := ProtocolSource(n)
		if err != nil {
			t.Fatal(err)
		}
		changes := 0
		for _, line := range strings.Split(string(src), "\n") {
			code := strings.Split(line, "#")[0]
			for _, s := range model.Specs {
				if strings.Contains(code, s.Key+":") {
					changes++
					if !source.MatchString(line) {
						t.Errorf("%s: %q has no source comment", n, strings.TrimSpace(line))
					}
				}
			}
		}
		if changes == 0 {
			t.Errorf("%s: no lever changes found", n)
		}
	}
}

// Every built-in runs on every preset in both circulations: its levers stay
// in range.
func TestBuiltinProtocolsExpandOnEveryPreset(t *testing.T) {
	for _, pn := range ProtocolNames() {
		pr, _ := GetProtocol(pn)
		for _, sn := range Names() {
			for _, c := range []model.Circulation{model.Held, model.Closed} {
				sc, _ := Get(sn)
				if err := sc.SetCirculation(c); err != nil {
					t.Fatal(err)
				}
				pl, err := pr.Expand(sc.Params)
				if err != nil {
					t.Errorf("%s on %s, %s: %v", pn, sn, c, err)
					continue
				}
				if len(pl.Params) != pr.TotalBeats(c) || len(pl.Steps) != len(pl.Params) {
					t.Errorf("%s on %s: %d beats planned, protocol has %d", pn, sn, len(pl.Params), pr.TotalBeats(c))
				}
			}
		}
	}
}

func TestParseProtocolForms(t *testing.T) {
	doc := protoHead + `  - label: base
    hold: 2
  - label: jump
    set: {heart_rate_bpm: 90, filling_pressure_mmhg: initial}
  - label: halve
    scale: {resistance_mmhg_s_per_ml: 0.5}
    beats: 3
  - label: slide
    ramp:
      ees_mmhg_per_ml: 4
      compliance_ml_per_mmhg: {factor: 1.2}
      heart_rate_bpm: initial
    beats: 4
`
	pr, err := ParseProtocol([]byte(doc), "p.yaml")
	if err != nil {
		t.Fatal(err)
	}
	want := []Step{
		{Label: "base", Kind: StepHold, Beats: 2, Line: 4},
		{Label: "jump", Kind: StepSet, Beats: 1, Line: 6, Changes: []Change{
			{Key: "heart_rate_bpm", Mode: ToValue, Value: 90, Line: 7}, {Key: "filling_pressure_mmhg", Mode: ToInitial, Line: 7}}},
		{Label: "halve", Kind: StepScale, Beats: 3, Line: 8, Changes: []Change{
			{Key: "resistance_mmhg_s_per_ml", Mode: ByFactor, Value: 0.5, Line: 9}}},
		{Label: "slide", Kind: StepRamp, Beats: 4, Line: 11, Changes: []Change{
			{Key: "ees_mmhg_per_ml", Mode: ToValue, Value: 4, Line: 13},
			{Key: "compliance_ml_per_mmhg", Mode: ByFactor, Value: 1.2, Line: 14},
			{Key: "heart_rate_bpm", Mode: ToInitial, Line: 15}}},
	}
	if len(pr.Steps) != len(want) {
		t.Fatalf("%d steps", len(pr.Steps))
	}
	for i := range want {
		g, w := pr.Steps[i], want[i]
		if g.Label != w.Label || g.Kind != w.Kind || g.Beats != w.Beats || g.Line != w.Line || len(g.Changes) != len(w.Changes) {
			t.Errorf("step %d: %+v, want %+v", i+1, g, w)
			continue
		}
		for k := range w.Changes {
			if g.Changes[k] != w.Changes[k] {
				t.Errorf("step %d change %d: %+v, want %+v", i+1, k, g.Changes[k], w.Changes[k])
			}
		}
	}
	if pr.TotalBeats(model.Held) != 10 {
		t.Errorf("total %d beats, want 10", pr.TotalBeats(model.Held))
	}
	if got := strings.Join(pr.Levers(model.Held), " "); got != "filling_pressure_mmhg ees_mmhg_per_ml resistance_mmhg_s_per_ml heart_rate_bpm compliance_ml_per_mmhg" {
		t.Errorf("levers %s (want model.Specs order)", got)
	}
	noName, err := ParseProtocol([]byte("version: 1\nsteps:\n  - {label: a, hold: 1}\n"), "dir/my-plan.yaml")
	if err != nil || noName.Name != "my-plan" {
		t.Errorf("a protocol without a name takes the file's: %v %v", noName, err)
	}
}

// Every malformed protocol is refused with the file, the line and the key.
func TestProtocolStrictLoadingErrors(t *testing.T) {
	step := func(s string) string { return protoHead + s }
	cases := []struct {
		name, doc string
		want      []string
	}{
		{"unknown top key", "version: 1\ncolour: red\nsteps: []\n", []string{"p.yaml:2", "colour", "unknown key", "steps"}},
		{"duplicate top key", "version: 1\nname: a\nname: b\nsteps: []\n", []string{"p.yaml:3", "name", "duplicate"}},
		{"missing version", "name: a\nsteps:\n  - {label: a, hold: 1}\n", []string{"version", "missing"}},
		{"bad version", "version: 2\nsteps:\n  - {label: a, hold: 1}\n", []string{"p.yaml:1", "version 2 is not supported"}},
		{"text version", "version: one\nsteps: []\n", []string{"p.yaml:1", `"one" is not a whole number`}},
		{"missing steps", "version: 1\nname: a\n", []string{"steps", "missing"}},
		{"empty steps", "version: 1\nsteps: []\n", []string{"p.yaml:2", "steps", "one or more"}},
		{"steps not list", "version: 1\nsteps: {a: 1}\n", []string{"p.yaml:2", "list"}},
		{"two-line name", "version: 1\nname: \"a\\nb\"\nsteps: []\n", []string{"p.yaml:2", "name", "one line"}},
		{"step not mapping", step("  - hold 5\n"), []string{"p.yaml:4", "steps[1]", "mapping"}},
		{"no kind", step("  - label: a\n    beats: 3\n"), []string{"p.yaml:4", "steps[1]", "set, scale, ramp or hold"}},
		{"no label", step("  - hold: 3\n"), []string{"p.yaml:4", "steps[1].label", "missing"}},
		{"long label", step("  - label: " + strings.Repeat("x", 61) + "\n    hold: 1\n"), []string{"p.yaml:4", "label", "1 to 60"}},
		{"list label", step("  - label: [a]\n    hold: 1\n"), []string{"p.yaml:4", "label", "text"}},
		{"two kinds", step("  - label: a\n    hold: 1\n    set: {heart_rate_bpm: 80}\n"), []string{"p.yaml:6", "steps[1].set", "one thing", "hold"}},
		{"unknown step key", step("  - label: a\n    hold: 1\n    speed: 2\n"), []string{"p.yaml:6", "steps[1].speed", "unknown key", "ramp"}},
		{"duplicate step key", step("  - label: a\n    label: b\n    hold: 1\n"), []string{"p.yaml:5", "steps[1].label", "duplicate"}},
		{"hold with beats", step("  - label: a\n    hold: 1\n    beats: 3\n"), []string{"p.yaml:6", "steps[1].beats", "hold: 3"}},
		{"hold zero", step("  - label: a\n    hold: 0\n"), []string{"p.yaml:5", "steps[1].hold", `"0"`, "1 to 500"}},
		{"hold fraction", step("  - label: a\n    hold: 2.5\n"), []string{"p.yaml:5", "whole number of beats"}},
		{"hold huge", step("  - label: a\n    hold: 1000000\n"), []string{"p.yaml:5", "1 to 500"}},
		{"hold overflow", step("  - label: a\n    hold: 99999999999999999999999\n"), []string{"p.yaml:5", "1 to 500"}},
		{"total cap", step("  - {label: a, hold: 300}\n  - {label: b, hold: 201}\n"), []string{"p.yaml:5", "steps[2]", "501 beats", "at most 500"}},
		{"ramp without beats", step("  - label: a\n    ramp: {heart_rate_bpm: 80}\n"), []string{"p.yaml:4", "steps[1].beats", "ramp needs"}},
		{"unknown lever", step("  - label: a\n    set: {heart_rate: 80}\n"), []string{"p.yaml:5", "steps[1].set.heart_rate", "unknown parameter"}},
		{"duplicate lever", step("  - label: a\n    set:\n      heart_rate_bpm: 80\n      heart_rate_bpm: 90\n"), []string{"p.yaml:7", "steps[1].set.heart_rate_bpm", "duplicate"}},
		{"empty set", step("  - label: a\n    set: {}\n"), []string{"p.yaml:5", "steps[1].set", "one or more parameter"}},
		{"set out of range", step("  - label: a\n    set: {heart_rate_bpm: 250}\n"), []string{"p.yaml:5", "steps[1].set.heart_rate_bpm", "heart_rate_bpm = 250", "allowed 30 to 180 bpm"}},
		{"set text", step("  - label: a\n    set: {heart_rate_bpm: fast}\n"), []string{"p.yaml:5", `"fast" is not a number`, "30 to 180 bpm", "initial"}},
		{"set nan", step("  - label: a\n    set: {heart_rate_bpm: .nan}\n"), []string{"p.yaml:5", "not a finite number"}},
		{"set factor form", step("  - label: a\n    set: {heart_rate_bpm: {factor: 2}}\n"), []string{"p.yaml:5", "is not a number"}},
		{"scale negative", step("  - label: a\n    scale: {heart_rate_bpm: -1}\n"), []string{"p.yaml:5", "steps[1].scale.heart_rate_bpm", "factor -1 out of range", "0 to 100"}},
		{"scale huge", step("  - label: a\n    scale: {heart_rate_bpm: 1e300}\n"), []string{"p.yaml:5", "out of range"}},
		{"scale initial", step("  - label: a\n    scale: {heart_rate_bpm: initial}\n"), []string{"p.yaml:5", `"initial" is not a number`, "factor"}},
		{"ramp bad form", step("  - label: a\n    ramp: {heart_rate_bpm: {to: 80}}\n    beats: 2\n"), []string{"p.yaml:5", "steps[1].ramp.heart_rate_bpm.to", "unknown key", "factor"}},
		{"ramp empty factor", step("  - label: a\n    ramp: {heart_rate_bpm: {}}\n    beats: 2\n"), []string{"p.yaml:5", "missing factor"}},
		{"ramp factor text", step("  - label: a\n    ramp: {heart_rate_bpm: {factor: x}}\n    beats: 2\n"), []string{"p.yaml:5", "steps[1].ramp.heart_rate_bpm.factor", "not a number"}},
		{"alias", "version: 1\nsteps:\n  - &s {label: a, hold: 1}\n  - *s\n", []string{"p.yaml:4", "alias *s", "not supported"}},
		{"merge key", step("  - label: a\n    <<: {hold: 1}\n"), []string{"p.yaml:5", "merge keys"}},
		{"second document", step("  - {label: a, hold: 1}\n---\nversion: 1\n"), []string{"p.yaml", "second YAML document"}},
		{"broken yaml", step("  - {label: a, hold: [\n"), []string{"p.yaml", "not valid YAML"}},
		{"empty", "", []string{"p.yaml", "empty"}},
		{"scalar", "hello\n", []string{"p.yaml:1", "mapping"}},
	}
	for _, c := range cases {
		_, err := ParseProtocol([]byte(c.doc), "p.yaml")
		checkRefused(t, c.name, err, c.want)
	}
}
