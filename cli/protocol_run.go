package cli

import (
	"encoding/csv"
	"fmt"
	"path/filepath"
	"strconv"
	"strings"

	"pvcouple/internal/safetext"
	"pvcouple/model"
	"pvcouple/model/analysis"
	"pvcouple/presets"
)

// samplesRate is the sampling rate of --samples, Hz (a common
// conductance-catheter rate, as model.DefaultSampleInterval).
const samplesRate = 1000

// samplesColumns are the columns of the --samples file.
var samplesColumns = []string{"time_s", "pressure_mmhg", "volume_ml"}

// leverPrefix starts the per-beat columns of the levers a protocol changes
// (a lever key may also be a metric key, e.g. ees_mmhg_per_ml).
const leverPrefix = "lever_"

// runBeat is what the output keeps of one beat.
type runBeat struct {
	index   int
	tStart  float64
	metrics model.Metrics
}

// protocolRun is a finished protocol run.
type protocolRun struct {
	protocol *presets.Protocol
	scenario *presets.Scenario
	plan     *presets.Plan
	beats    []runBeat
	loops    []model.BeatSamples // pressure and volume of each beat, for the ESPVR fit (JSON only)
	duration float64             // s
	samples  int                 // samples written to --samples
}

func runProtocolRun(env *Env, args []string) error {
	fs := newFlags(env, "protocol run",
		"protocol run NAME|FILE [--preset NAME | --scenario FILE] [--circulation held|closed] [--set KEY=VALUE]... [--format csv|json] [--samples FILE.csv [--force]]",
		"Runs a protocol (a built-in name, see `pvcouple protocol list`, or a protocol file) on a\n"+
			"scenario as a transient: from the scenario's steady state the levers change between beats and\n"+
			"each beat starts where the last one ended. Prints one row per beat: beat, step (its label),\n"+
			"t_start_s (run time at the beat's onset), the measurements under the keys of `pvcouple solve`,\n"+
			"then lever_KEY for each lever the protocol changes. JSON adds the protocol, the scenario, the\n"+
			"steps and an ESPVR fitted to the run's loops (iterated maximal elastance) when the protocol\n"+
			"leaves Ees and V0 alone.\n\n"+protocolAbout)
	var sel selection
	sel.addFlags(fs)
	format := fs.String("format", "csv", "output `FORMAT`: csv or json")
	samples := fs.String("samples", "", "also write LV pressure and volume at 1 kHz to `FILE.csv`: time_s,pressure_mmhg,volume_ml")
	force := fs.Bool("force", false, "let --samples overwrite an existing file")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		if len(pos) == 0 {
			return usagef("%v", errNoProtocol)
		}
		return usagef("protocol run takes one protocol, got %q", pos)
	}
	if err := choice("format", *format, "csv", "json"); err != nil {
		return err
	}
	if *samples == "" && *force {
		return usagef("--force only applies with --samples FILE.csv")
	}
	if *samples != "" {
		if strings.ToLower(filepath.Ext(*samples)) != ".csv" {
			return usagef("--samples %s: a samples file name ends in .csv", *samples)
		}
		if err := checkOutput(*samples, "samples", *force); err != nil {
			return err
		}
	}
	pr, err := loadProtocol(pos[0])
	if err != nil {
		return err
	}
	sc, err := sel.resolve()
	if err != nil {
		return err
	}
	run, err := runProtocolOn(pr, sc, *samples, *force, *format == "json")
	if err != nil {
		return err
	}
	if *samples != "" {
		fmt.Fprintf(env.Stderr, "pvcouple: wrote %d samples (%.3f s at %d Hz) to %s\n", run.samples, run.duration, samplesRate, safetext.Line(*samples))
	}
	if *format == "json" {
		return writeJSON(env, run.object())
	}
	return run.writeCSV(env)
}

