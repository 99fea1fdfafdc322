package presets

import (
	"embed"
	"fmt"
	"path"
	"sort"
	"strings"
	"sync"
)

//go:embed builtin/*.yaml
var builtinFS embed.FS

// Default is the preset used when none is named.
const Default = "normal"

// Names returns the names of the built-in presets, the default first.
func Names() []string {
	entries, err := builtinFS.ReadDir("builtin")
	if err != nil {
		panic(err) // the embedded directory is part of the binary
	}
	var names []string
	for _, e := range entries {
		names = append(names, strings.TrimSuffix(e.Name(), ".yaml"))
	}
	sort.Slice(names, func(i, j int) bool {
		if (names[i] == Default) != (names[j] == Default) {
			return names[i] == Default
		}
		return names[i] < names[j]
	})
	return names
}

// Get returns a built-in preset by name, a copy of its own to change.
func Get(name string) (*Scenario, error) {
	sc, err := builtinScenario(name)
	if err != nil {
		return nil, err
	}
	c := *sc
	if sc.Baseline != nil {
		b := *sc.Baseline
		c.Baseline = &b
	}
	return &c, nil
}

// parsed holds the built-in presets read so far: reading one in a closed
// circulation calibrates its blood volume, a steady-state solve, and the
// preset picker, every session and every listing read them all.
var parsed struct {
	sync.Mutex
	byName map[string]*Scenario
}

// builtinScenario returns the built-in preset name, read once; the caller
// must not change it.
func builtinScenario(name string) (*Scenario, error) {
	parsed.Lock()
	sc := parsed.byName[name]
	parsed.Unlock()
	if sc != nil {
		return sc, nil
	}
	data, err := builtinFS.ReadFile(path.Join("builtin", name+".yaml"))
	if err != nil || strings.ContainsAny(name, "/\\") {
		return nil, fmt.Errorf("unknown preset %q; built-in presets: %s", name, strings.Join(Names(), ", "))
	}
	sc, err = ParseScenario(data, "preset "+name)
	if err != nil {
		return nil, err
	}
	parsed.Lock()
	if parsed.byName == nil {
		parsed.byName = map[string]*Scenario{}
	}
	parsed.byName[name] = sc
	parsed.Unlock()
	return sc, nil
}

// Source returns the YAML text of a built-in preset, comments included.
func Source(name string) ([]byte, error) {
	if _, err := builtinScenario(name); err != nil {
		return nil, err
	}
	return builtinFS.ReadFile(path.Join("builtin", name+".yaml"))
}
