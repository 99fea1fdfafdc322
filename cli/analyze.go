package cli

import (
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"

	"pvcouple/internal/safetext"
	"pvcouple/model"
	"pvcouple/model/analysis"
)

func init() {
	register(command{"analyze", "measure a pressure–volume recording beat by beat (CSV from the catheter lab)", runAnalyze})
}

const analyzeAbout = `Reads a pressure–volume recording (CSV with a header: time_s,pressure_mmhg,volume_ml
or common variants; 200 to 5000 Hz; volumes in mL or µL), finds the beats without an ECG
(30 to 800 bpm), drops ectopic and incomplete beats with a reason, and measures each beat
with the same code as the model. Each preload run (caval occlusion) gets its ESPVR
(iterated maximal elastance), EDPVR, PRSW, dP/dt max–EDV slope and Emax(t); the steady
beats give the single-beat estimates of Ees (Chen et al. 2001) and the EDPVR (Klotz et al.
2006), marked as estimates. Conductance volumes are calibrated with --parallel-volume and
--alpha or --calibration (see 'pvcouple calibrate'). For research and education planning only.`

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
		return writeJSON(env, analysisObject(path, rf.calibration, a))
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

// analyzeColumns are the metrics shown per beat in the table.
var analyzeColumns = []string{"edv_ml", "esv_ml", "sv_ml", "ef_pct", "edp_mmhg", "esp_mmhg", "ea_mmhg_per_ml",
	"dpdt_max_mmhg_per_s", "dpdt_min_mmhg_per_s", "tau_ms", "hr_bpm"}

// tableUnits formats values for a table in the analysis's volume unit.
type tableUnits struct{ u analysis.VolumeUnit }

// v formats x, in a unit with mL (unit), in the display unit with the unit.
func (t tableUnits) v(x float64, unit string) string {
	return formatValue(inUnit(t.u, x, unit)) + " " + t.u.Label(unit)
}

// n formats x without the unit.
func (t tableUnits) n(x float64, unit string) string { return formatValue(inUnit(t.u, x, unit)) }

