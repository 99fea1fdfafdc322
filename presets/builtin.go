package presets

import (
	"embed"
	"fmt"
	"path"
	"sort"
	"strings"
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

// Get returns a built-in preset by name.
func Get(name string) (*Scenario, error) {
	return builtinScenario(name)
}

func builtinScenario(name string) (*Scenario, error) {
	data, err := builtinFS.ReadFile(path.Join("builtin", name+".yaml"))
	if err != nil || strings.ContainsAny(name, "/\\") {
		return nil, fmt.Errorf("unknown preset %q; built-in presets: %s", name, strings.Join(Names(), ", "))
	}
	return ParseScenario(data, "preset "+name)
}

// Source returns the YAML text of a built-in preset, comments included.
func Source(name string) ([]byte, error) {
	if _, err := builtinScenario(name); err != nil {
		return nil, err
	}
	return builtinFS.ReadFile(path.Join("builtin", name+".yaml"))
}
