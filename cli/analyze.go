package cli

import (
	"fmt"
	"strings"
	"text/tabwriter"

	"pvcouple/model"
	"pvcouple/model/analysis"
)

func init() {
	register(command{"analyze", "measure a pressure–volume recording beat by beat (CSV from the catheter lab)", runAnalyze})
}

const analyzeAbout = `Reads a pressure–volume recording (CSV with a header: time_s,pressure_mmhg,volume_ml
or common variants; 200 to 2000 Hz), finds the beats without an ECG (from dP/dt and
volume), drops ectopic and incomplete beats with a reason, and measures each beat with
the same code as the model. When preload changes across 5 or more beats it fits the
ESPVR (iterated maximal elastance) and the EDPVR (exponential); from the steady beats it
makes the single-beat estimates of Ees (Chen et al. 2001) and the EDPVR (Klotz et al.
2006). For research and education planning only.`

func runAnalyze(env *Env, args []string) error {
	fs := newFlags(env, "analyze", "analyze FILE.csv [--format table|json] [options]", analyzeAbout)
	var rf recordingFlags
	rf.addFlags(fs)
	format := fs.String("format", "table", "output `FORMAT`: table or json")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	path, err := onePath("analyze", pos)
	if err != nil {
		return err
	}
	if err := choice("format", *format, "table", "json"); err != nil {
		return err
	}
	a, err := rf.analyze(path)
	if err != nil {
		return err
	}
	if *format == "json" {
		return writeJSON(env, analysisObject(path, a))
	}
	return writeAnalysisTable(env, path, a)
}

// nullable returns nil (JSON null) for an empty string.
func nullable(s string) any {
	if s == "" {
		return nil
	}
	return s
}

func analysisObject(path string, a *analysis.Analysis) object {
	r := a.Recording
	gaps := []object{}
	for _, g := range r.Gaps {
		gaps = append(gaps, object{{"from_s", number(g.From)}, {"to_s", number(g.To)}})
	}
	beats := make([]object, 0, len(a.Beats))
	for _, b := range a.Beats {
		row := object{
			{"beat", b.Index}, {"start_s", number(b.Start)}, {"end_s", number(b.End)},
			{"kept", b.Kept()}, {"drop_reason", nullable(b.Dropped)},
		}
		beats = append(beats, append(row, metricsObject(&b.Metrics)...))
	}
	var run any
	if n := len(a.PreloadRun); n > 0 {
		run = object{{"first_beat", a.PreloadRun[0].Index}, {"last_beat", a.PreloadRun[n-1].Index}, {"beats", n}}
	}
	steady := make([]int, len(a.Steady))
	for i, b := range a.Steady {
		steady[i] = b.Index
	}
	med := a.SteadyMedians()
	medians := object{}
	for _, s := range model.MetricSpecs {
		medians = append(medians, field{s.Key, number(med[s.Key])})
	}
	return object{
		{"file", path},
		{"recording", object{
			{"rows", r.Rows},
			{"samples", r.Len()},
			{"sample_rate_hz", number(r.Rate)},
			{"duration_s", number(r.Duration())},
			{"columns", object{{"time", nullable(r.Columns.Time)}, {"pressure", r.Columns.Pressure},
				{"volume", r.Columns.Volume}, {"aortic", nullable(r.Columns.Aortic)}}},
			{"units_read", object{{"time", r.Columns.TimeUnit}, {"pressure", r.Columns.PressureUnit}, {"volume", r.Columns.VolumeUnit}}},
			{"segments", len(r.Segments)},
			{"gaps", gaps},
			{"noise_pressure_mmhg", number(a.NoiseP)},
			{"noise_volume_ml", number(a.NoiseV)},
		}},
		{"smooth_ms", number(a.Options.SmoothWindow * 1000)},
		{"v0_source", a.V0Source},
		{"ees_source", a.EesSource},
		{"known", object{{"v0_ml", number(a.Known.V0)}, {"ees_mmhg_per_ml", number(a.Known.Ees)},
			{"edpvr_a_mmhg", number(a.Known.EdpvrA)}, {"edpvr_b_per_ml", number(a.Known.EdpvrB)}}},
		{"summary", object{{"beats", len(a.Beats)}, {"kept", len(a.Kept())}, {"steady_beats", steady}, {"preload_run", run}}},
		{"steady_median", medians},
		{"beats", beats},
		{"espvr", espvrObject(a.ESPVR)},
		{"edpvr", edpvrObject(a.EDPVR)},
		{"single_beat", singleBeatObject(a.SingleBeat)},
		{"notes", nonNil(a.Notes)},
		{"warnings", nonNil(a.Warnings)},
	}
}

