package cli

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"os/signal"
	"strconv"
	"strings"

	"pvcouple/internal/safetext"
	"pvcouple/model"
	"pvcouple/model/sweep"
	"pvcouple/presets"
)

func init() {
	register(command{"sweep", "solve a grid of parameter values and print one row of measurements per point", runSweep})
}

var sweepAbout = `Solves the model to its periodic steady state at every point of a grid and prints
one row per point: the varied values, status (ok, not_settled, invalid, failed),
beats, every measurement of 'pvcouple solve' (empty in CSV, null in JSON where it
cannot be taken; ees_mmhg_per_ml once, when it is varied) and, for a failed point,
the error. Each --vary KEY=FROM:TO:N gives N evenly spaced values from FROM to TO
inclusive, in the parameter's unit (see 'pvcouple params'); rows run with the first
--vary slowest. The grid is solved on every core, each point starting from the
steady state of its neighbour; a point that does not settle is reported in its row
and the sweep goes on. At most ` + strconv.Itoa(sweep.MaxPoints) + ` points. A progress bar is shown on standard
error when it is a terminal and the run takes more than a second.

Example: pvcouple sweep --vary resistance_mmhg_s_per_ml=0.4:2:41 --vary ees_mmhg_per_ml=1:4:31`

func runSweep(env *Env, args []string) error {
	fs := newFlags(env, "sweep",
		"sweep --vary KEY=FROM:TO:N [--vary KEY=FROM:TO:N]... [--preset NAME | --scenario FILE] [--circulation held|closed] [--set KEY=VALUE]... [--format csv|json] [--workers N]",
		sweepAbout)
	var sel selection
	sel.addFlags(fs)
	var varies listFlag
	fs.Var(&varies, "vary", "vary one parameter over `KEY=FROM:TO:N` (repeatable; the first varies slowest)")
	format := fs.String("format", "csv", "output `FORMAT`: csv or json")
	workers := fs.Int("workers", 0, "solve on `N` goroutines (default 0: one per core)")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usagef("sweep takes no arguments, got %q; give each axis with --vary KEY=FROM:TO:N", pos[0])
	}
	if err := choice("format", *format, "csv", "json"); err != nil {
		return err
	}
	if *workers < 0 {
		return usagef("--workers %d: give 0 (one per core) or more", *workers)
	}
	if len(varies) == 0 {
		return usagef("sweep needs at least one --vary KEY=FROM:TO:N, e.g. --vary ees_mmhg_per_ml=1:4:31")
	}
	axes := make([]sweep.Axis, 0, len(varies))
	for _, v := range varies {
		a, err := parseAxis(v)
		if err != nil {
			return err
		}
		axes = append(axes, a)
	}
	for _, kv := range sel.sets {
		key, _, _ := strings.Cut(kv, "=")
		for _, a := range axes {
			if strings.TrimSpace(key) == a.Key {
				return usagef("%s is both varied (--vary) and set (--set); drop one", a.Key)
			}
		}
	}
	sc, err := sel.resolve()
	if err != nil {
		return err
	}
	g := sweep.Grid{Base: sc.Params, Axes: axes}
	if err := g.Validate(); err != nil {
		return usagef("--vary: %v", err)
	}

	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	bar := newProgressBar(env, "sweep")
	opt := sweep.Options{Workers: *workers}
	if bar != nil {
		opt.Progress = bar.update
	}
	res, err := sweep.Run(ctx, g, opt)
	if bar != nil {
		bar.finish(res)
	}
	if err != nil {
		if errors.Is(err, context.Canceled) {
			return fmt.Errorf("interrupted after %d of %d points; nothing written", len(res.Points)-res.Count(sweep.NotRun), len(res.Points))
		}
		return err
	}
	if *format == "json" {
		err = writeSweepJSON(env, sc, res)
	} else {
		err = writeSweepCSV(env, res)
	}
	if err != nil {
		return err
	}
	if bad := len(res.Points) - res.Count(sweep.OK); bad > 0 {
		fmt.Fprintf(env.Stderr, "pvcouple: %d of %d points have no steady state (%d not settled, %d invalid, %d failed); see the status and error columns\n",
			bad, len(res.Points), res.Count(sweep.NotSettled), res.Count(sweep.Invalid), res.Count(sweep.Failed))
	}
	return nil
}

// parseAxis reads one --vary KEY=FROM:TO:N. Numbers are read as --set reads
// them (presets.ParseNumber); a long argument is echoed cut short.
func parseAxis(s string) (sweep.Axis, error) {
	key, rng, ok := strings.Cut(s, "=")
	key = strings.TrimSpace(key)
	if !ok || key == "" {
		return sweep.Axis{}, usagef("--vary %s: expected KEY=FROM:TO:N, e.g. --vary ees_mmhg_per_ml=1:4:31", presets.QuoteShort(s))
	}
	spec, found := model.SpecByKey(key)
	if !found {
		return sweep.Axis{}, usagef("--vary %s: unknown parameter; known: %s", presets.QuoteShort(key), strings.Join(model.Keys(), ", "))
	}
	at := "--vary " + key + "=" + strings.Trim(presets.QuoteShort(rng), `"`)
	parts := strings.Split(rng, ":")
	if len(parts) != 3 {
		return sweep.Axis{}, usagef("%s: expected FROM:TO:N (first value, last value, number of values), e.g. %s=%g:%g:11",
			at, key, spec.Get(defaultParams()), spec.Get(defaultParams())*2)
	}
	var ends [2]float64
	for i, name := range []string{"FROM", "TO"} {
		v, err := presets.ParseNumber(parts[i])
		if err != nil {
			return sweep.Axis{}, usagef("%s: %s: %v; %s", at, name, err, spec.RangeText())
		}
		if spec.Check(v) != nil {
			return sweep.Axis{}, usagef("%s: %s = %g is out of range; %s", at, name, v, spec.RangeText())
		}
		ends[i] = v
	}
	txt := strings.TrimSpace(parts[2])
	n, err := strconv.Atoi(txt)
	if err != nil || n < 1 {
		return sweep.Axis{}, usagef("%s: N %s is not a whole number of values ≥ 1", at, presets.QuoteShort(txt))
	}
	a := sweep.Axis{Key: key, From: ends[0], To: ends[1], N: n}
	if n == 1 && a.From != a.To {
		return sweep.Axis{}, usagef("%s: with N = 1, FROM and TO must be equal (or fix one value with --set)", at)
	}
	if err := a.Check(); err != nil {
		return sweep.Axis{}, usagef("%s: %v", at, err)
	}
	return a, nil
}

