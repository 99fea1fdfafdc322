package cli

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"pvcouple/internal/safetext"
	"pvcouple/model"
	"pvcouple/model/analysis"
	"pvcouple/presets"
)

func init() {
	register(command{"fit", "fit the model to a steady recording and save it as a scenario for what-ifs", runFit})
}

const fitAbout = `Fits the model to the steady beats of a pressure–volume recording (read and analysed as
by 'pvcouple analyze'): Ees, V0, EDPVR A and B, R, C, Zc and the filling pressure, with
the heart rate taken from the recording and the other parameters from the normal preset.
Reports the residual and how well the recording determines each value; with -o, writes a
scenario that 'pvcouple explore --scenario FILE' opens as the baseline for what-ifs.
A model fitted to a recording, for research and education planning; not patient advice.`

func runFit(env *Env, args []string) error {
	fs := newFlags(env, "fit", "fit FILE.csv [-o scenario.yaml [--force]] [--name NAME] [--format table|json] [--max-seconds S] [options]", fitAbout)
	var rf recordingFlags
	rf.addFlags(fs)
	out := fs.String("o", "", "write the fitted scenario to `FILE` (YAML)")
	force := fs.Bool("force", false, "overwrite the -o file if it exists")
	name := fs.String("name", "", "scenario `NAME` (default: fitted- and the recording's file name)")
	format := fs.String("format", "table", "output `FORMAT`: table or json")
	maxSec := fs.Float64("max-seconds", 4, "cap on the search's wall time in `S` (0.5 to 60)")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	path, err := onePath("fit", pos)
	if err != nil {
		return err
	}
	if err := choice("format", *format, "table", "json"); err != nil {
		return err
	}
	if !(*maxSec >= 0.5 && *maxSec <= 60) {
		return usagef("--max-seconds %g: allowed 0.5 to 60 s", *maxSec)
	}
	if err := safetext.CheckLine(*name); err != nil {
		return usagef("--name %s: %v", presets.QuoteShort(*name), err)
	}
	if *out == "" && *force {
		return usagef("--force only applies with -o FILE.yaml")
	}
	if *out != "" {
		// Refused before the fit, not after it.
		if ext := strings.ToLower(filepath.Ext(*out)); ext != ".yaml" && ext != ".yml" {
			return usagef("-o %s: a scenario file name ends in .yaml", safetext.Line(*out))
		}
		if err := checkOutput(*out, "o", *force); err != nil {
			return err
		}
	}
	a, err := rf.analyze(path)
	if err != nil {
		return err
	}
	base, err := presets.Get(presets.Default)
	if err != nil {
		return err
	}
	// One recorded loop is fitted by the ventricle and its load alone: the
	// held circulation, whose filling pressure is a lever of the fit.
	if err := base.SetCirculation(model.Held); err != nil {
		return err
	}
	res, err := analysis.FitModel(a, analysis.FitOptions{Base: base.Params, MaxTime: time.Duration(*maxSec * float64(time.Second))})
	if err != nil {
		if errors.Is(err, analysis.ErrNotSteady) {
			return fmt.Errorf("%s: %w; the fit needs a stretch of steady beats (see `pvcouple analyze %s`)", path, err, path)
		}
		return fmt.Errorf("%s: %w", path, err)
	}
	sc := fittedScenario(path, *name, a, res, base.Name)
	if *out != "" {
		if err := presets.SaveScenario(*out, sc, *force); err != nil {
			return err
		}
	}
	if *format == "json" {
		return writeJSON(env, fitObject(path, *out, a, res, sc))
	}
	return writeFitTable(env, path, *out, a, res)
}

// fittedScenario is the scenario written by fit: the fitted parameters as
// both the parameters and the baseline, with notes saying where they came from.
func fittedScenario(path, name string, a *analysis.Analysis, r *analysis.FitResult, baseName string) *presets.Scenario {
	file := safetext.Line(filepath.Base(path))
	if name == "" {
		name = "fitted-" + strings.TrimSuffix(file, filepath.Ext(file))
	}
	var det []string
	for _, f := range r.Fitted {
		det = append(det, fmt.Sprintf("  %s %s (%s)", f.Key, strconv.FormatFloat(f.Value, 'g', 4, 64), f.Note))
	}
	notes := fmt.Sprintf(`Fitted by pvcouple fit to the recording %s: %d steady beats, heart rate %.1f bpm
from the recording, residual %.2f mmHg and %.2f mL root-mean-square over the loop.
Fitted values and how well the recording determines them:
%s
Not fitted, from the built-in %s preset: venous pressure, wall volume, valve resistances,
and the rest of the circulation (held here: run it closed with --circulation closed).
A model fitted to one recording, for research and education planning; not patient advice.
`, file, r.Beats, r.HeartRate, r.RMSPressure, r.RMSVolume, strings.Join(det, "\n"), baseName)
	p := r.Params
	return &presets.Scenario{
		Version:     presets.SchemaVersion,
		Name:        name,
		Description: "Model fitted to the recording " + file,
		Notes:       notes,
		Params:      p,
		Baseline:    &p,
	}
}

