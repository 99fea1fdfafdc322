package cli

import (
	"fmt"
	"path/filepath"
	"strings"

	"pvcouple/internal/safetext"
	"pvcouple/presets"
)

// saveFlags are the --save and --force options of solve.
type saveFlags struct {
	path  string
	force bool
}

func (f *saveFlags) addFlags(fs *flagSet) {
	fs.StringVar(&f.path, "save", "", "write the resolved scenario (after --set) to `FILE.yaml`, for --scenario")
	fs.BoolVar(&f.force, "force", false, "let --save overwrite an existing file")
}

// check validates the options before any work is done.
func (f *saveFlags) check() error {
	if f.path == "" {
		if f.force {
			return usagef("--force only applies with --save FILE.yaml")
		}
		return nil
	}
	if ext := strings.ToLower(filepath.Ext(f.path)); ext != ".yaml" && ext != ".yml" {
		return usagef("--save %s: a scenario file name ends in .yaml", f.path)
	}
	return checkOutput(f.path, "save", f.force)
}

// save writes sc, resolved from sel, to the --save file. The file is named
// after itself, keeps the description, notes and baseline of where it came
// from, and records the --set overrides in its notes.
func (f *saveFlags) save(env *Env, sel *selection, sc *presets.Scenario) error {
	if f.path == "" {
		return nil
	}
	out := *sc
	out.Name = safetext.Line(strings.TrimSuffix(filepath.Base(f.path), filepath.Ext(f.path)))
	out.Base = ""
	from := "preset " + presets.Default
	switch {
	case sel.scenario != "":
		from = "scenario file " + safetext.Line(sel.scenario)
	case sel.preset != "":
		from = "preset " + sel.preset
	}
	note := "Saved by `pvcouple solve` from " + from
	sets, err := parseSets(sel.sets) // checked already; written as KEY=VALUE, nothing of the argument's spacing
	if err != nil {
		return err
	}
	if len(sets) > 0 {
		var kv []string
		for _, s := range sets {
			kv = append(kv, s.String())
		}
		note += " with --set " + strings.Join(kv, " --set ")
		if out.Description != "" {
			out.Description += ", with " + strings.Join(kv, " ")
		}
	}
	if out.Notes != "" && !strings.HasSuffix(out.Notes, "\n") {
		out.Notes += "\n"
	}
	out.Notes += note + ".\n"
	if err := presets.SaveScenario(f.path, &out, f.force); err != nil {
		return err
	}
	fmt.Fprintf(env.Stderr, "pvcouple: saved scenario %s to %s\n", safetext.Line(out.Name), safetext.Line(f.path))
	return nil
}