// defaultParams are the default preset's parameters, for examples in messages.
func defaultParams() model.Params {
	sc, err := presets.Get(presets.Default)
	if err != nil {
		return model.Params{}
	}
	return sc.Params
}

// sweepColumns are the CSV header and JSON member names of a sweep row.
func sweepColumns(g sweep.Grid) []string {
	metrics := sweepMetrics(g)
	cols := make([]string, 0, len(g.Axes)+3+len(metrics))
	for _, a := range g.Axes {
		cols = append(cols, a.Key)
	}
	cols = append(cols, "status", "beats")
	for _, s := range metrics {
		cols = append(cols, s.Key)
	}
	return append(cols, "error")
}

// sweepMetrics are the metrics of a sweep row: all of model.MetricSpecs but
// one whose key is a varied parameter's (ees_mmhg_per_ml, which the model
// reports as its own parameter), so that no column name appears twice.
func sweepMetrics(g sweep.Grid) []model.MetricSpec {
	var m []model.MetricSpec
next:
	for _, s := range model.MetricSpecs {
		for _, a := range g.Axes {
			if a.Key == s.Key {
				continue next
			}
		}
		m = append(m, s)
	}
	return m
}

func errorText(pt *sweep.Point) string {
	if pt.Err == nil {
		return ""
	}
	return pt.Err.Error()
}

func writeSweepCSV(env *Env, res *sweep.Result) error {
	w := csv.NewWriter(env.Stdout)
	if err := w.Write(sweepColumns(res.Grid)); err != nil {
		return outputErr(err)
	}
	metrics := sweepMetrics(res.Grid)
	row := make([]string, 0, len(res.Grid.Axes)+3+len(metrics))
	for i := range res.Points {
		pt := &res.Points[i]
		row = row[:0]
		for _, v := range res.Values(i) {
			row = append(row, formatCSV(v))
		}
		row = append(row, pt.Status.String(), strconv.Itoa(pt.Beats))
		for _, s := range metrics {
			if pt.Status == sweep.OK {
				row = append(row, formatCSV(s.Get(&pt.Metrics)))
			} else {
				row = append(row, "")
			}
		}
		row = append(row, safetext.Line(errorText(pt)))
		if err := w.Write(row); err != nil {
			return outputErr(err)
		}
	}
	w.Flush()
	return outputErr(w.Error())
}

// writeSweepJSON writes the sweep as one JSON object: the scenario, its
// parameters, the axes and a summary, indented, then the points one per line
// so that a large sweep stays readable and quick to write.
func writeSweepJSON(env *Env, sc *presets.Scenario, res *sweep.Result) error {
	vary := make([]object, len(res.Grid.Axes))
	for i, a := range res.Grid.Axes {
		spec, _ := model.SpecByKey(a.Key)
		vary[i] = object{{"key", a.Key}, {"unit", spec.Unit}, {"from", number(a.From)}, {"to", number(a.To)}, {"n", a.N}}
	}
	head, err := json.MarshalIndent(object{
		{"scenario", sc.Name},
		{"params", paramsObject(sc.Params)},
		{"vary", vary},
		{"summary", object{
			{"points", len(res.Points)},
			{"ok", res.Count(sweep.OK)},
			{"not_settled", res.Count(sweep.NotSettled)},
			{"invalid", res.Count(sweep.Invalid)},
			{"failed", res.Count(sweep.Failed)},
			{"workers", res.Workers},
			{"elapsed_s", number(res.Elapsed.Seconds())},
		}},
		{"points", []int{}},
	}, "", "  ")
	if err != nil {
		return err
	}
	// Replace the empty points array that closes the object by the rows.
	head = bytes.TrimSuffix(head, []byte("[]\n}"))
	w := newStdout(env)
	w.Write(safetext.JSON(head))
	w.WriteString("[")
	metrics := sweepMetrics(res.Grid)
	o := make(object, 0, len(res.Grid.Axes)+3+len(metrics))
	for i := range res.Points {
		pt := &res.Points[i]
		o = o[:0]
		for k, v := range res.Values(i) {
			o = append(o, field{res.Grid.Axes[k].Key, number(v)})
		}
		o = append(o, field{"status", pt.Status.String()}, field{"beats", pt.Beats})
		for _, s := range metrics {
			v := s.Get(&pt.Metrics)
			if pt.Status != sweep.OK {
				v = math.NaN()
			}
			o = append(o, field{s.Key, number(v)})
		}
		var e any
		if pt.Err != nil {
			e = pt.Err.Error()
		}
		o = append(o, field{"error", e})
		row, err := json.Marshal(o)
		if err != nil {
			return err
		}
		if i > 0 {
			w.WriteString(",")
		}
		w.WriteString("\n    ")
		w.Write(safetext.JSON(row))
	}
	w.WriteString("\n  ]\n}\n")
	return flushStdout(w)
}
