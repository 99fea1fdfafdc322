package cli

import (
	"fmt"
	"text/tabwriter"
	"time"

	"pvcouple/internal/safetext"
	"pvcouple/model"
	"pvcouple/presets"
)

func init() {
	register(command{"solve", "solve one scenario to periodic steady state and print its measurements", runSolve})
}

func runSolve(env *Env, args []string) error {
	fs := newFlags(env, "solve", "solve [--preset NAME | --scenario FILE] [--set KEY=VALUE]... [--format table|json] [--save FILE.yaml [--force]]",
		"Solves the model to its periodic steady state and prints the parameters, the beat's\nmeasurements and the work it took. --save writes the scenario as solved (after --set)\nto a scenario file that --scenario loads and that solves to the same numbers.")
	var sel selection
	sel.addFlags(fs)
	var save saveFlags
	save.addFlags(fs)
	format := fs.String("format", "table", "output `FORMAT`: table or json")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usagef("solve takes no arguments, got %q", pos[0])
	}
	if err := choice("format", *format, "table", "json"); err != nil {
		return err
	}
	if err := save.check(); err != nil {
		return err
	}
	sc, err := sel.resolve()
	if err != nil {
		return err
	}
	st, elapsed, err := solveTimed(sc.Params)
	if err != nil {
		return err
	}
	if err := save.save(env, &sel, sc); err != nil {
		return err
	}
	if *format == "json" {
		return writeJSON(env, solveObject(sc, st, elapsed))
	}
	return writeSolveTable(env, sc, st, elapsed)
}

// solveTimed solves p cold and reports the wall time it took.
func solveTimed(p model.Params) (*model.Steady, time.Duration, error) {
	start := time.Now()
	st, err := model.NewSolver().SteadyState(p, nil)
	return st, time.Since(start), err
}

func solveObject(sc *presets.Scenario, st *model.Steady, elapsed time.Duration) object {
	return object{
		{"scenario", sc.Name},
		{"params", paramsObject(sc.Params)},
		{"metrics", metricsObject(&st.Metrics)},
		{"timing", object{
			{"solve_ms", number(float64(elapsed.Microseconds()) / 1000)},
			{"beats", st.Beats},
			{"residual", number(st.Residual)},
		}},
	}
}

func writeSolveTable(env *Env, sc *presets.Scenario, st *model.Steady, elapsed time.Duration) error {
	out := newStdout(env)
	w := tabwriter.NewWriter(out, 0, 0, 2, ' ', 0)
	fmt.Fprintf(w, "Scenario %s: steady state in %d beats, %.2f ms (residual %.1e)\n\n", safetext.Line(sc.Name), st.Beats,
		float64(elapsed.Microseconds())/1000, st.Residual)
	fmt.Fprintln(w, "PARAMETER\tVALUE\tUNIT\t")
	for _, s := range model.Specs {
		fmt.Fprintf(w, "%s\t%s\t%s\t\n", s.Key, formatValue(s.Get(sc.Params)), s.Unit)
	}
	fmt.Fprintln(w, "\t\t\t")
	fmt.Fprintln(w, "MEASUREMENT\tVALUE\tUNIT\tKEY")
	for _, s := range model.MetricSpecs {
		fmt.Fprintf(w, "%s\t%s\t%s\t%s\n", s.Label, formatValue(s.Get(&st.Metrics)), s.Unit, s.Key)
	}
	w.Flush()
	return flushStdout(out)
}
