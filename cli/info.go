package cli

import (
	"fmt"
	"text/tabwriter"

	"pvcouple/model"
	"pvcouple/presets"
)

func init() {
	register(command{"params", "list the parameters: key, unit, default, range, meaning", runParams})
	register(command{"presets", "list the built-in scenarios", runPresets})
}

func runParams(env *Env, args []string) error {
	fs := newFlags(env, "params", "params", "Lists every parameter with its unit, its value in the "+presets.Default+" preset and its allowed range.")
	if pos, err := parse(fs, args); err != nil {
		return err
	} else if len(pos) > 0 {
		return usagef("params takes no arguments")
	}
	def, err := presets.Get(presets.Default)
	if err != nil {
		return err
	}
	out := newStdout(env)
	w := tabwriter.NewWriter(out, 0, 0, 2, ' ', 0)
	fmt.Fprintln(w, "KEY\tUNIT\tDEFAULT\tMIN\tMAX\tMEANING")
	for _, s := range model.Specs {
		fmt.Fprintf(w, "%s\t%s\t%g\t%g\t%g\t%s\n", s.Key, s.Unit, s.Get(def.Params), s.Min, s.Max, s.Meaning)
	}
	w.Flush()
	return flushStdout(out)
}

func runPresets(env *Env, args []string) error {
	fs := newFlags(env, "presets", "presets", "Lists the built-in scenarios (our own invented cases) with a one-line description.")
	if pos, err := parse(fs, args); err != nil {
		return err
	} else if len(pos) > 0 {
		return usagef("presets takes no arguments")
	}
	out := newStdout(env)
	fmt.Fprintln(out, "Built-in scenarios: invented cases of our own, labelled so in their notes; not patient data.")
	w := tabwriter.NewWriter(out, 0, 0, 2, ' ', 0)
	for _, n := range presets.Names() {
		sc, err := presets.Get(n)
		if err != nil {
			return err
		}
		mark := ""
		if n == presets.Default {
			mark = " (default)"
		}
		fmt.Fprintf(w, "%s\t%s%s\n", n, sc.Description, mark)
	}
	w.Flush()
	return flushStdout(out)
}