func fitObject(path, out string, a *analysis.Analysis, r *analysis.FitResult, sc *presets.Scenario) object {
	fitted := make([]object, len(r.Fitted))
	for i, f := range r.Fitted {
		s, _ := model.SpecByKey(f.Key)
		fitted[i] = object{{"key", f.Key}, {"value", number(f.Value)}, {"unit", s.Unit}, {"start", number(f.Start)},
			{"spread_fraction", number(f.Spread)}, {"note", f.Note}}
	}
	med := a.SteadyMedians()
	rec := object{}
	for _, s := range model.MetricSpecs {
		rec = append(rec, field{s.Key, number(med[s.Key])})
	}
	var file any
	if out != "" {
		file = out
	}
	return object{
		{"file", path},
		{"scenario", sc.Name},
		{"scenario_file", file},
		{"heart_rate_bpm", number(r.HeartRate)},
		{"beats", r.Beats},
		{"residual", object{{"rms_pressure_mmhg", number(r.RMSPressure)}, {"rms_volume_ml", number(r.RMSVolume)}}},
		{"stopped", r.Stopped},
		{"evaluations", r.Evaluations},
		{"elapsed_ms", number(float64(r.Elapsed.Microseconds()) / 1000)},
		{"fitted", fitted},
		{"params", paramsObject(r.Params)},
		{"model_metrics", metricsObject(&r.Metrics)},
		{"recording_metrics", rec},
		{"warnings", append(nonNil(r.Warnings), a.Warnings...)},
	}
}

func writeFitTable(env *Env, path, out string, a *analysis.Analysis, r *analysis.FitResult) error {
	w := newStdout(env)
	path, out = safetext.Line(path), safetext.Line(out)
	fmt.Fprintf(w, "Fitted to %d steady beats of %s (heart rate %.1f bpm from the recording) in %.2f s, %d model solves (%s).\n",
		r.Beats, path, r.HeartRate, r.Elapsed.Seconds(), r.Evaluations, r.Stopped)
	fmt.Fprintf(w, "Residual over the loop: %.2f mmHg and %.2f mL root-mean-square.\n\n", r.RMSPressure, r.RMSVolume)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "PARAMETER\tVALUE\tUNIT\tSTART\t±\tDETERMINACY")
	for _, f := range r.Fitted {
		s, _ := model.SpecByKey(f.Key)
		spread := "—"
		if !math.IsInf(f.Spread, 1) {
			spread = fmt.Sprintf("%.2g %%", 100*f.Spread)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\n", f.Key, formatValue(f.Value), s.Unit, formatValue(f.Start), spread, safetext.Line(f.Note))
	}
	tw.Flush()
	med := a.SteadyMedians()
	fmt.Fprintln(w, "\n± is the relative range over which the others, re-fitted, keep the loop within 0.5 mmHg/mL of the best fit.")
	fmt.Fprintln(w)
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "MEASUREMENT\tRECORDING\tFITTED MODEL\tUNIT")
	for _, k := range []string{"edv_ml", "esv_ml", "sv_ml", "ef_pct", "edp_mmhg", "esp_mmhg", "ea_mmhg_per_ml", "dpdt_max_mmhg_per_s", "tau_ms", "sw_mmhg_ml"} {
		s, _ := model.MetricByKey(k)
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\n", s.Label, formatValue(med[k]), formatValue(s.Get(&r.Metrics)), s.Unit)
	}
	tw.Flush()
	for _, x := range append(append([]string(nil), r.Warnings...), a.Warnings...) {
		fmt.Fprintf(w, "Warning: %s\n", safetext.Line(x))
	}
	if out != "" {
		fmt.Fprintf(w, "\nWrote %s; open it with: pvcouple explore --scenario %s\n", out, out)
	}
	return flushStdout(w)
}
