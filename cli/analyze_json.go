package cli

import (
	"pvcouple/model"
	"pvcouple/model/analysis"
)

// Labels of where Ees (and so Ea/Ees) comes from, beside the numbers.
const (
	basisMeasured = "measured: ESPVR of an occlusion run"
	basisEstimate = "estimate: single beat (Chen et al. 2001)"
)

// eesBasis says where the beats' Ees comes from (nil when unknown).
func eesBasis(a *analysis.Analysis) any {
	switch a.EesSource {
	case analysis.SourceESPVR:
		return basisMeasured
	case analysis.SourceSingleBeat:
		return basisEstimate
	}
	return nil
}

// labelledMetrics is a metrics object with the basis of Ees beside Ea/Ees.
func labelledMetrics(a *analysis.Analysis, get func(model.MetricSpec) float64) object {
	o := make(object, 0, len(model.MetricSpecs)+1)
	for _, s := range model.MetricSpecs {
		o = append(o, field{s.Key, number(get(s))})
		if s.Key == "ea_ees_ratio" {
			o = append(o, field{"ees_basis", eesBasis(a)})
		}
	}
	return o
}

func analysisObject(path, calFile string, a *analysis.Analysis) object {
	r := a.Recording
	gaps := []object{}
	for _, g := range r.Gaps {
		gaps = append(gaps, object{{"from_s", number(g.From)}, {"to_s", number(g.To)}})
	}
	steadyBeat := map[*analysis.Beat]bool{}
	for _, b := range a.Steady {
		steadyBeat[b] = true
	}
	beats := make([]object, 0, len(a.Beats))
	for _, b := range a.Beats {
		var run any
		if b.Run >= 0 {
			run = b.Run + 1
		}
		m := b.Metrics
		row := object{
			{"beat", b.Index}, {"start_s", number(seconds(b.Start))}, {"end_s", number(seconds(b.End))},
			{"kept", b.Kept()}, {"drop_reason", nullable(b.Dropped)}, {"steady", steadyBeat[b]}, {"run", run},
			{"ejection_onset_ms", number(b.Ejection.Open * 1e3)}, {"ejection_end_ms", number(b.Ejection.Close * 1e3)},
		}
		beats = append(beats, append(row, labelledMetrics(a, func(s model.MetricSpec) float64 { return s.Get(&m) })...))
	}
	runs := make([]object, len(a.Runs))
	for i, run := range a.Runs {
		runs[i] = runObject(run)
	}
	segs := make([]object, len(a.SteadySegments))
	for i, s := range a.SteadySegments {
		segs[i] = object{{"first_beat", s[0].Index}, {"last_beat", s[len(s)-1].Index}, {"beats", len(s)}}
	}
	steady := make([]int, len(a.Steady))
	for i, b := range a.Steady {
		steady[i] = b.Index
	}
	var first any
	if n := len(a.PreloadRun); n > 0 {
		first = object{{"first_beat", a.PreloadRun[0].Index}, {"last_beat", a.PreloadRun[n-1].Index}, {"beats", n}}
	}
	med := a.SteadyMedians()
	var species any
	if r.Species != nil {
		species = r.Species.Name
	}
	var prsw, dpdt, emax any
	for _, run := range a.Runs {
		if len(a.PreloadRun) > 0 && run.Beats[0] == a.PreloadRun[0] {
			prsw, dpdt, emax = prswObject(run.PRSW), dpdtObject(run.DPdtEDV), emaxObject(run.Emax)
		}
	}
	return object{
		{"file", path},
		{"recording", object{
			{"rows", r.Rows},
			{"samples", r.Len()},
			{"sample_rate_hz", number(r.Rate)},
			{"duration_s", number(seconds(r.Duration()))},
			{"columns", object{{"time", nullable(r.Columns.Time)}, {"pressure", r.Columns.Pressure},
				{"volume", r.Columns.Volume}, {"aortic", nullable(r.Columns.Aortic)}}},
			{"units_read", object{{"time", r.Columns.TimeUnit}, {"pressure", r.Columns.PressureUnit}, {"volume", r.Columns.VolumeUnit}}},
			{"volumes_shown_in", a.Unit.Name},
			{"species", species},
			{"calibration", object{{"parallel_volume_ml", number(r.Calibration.ParallelVolume)}, {"alpha", number(r.Calibration.Alpha)}, {"file", nullable(calFile)}}},
			{"segments", len(r.Segments)},
			{"gaps", gaps},
			{"noise_pressure_mmhg", number(a.NoiseP)},
			{"noise_volume_ml", number(a.NoiseV)},
		}},
		{"beat_period_s", number(a.Period)},
		{"smooth_ms", number(a.Options.SmoothWindow * 1000)},
		{"v0_source", a.V0Source},
		{"ees_source", a.EesSource},
		{"known", object{{"v0_ml", number(a.Known.V0)}, {"ees_mmhg_per_ml", number(a.Known.Ees)}, {"ees_basis", eesBasis(a)},
			{"edpvr_a_mmhg", number(a.Known.EdpvrA)}, {"edpvr_b_per_ml", number(a.Known.EdpvrB)}}},
		{"summary", object{{"beats", len(a.Beats)}, {"kept", len(a.Kept())}, {"steady_beats", steady}, {"preload_run", first}, {"runs", len(a.Runs)}}},
		{"steady_segments", segs},
		{"steady_median", labelledMetrics(a, func(s model.MetricSpec) float64 { return med[s.Key] })},
		{"beats", beats},
		{"runs", runs},
		{"espvr", espvrObject(a.ESPVR)},
		{"edpvr", edpvrObject(a.EDPVR)},
		{"prsw", prsw},
		{"dpdt_edv", dpdt},
		{"emax", emax},
		{"single_beat", singleBeatObject(a.SingleBeat)},
		{"drift", driftObject(a.Drift)},
		{"notes", nonNil(a.Notes)},
		{"warnings", nonNil(a.Warnings)},
	}
}