// runProtocolOn expands pr for sc, runs it beat by beat and writes the
// samples file if one is named.
func runProtocolOn(pr *presets.Protocol, sc *presets.Scenario, samplesPath string, force, keepLoops bool) (*protocolRun, error) {
	plan, err := pr.Expand(sc.Params)
	if err != nil {
		return nil, fmt.Errorf("%w (protocol %s starting from scenario %s)", err, pr.Name, sc.Name)
	}
	opts := model.TransientOptions{}
	var out *outputFile
	if samplesPath != "" {
		opts.RecordRate = samplesRate
		if out, err = createOutput(samplesPath, "samples", force); err != nil {
			return nil, err
		}
		defer out.discard()
		if _, err := out.WriteString(strings.Join(samplesColumns, ",") + "\n"); err != nil {
			return nil, outputError("samples", samplesPath, err)
		}
	}
	tr, err := model.NewTransient(plan.Initial, plan.Params, opts)
	if err != nil {
		return nil, fmt.Errorf("protocol %s on scenario %s: %w", pr.Name, sc.Name, err)
	}
	run := &protocolRun{protocol: pr, scenario: sc, plan: plan, beats: make([]runBeat, 0, len(plan.Params))}
	var line []byte
	for rb, err := range tr.All() {
		if err != nil {
			return nil, fmt.Errorf("protocol %s on scenario %s, step %q: %w", pr.Name, sc.Name, plan.Label(len(run.beats)), err)
		}
		run.beats = append(run.beats, runBeat{index: rb.Index, tStart: rb.TStart, metrics: rb.Metrics})
		if keepLoops {
			run.loops = append(run.loops, model.BeatSamples{T: rb.T, P: rb.PLV, V: rb.VLV})
		}
		run.duration = rb.TStart + rb.Period
		if out != nil {
			rec := rb.Recording
			for i := range rec.T {
				line = strconv.AppendFloat(line[:0], seconds(rec.T[i]), 'f', -1, 64)
				line = append(line, ',')
				line = strconv.AppendFloat(line, rec.P[i], 'g', -1, 64)
				line = append(line, ',')
				line = strconv.AppendFloat(line, rec.V[i], 'g', -1, 64)
				line = append(line, '\n')
				if _, err := out.Write(line); err != nil {
					return nil, outputError("samples", samplesPath, err)
				}
			}
			run.samples += len(rec.T)
		}
	}
	if out != nil {
		if err := out.commit(); err != nil {
			return nil, err
		}
	}
	return run, nil
}

// levers are the keys of the levers the protocol changes.
func (r *protocolRun) levers() []string { return r.protocol.Levers(r.plan.Initial.Circulation) }

func (r *protocolRun) writeCSV(env *Env) error {
	w := csv.NewWriter(env.Stdout)
	levers := r.levers()
	header := []string{"beat", "step", "t_start_s"}
	for _, m := range model.MetricSpecs {
		header = append(header, m.Key)
	}
	for _, k := range levers {
		header = append(header, leverPrefix+k)
	}
	if err := w.Write(header); err != nil {
		return outputErr(err)
	}
	row := make([]string, len(header))
	for _, b := range r.beats {
		row = row[:0]
		row = append(row, strconv.Itoa(b.index+1), safetext.Line(r.plan.Label(b.index)), formatCSV(seconds(b.tStart)))
		for _, m := range model.MetricSpecs {
			row = append(row, formatCSV(m.Get(&b.metrics)))
		}
		for _, k := range levers {
			spec, _ := model.SpecByKey(k)
			row = append(row, formatCSV(spec.Get(r.plan.Params[b.index])))
		}
		if err := w.Write(row); err != nil {
			return outputErr(err)
		}
	}
	w.Flush()
	return outputErr(w.Error())
}

func (r *protocolRun) object() object {
	levers := r.levers()
	steps := make([]object, 0, len(r.protocol.Steps))
	for j, s := range r.protocol.Steps {
		if r.plan.First[j] >= 0 {
			steps = append(steps, object{{"step", s.Label}, {"kind", string(s.Kind)}, {"first_beat", r.plan.First[j] + 1}, {"beats", s.Beats}})
		}
	}
	beats := make([]object, len(r.beats))
	for i, b := range r.beats {
		o := object{{"beat", b.index + 1}, {"step", r.plan.Label(b.index)}, {"t_start_s", number(seconds(b.tStart))}}
		o = append(o, metricsObject(&b.metrics)...)
		for _, k := range levers {
			spec, _ := model.SpecByKey(k)
			o = append(o, field{leverPrefix + k, number(spec.Get(r.plan.Params[b.index]))})
		}
		beats[i] = o
	}
	if levers == nil {
		levers = []string{}
	}
	fit, note := r.espvrFit()
	return object{
		{"protocol", r.protocol.Name},
		{"scenario", r.scenario.Name},
		{"params", paramsObject(r.plan.Initial)},
		{"levers", levers},
		{"duration_s", number(seconds(r.duration))},
		{"steps", steps},
		{"beats", beats},
		{"espvr_fit", fit},
		{"espvr_fit_note", note},
	}
}

// espvrFit fits the ESPVR to the run's loops by the iterated
// maximal-elastance method (docs/science.md §6), as a study would from the same
// recording. It returns nil and the reason when the loops cannot share one
// ESPVR (the protocol changes Ees or V0) or the fit fails.
func (r *protocolRun) espvrFit() (any, string) {
	if ok, why := r.protocol.ESPVRFixed(); !ok {
		return nil, "not fitted: " + why
	}
	fit, err := analysis.FitESPVR(r.loops, 0)
	if err != nil {
		return nil, "not fitted: " + err.Error()
	}
	return object{
		{"ees_mmhg_per_ml", number(fit.Ees)},
		{"v0_ml", number(fit.V0)},
		{"r2", number(fit.R2)},
		{"beats", fit.Beats},
		{"iterations", fit.Iterations},
		{"method", fit.Method},
	}, "fitted to the end-systolic points of every beat of the run, from pressure and volume only"
}
