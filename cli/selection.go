package cli

import (
	"fmt"
	"strconv"
	"strings"

	"pvcouple/model"
	"pvcouple/presets"
)

// selection is the --preset / --scenario / --set choice of a parameter set
// shared by the commands that solve the model.
type selection struct {
	preset   string
	scenario string
	sets     listFlag
	// given records whether --preset and --scenario were given at all, so
	// that an empty value is an error rather than the default.
	given map[string]bool
}

func (s *selection) addFlags(fs *flagSet) {
	s.given = map[string]bool{}
	fs.Var(givenString{&s.preset, s.given, "preset"}, "preset", "built-in preset `NAME` (default "+presets.Default+"; see `pvcouple presets`)")
	fs.Var(givenString{&s.scenario, s.given, "scenario"}, "scenario", "scenario `FILE` (YAML)")
	fs.Var(&s.sets, "set", "override one parameter, `KEY=VALUE` (repeatable, each key once; see `pvcouple params`)")
}

// givenString is a string flag that records that it was given.
type givenString struct {
	p     *string
	given map[string]bool
	name  string
}

func (g givenString) String() string {
	if g.p == nil {
		return ""
	}
	return *g.p
}

func (g givenString) Set(v string) error {
	*g.p = v
	g.given[g.name] = true
	return nil
}

// resolve returns the scenario the flags select, with the --set overrides
// applied to its parameters.
func (s *selection) resolve() (*presets.Scenario, error) {
	if s.given["preset"] && strings.TrimSpace(s.preset) == "" {
		return nil, usagef("--preset is empty; give a preset name (see `pvcouple presets`)")
	}
	if s.given["scenario"] && strings.TrimSpace(s.scenario) == "" {
		return nil, usagef("--scenario is empty; give a scenario FILE")
	}
	if s.preset != "" && s.scenario != "" {
		return nil, usagef("give --preset or --scenario, not both")
	}
	sets, err := parseSets(s.sets)
	if err != nil {
		return nil, err
	}
	var sc *presets.Scenario
	if s.scenario != "" {
		sc, err = presets.LoadScenario(s.scenario)
	} else {
		name := s.preset
		if name == "" {
			name = presets.Default
		}
		if sc, err = presets.Get(name); err != nil {
			return nil, usagef("--preset: %v", err)
		}
	}
	if err != nil {
		return nil, err
	}
	p := sc.Params
	for _, st := range sets {
		st.spec.Set(&p, st.value)
	}
	if err := p.Validate(); err != nil {
		return nil, fmt.Errorf("parameters: %w", err)
	}
	sc.Params = p
	return sc, nil
}

// setting is one --set KEY=VALUE, checked.
type setting struct {
	spec  model.Spec
	value float64
}

// String is the setting as KEY=VALUE, the value in its shortest exact form.
func (s setting) String() string {
	return s.spec.Key + "=" + strconv.FormatFloat(s.value, 'g', -1, 64)
}

// parseSets checks --set KEY=VALUE overrides: a known key, each once, and a
// finite decimal number in the key's range. A value is echoed at most once
// in a message, cut short.
func parseSets(sets []string) ([]setting, error) {
	var out []setting
	seen := map[string]string{}
	for _, kv := range sets {
		key, val, ok := strings.Cut(kv, "=")
		key, val = strings.TrimSpace(key), strings.TrimSpace(val)
		if !ok || key == "" {
			return nil, usagef("--set %s: expected KEY=VALUE, e.g. --set heart_rate_bpm=90", presets.QuoteShort(kv))
		}
		spec, found := model.SpecByKey(key)
		if !found {
			return nil, usagef("--set %s: unknown parameter; known: %s", presets.QuoteShort(key), strings.Join(model.Keys(), ", "))
		}
		if prev, dup := seen[key]; dup {
			return nil, usagef("--set %s is given twice (%s and %s); give each key once", key, presets.QuoteShort(prev), presets.QuoteShort(val))
		}
		seen[key] = val
		v, err := presets.ParseNumber(val)
		if err != nil {
			return nil, usagef("--set %s: %v; %s", key, err, spec.RangeText())
		}
		if err := spec.Check(v); err != nil {
			return nil, usagef("--set %v", err)
		}
		out = append(out, setting{spec, v})
	}
	return out, nil
}