func runObject(r *analysis.Run) object {
	return object{
		{"first_beat", r.First()}, {"last_beat", r.Last()}, {"beats", len(r.Beats)}, {"edv_falls", r.Falling},
		{"espvr", espvrObject(r.ESPVR)}, {"edpvr", edpvrObject(r.EDPVR)}, {"prsw", prswObject(r.PRSW)},
		{"dpdt_edv", dpdtObject(r.DPdtEDV)}, {"emax", emaxObject(r.Emax)}, {"notes", nonNil(r.Notes)},
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

func prswObject(p *analysis.PRSWFit) any {
	if p == nil {
		return nil
	}
	return object{{"mw_mmhg", number(p.Mw)}, {"vw_ml", number(p.Vw)}, {"r2", number(p.R2)}, {"beats", p.Beats},
		{"form", "SW = Mw·(EDV − Vw) (Glower et al. 1985)"}}
}

func dpdtObject(d *analysis.SlopeFit) any {
	if d == nil {
		return nil
	}
	return object{{"slope_mmhg_per_s_per_ml", number(d.Slope)}, {"edv_intercept_ml", number(d.X0)}, {"r2", number(d.R2)},
		{"beats", d.Beats}, {"form", "dP/dt max = slope·(EDV − intercept) (Little 1985)"}}
}

func emaxObject(e *analysis.EmaxFit) any {
	if e == nil {
		return nil
	}
	curve := make([]object, len(e.Curve))
	for i, s := range e.Curve {
		curve[i] = object{{"t_ms", number(s.T * 1e3)}, {"e_mmhg_per_ml", number(s.E)}, {"v0_ml", number(s.V0)}, {"r2", number(s.R2)}}
	}
	return object{{"emax_mmhg_per_ml", number(e.Emax)}, {"t_max_ms", number(e.TMax * 1e3)}, {"v0_ml", number(e.V0)}, {"r2", number(e.R2)},
		{"beats", e.Beats}, {"method", "isochrones across the run's beats, aligned at the onset of contraction"}, {"curve", curve}}
}

func driftObject(d *analysis.Drift) any {
	if d == nil {
		return nil
	}
	return object{{"steady_beats", d.Beats}, {"steady_span_s", number(d.Span)},
		{"edv_ml_per_s", number(d.EDV.Slope)}, {"edv_se_ml_per_s", number(d.EDV.SE)}, {"edv_significant", d.EDV.Significant},
		{"edp_mmhg_per_s", number(d.EDP.Slope)}, {"edp_se_mmhg_per_s", number(d.EDP.SE)}, {"edp_significant", d.EDP.Significant}}
}

func singleBeatObject(sb *analysis.SingleBeat) any {
	if sb == nil {
		return nil
	}
	var chen, klotz any
	if c := sb.Chen; c != nil {
		chen = object{{"ees_mmhg_per_ml", number(c.Ees)}, {"basis", "estimate: population-averaged normalised elastance, not a measurement"},
			{"en_d_avg", number(c.ENdAvg)}, {"en_d_est", number(c.ENdEst)}}
	}
	if k := sb.Klotz; k != nil {
		klotz = object{{"v0_ml", number(k.V0)}, {"v0_basis", "estimate: EDV·(0.6 − 0.006·EDP), not a measurement"}, {"v30_ml", number(k.V30)},
			{"alpha", number(k.Alpha)}, {"beta", number(k.Beta)}, {"form", "P = alpha·V^beta, V in mL"}}
	}
	pd := "LV pressure at the onset of ejection"
	if sb.PFrom == "aortic" {
		pd = "aortic DBP (and SBP for ps_mmhg)"
	}
	return object{
		{"beats", sb.Beats}, {"ps_mmhg", number(sb.Ps)}, {"pd_mmhg", number(sb.Pd)}, {"pressures_from", pd}, {"sv_ml", number(sb.SV)},
		{"ef", number(sb.EF)}, {"t_nd", number(sb.TNd)}, {"ejection_onset_ms", number(sb.TOpen * 1e3)}, {"ejection_end_ms", number(sb.TEnd * 1e3)},
		{"edv_ml", number(sb.EDV)}, {"edp_mmhg", number(sb.EDP)},
		{"chen_2001", chen}, {"chen_2001_note", nullable(sb.ChenErr)},
		{"klotz_2006", klotz}, {"klotz_2006_note", nullable(sb.KlotzErr)},
	}
}