func nonNil(s []string) []string {
	if s == nil {
		return []string{}
	}
	return s
}

func espvrObject(e *analysis.ESPVRFit) any {
	if e == nil {
		return nil
	}
	pts := make([]object, len(e.Points))
	for i, p := range e.Points {
		pts[i] = object{{"v_ml", number(p.V)}, {"p_mmhg", number(p.P)}}
	}
	return object{
		{"ees_mmhg_per_ml", number(e.Ees)}, {"v0_ml", number(e.V0)}, {"r2", number(e.R2)}, {"beats", e.Beats},
		{"method", e.Method}, {"curvature_mmhg_per_ml2", number(e.Curvature)}, {"iterations", e.Iterations}, {"points", pts},
	}
}

func edpvrObject(e *analysis.EDPVRFit) any {
	if e == nil {
		return nil
	}
	return object{
		{"a_mmhg", number(e.A)}, {"b_per_ml", number(e.B)}, {"v0_ml", number(e.V0)}, {"r2", number(e.R2)},
		{"rmse_mmhg", number(e.RMSE)}, {"beats", e.Beats}, {"form", "P = A·(exp(B·(V − V0)) − 1), V0 held"},
	}
}

func singleBeatObject(sb *analysis.SingleBeat) any {
	if sb == nil {
		return nil
	}
	var chen, klotz any
	if c := sb.Chen; c != nil {
		chen = object{{"ees_mmhg_per_ml", number(c.Ees)}, {"en_d_avg", number(c.ENdAvg)}, {"en_d_est", number(c.ENdEst)}}
	}
	if k := sb.Klotz; k != nil {
		klotz = object{{"v0_ml", number(k.V0)}, {"v30_ml", number(k.V30)}, {"alpha", number(k.Alpha)}, {"beta", number(k.Beta)},
			{"form", "P = alpha·V^beta"}}
	}
	return object{
		{"beats", sb.Beats}, {"ps_mmhg", number(sb.Ps)}, {"pd_mmhg", number(sb.Pd)}, {"sv_ml", number(sb.SV)},
		{"ef", number(sb.EF)}, {"t_nd", number(sb.TNd)}, {"edv_ml", number(sb.EDV)}, {"edp_mmhg", number(sb.EDP)},
		{"chen_2001", chen}, {"chen_2001_note", nullable(sb.ChenErr)},
		{"klotz_2006", klotz}, {"klotz_2006_note", nullable(sb.KlotzErr)},
	}
}

// analyzeColumns are the metrics shown per beat in the table.
var analyzeColumns = []string{"edv_ml", "esv_ml", "sv_ml", "ef_pct", "edp_mmhg", "esp_mmhg", "ea_mmhg_per_ml",
	"dpdt_max_mmhg_per_s", "dpdt_min_mmhg_per_s", "tau_ms", "hr_bpm"}