func writeAnalysisTable(env *Env, path string, a *analysis.Analysis) error {
	r := a.Recording
	w := newStdout(env)
	tu := tableUnits{a.Unit}
	fmt.Fprintf(w, "Recording %s: %d samples at %.6g Hz over %.2f s; columns %q, %q, %q", safetext.Line(path), r.Len(), r.Rate,
		r.Duration(), r.Columns.Time, r.Columns.Pressure, r.Columns.Volume)
	if r.Columns.Aortic != "" {
		fmt.Fprintf(w, ", aortic %q", r.Columns.Aortic)
	}
	fmt.Fprintf(w, "\nBeats about %.0f ms apart (%.0f bpm); noise about %.2g mmHg and %s; smoothing %.3g ms. %d beats found, %d kept.\n",
		a.Period*1e3, 60/a.Period, a.NoiseP, tu.v(a.NoiseV, "mL"), a.Options.SmoothWindow*1000, len(a.Beats), len(a.Kept()))
	if c := r.Calibration; c.ParallelVolume != 0 || c.Alpha != 1 {
		fmt.Fprintf(w, "Volumes calibrated: V = (V_file − %s) / %.4g.\n", tu.v(c.ParallelVolume, "mL"), c.Alpha)
	}
	if a.Unit.Scale != 1 {
		fmt.Fprintf(w, "Volumes in µL (a small heart); JSON gives them in mL.\n")
	}
	fmt.Fprintf(w, "End-systole found with V0 from: %s; Ees from: %s.\n\n", sourceText(a.V0Source), sourceText(a.EesSource))

	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	head := []string{"BEAT", "START s"}
	for _, k := range analyzeColumns {
		s, _ := model.MetricByKey(k)
		head = append(head, strings.TrimSpace(s.Label+" "+a.Unit.Label(s.Unit)))
	}
	fmt.Fprintln(tw, strings.Join(head, "\t")+"\t\tSTATUS")
	for _, b := range a.Beats {
		row := []string{fmt.Sprint(b.Index), fmt.Sprintf("%.3f", b.Start)}
		for _, k := range analyzeColumns {
			s, _ := model.MetricByKey(k)
			row = append(row, tu.n(s.Get(&b.Metrics), s.Unit))
		}
		status := "kept"
		switch {
		case !b.Kept():
			status = "dropped: " + safetext.Line(b.Dropped)
		case b.Run >= 0:
			status = fmt.Sprintf("kept, run %d", b.Run+1)
		}
		fmt.Fprintln(tw, strings.Join(row, "\t")+"\t\t"+status)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintln(w)
	for i, run := range a.Runs {
		writeRunTable(w, tu, i+1, run)
	}
	if sb := a.SingleBeat; sb != nil {
		writeSingleBeat(w, tu, sb)
	}
	if len(a.Steady) > 0 {
		med := a.SteadyMedians()
		var parts []string
		for _, k := range []string{"edv_ml", "esv_ml", "ef_pct", "edp_mmhg", "esp_mmhg", "ea_mmhg_per_ml", "ea_ees_ratio", "sw_mmhg_ml", "hr_bpm"} {
			s, _ := model.MetricByKey(k)
			p := fmt.Sprintf("%s %s", s.Label, tu.n(med[k], s.Unit))
			if k == "ea_ees_ratio" && a.EesIsEstimate() {
				p += " (estimate: Ees from one beat, Chen 2001 — caution)"
			}
			parts = append(parts, p)
		}
		fmt.Fprintf(w, "Steady beats (median of %d in %d steady stretches): %s\n", len(a.Steady), len(a.SteadySegments), strings.Join(parts, ", "))
	}
	for _, n := range a.Notes {
		fmt.Fprintf(w, "Note: %s\n", safetext.Line(n))
	}
	for _, x := range a.Warnings {
		fmt.Fprintf(w, "Warning: %s\n", safetext.Line(x))
	}
	return flushStdout(w)
}

// writeRunTable writes what was fitted to one preload run.
func writeRunTable(w io.Writer, tu tableUnits, k int, run *analysis.Run) {
	dir := "rising"
	if run.Falling {
		dir = "falling"
	}
	fmt.Fprintf(w, "Run %d, beats %d–%d (%d beats, EDV %s):\n", k, run.First(), run.Last(), len(run.Beats), dir)
	if e := run.ESPVR; e != nil {
		fmt.Fprintf(w, "  ESPVR (%s): Ees %s, V0 %s, r² %.4f", e.Method, tu.v(e.Ees, "mmHg/mL"), tu.v(e.V0, "mL"), e.R2)
		if e.Curvature != 0 {
			fmt.Fprintf(w, ", curvature %s", tu.v(e.Curvature, "mmHg/mL²"))
		}
		fmt.Fprintln(w)
	}
	if e := run.EDPVR; e != nil {
		fmt.Fprintf(w, "  EDPVR (P = A·(exp(B·(V − V0)) − 1)): A %s mmHg, B %s, V0 %s, r² %.3f, RMSE %.2g mmHg\n",
			formatValue(e.A), tu.v(e.B, "1/mL"), tu.v(e.V0, "mL"), e.R2, e.RMSE)
	}
	if p := run.PRSW; p != nil {
		fmt.Fprintf(w, "  PRSW (SW = Mw·(EDV − Vw), Glower 1985): Mw %s mmHg, Vw %s, r² %.3f\n", formatValue(p.Mw), tu.v(p.Vw, "mL"), p.R2)
	}
	if d := run.DPdtEDV; d != nil {
		fmt.Fprintf(w, "  dP/dt max–EDV (Little 1985): slope %s, r² %.3f\n", tu.v(d.Slope, "mmHg/s/mL"), d.R2)
	}
	if e := run.Emax; e != nil {
		fmt.Fprintf(w, "  Emax(t) across the beats: Emax %s at %.0f ms after the onset of contraction, V0 %s, r² %.3f\n",
			tu.v(e.Emax, "mmHg/mL"), e.TMax*1e3, tu.v(e.V0, "mL"), e.R2)
	}
}

// writeSingleBeat writes the single-beat estimates, labelled as estimates.
func writeSingleBeat(w io.Writer, tu tableUnits, sb *analysis.SingleBeat) {
	from := "peak LV pressure and LV pressure at the onset of ejection"
	if sb.PFrom == "aortic" {
		from = "aortic SBP and DBP"
	}
	fmt.Fprintf(w, "Single-beat estimates, median of %d steady beats (Ps %.0f, Pd %.0f mmHg from %s; SV %s, EF %.2f, tNd %.3f):\n",
		sb.Beats, sb.Ps, sb.Pd, from, tu.v(sb.SV, "mL"), sb.EF, sb.TNd)
	if c := sb.Chen; c != nil {
		fmt.Fprintf(w, "  Ees(sb) %s — an estimate (Chen et al. 2001; ENd(est) %.3f), not a measurement\n", tu.v(c.Ees, "mmHg/mL"), c.ENdEst)
	} else {
		fmt.Fprintf(w, "  Ees(sb): %s\n", safetext.Line(sb.ChenErr))
	}
	if k := sb.Klotz; k != nil {
		// P = α·V^β with V in the display unit.
		alpha := k.Alpha / math.Pow(tu.u.Scale, k.Beta)
		fmt.Fprintf(w, "  EDPVR P = %.4g·V^%.4g, V in %s — an estimate (Klotz et al. 2006; V0 %s, V30 %s, both estimates)\n",
			alpha, k.Beta, tu.u.Name, tu.v(k.V0, "mL"), tu.v(k.V30, "mL"))
	} else {
		fmt.Fprintf(w, "  EDPVR (Klotz): %s\n", safetext.Line(sb.KlotzErr))
	}
}

func sourceText(s string) string {
	switch s {
	case analysis.SourceESPVR:
		return "the ESPVR fit"
	case analysis.SourceSingleBeat:
		return "the single-beat estimate (Chen 2001), an estimate"
	}
	return "none (V0 = 0: end-systole at maximal P/V)"
}