func writeAnalysisTable(env *Env, path string, a *analysis.Analysis) error {
	r := a.Recording
	w := env.Stdout
	fmt.Fprintf(w, "Recording %s: %d samples at %.4g Hz over %.2f s; columns %q, %q, %q", path, r.Len(), r.Rate,
		r.Duration(), r.Columns.Time, r.Columns.Pressure, r.Columns.Volume)
	if r.Columns.Aortic != "" {
		fmt.Fprintf(w, ", aortic %q", r.Columns.Aortic)
	}
	fmt.Fprintf(w, "\nNoise about %.2g mmHg and %.2g mL; smoothing %.3g ms. %d beats found, %d kept.\n",
		a.NoiseP, a.NoiseV, a.Options.SmoothWindow*1000, len(a.Beats), len(a.Kept()))
	fmt.Fprintf(w, "End-systole found with V0 from: %s; Ees from: %s.\n\n", sourceText(a.V0Source), sourceText(a.EesSource))

	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	head := []string{"BEAT", "START s"}
	for _, k := range analyzeColumns {
		s, _ := model.MetricByKey(k)
		head = append(head, s.Label)
	}
	fmt.Fprintln(tw, strings.Join(head, "\t")+"\t\tSTATUS")
	for _, b := range a.Beats {
		row := []string{fmt.Sprint(b.Index), fmt.Sprintf("%.3f", b.Start)}
		for _, k := range analyzeColumns {
			s, _ := model.MetricByKey(k)
			row = append(row, formatValue(s.Get(&b.Metrics)))
		}
		status := "kept"
		if !b.Kept() {
			status = "dropped: " + b.Dropped
		}
		fmt.Fprintln(tw, strings.Join(row, "\t")+"\t\t"+status)
	}
	tw.Flush()
	fmt.Fprintln(w)
	if e := a.ESPVR; e != nil {
		fmt.Fprintf(w, "ESPVR (%s, beats %d–%d): Ees %s mmHg/mL, V0 %s mL, r² %.4f",
			e.Method, a.PreloadRun[0].Index, a.PreloadRun[len(a.PreloadRun)-1].Index, formatValue(e.Ees), formatValue(e.V0), e.R2)
		if e.Curvature != 0 {
			fmt.Fprintf(w, ", curvature %.3g mmHg/mL²", e.Curvature)
		}
		fmt.Fprintln(w)
	}
	if e := a.EDPVR; e != nil {
		fmt.Fprintf(w, "EDPVR (P = A·(exp(B·(V − V0)) − 1), %d beats): A %s mmHg, B %s 1/mL, V0 %s mL, r² %.3f, RMSE %.2g mmHg\n",
			e.Beats, formatValue(e.A), formatValue(e.B), formatValue(e.V0), e.R2, e.RMSE)
	}
	if sb := a.SingleBeat; sb != nil {
		fmt.Fprintf(w, "Single-beat, median of %d steady beats (Ps %.0f, Pd %.0f mmHg, SV %.0f mL, EF %.2f, tNd %.3f):\n",
			sb.Beats, sb.Ps, sb.Pd, sb.SV, sb.EF, sb.TNd)
		if c := sb.Chen; c != nil {
			fmt.Fprintf(w, "  Ees(sb) %s mmHg/mL (Chen et al. 2001; ENd(est) %.3f)\n", formatValue(c.Ees), c.ENdEst)
		} else {
			fmt.Fprintf(w, "  Ees(sb): %s\n", sb.ChenErr)
		}
		if k := sb.Klotz; k != nil {
			fmt.Fprintf(w, "  EDPVR P = %.4g·V^%.4g (Klotz et al. 2006; V0 %.1f mL, V30 %.1f mL)\n", k.Alpha, k.Beta, k.V0, k.V30)
		} else {
			fmt.Fprintf(w, "  EDPVR (Klotz): %s\n", sb.KlotzErr)
		}
	}
	if len(a.Steady) > 0 {
		med := a.SteadyMedians()
		var parts []string
		for _, k := range []string{"edv_ml", "esv_ml", "ef_pct", "edp_mmhg", "esp_mmhg", "ea_mmhg_per_ml", "ea_ees_ratio", "sw_mmhg_ml", "hr_bpm"} {
			s, _ := model.MetricByKey(k)
			parts = append(parts, fmt.Sprintf("%s %s", s.Label, formatValue(med[k])))
		}
		fmt.Fprintf(w, "Steady beats (median of %d): %s\n", len(a.Steady), strings.Join(parts, ", "))
	}
	for _, n := range a.Notes {
		fmt.Fprintf(w, "Note: %s\n", n)
	}
	for _, x := range a.Warnings {
		fmt.Fprintf(w, "Warning: %s\n", x)
	}
	return nil
}

func sourceText(s string) string {
	switch s {
	case analysis.SourceESPVR:
		return "the ESPVR fit"
	case analysis.SourceSingleBeat:
		return "the single-beat estimate (Chen 2001)"
	}
	return "none (V0 = 0: end-systole at maximal P/V)"
}
