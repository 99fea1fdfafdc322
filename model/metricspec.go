package model

// MetricSpec describes one measurement: its key (unit in the name), unit,
// short label and meaning.
type MetricSpec struct {
	Key     string
	Unit    string
	Label   string
	Meaning string
	Get     func(*Metrics) float64
}

// MetricSpecs lists every measurement in output order. The keys are the
// column names of CSV output and the names in JSON output.
var MetricSpecs = []MetricSpec{
	{"edv_ml", "mL", "EDV", "end-diastolic volume (at mitral closure)", func(m *Metrics) float64 { return m.EDV }},
	{"esv_ml", "mL", "ESV", "end-systolic volume (at maximal P/(V−V0))", func(m *Metrics) float64 { return m.ESV }},
	{"sv_ml", "mL", "SV", "stroke volume ejected, largest − smallest volume", func(m *Metrics) float64 { return m.SV }},
	{"ef_pct", "%", "EF", "ejection fraction SV/EDV", func(m *Metrics) float64 { return m.EF }},
	{"edp_mmhg", "mmHg", "EDP", "end-diastolic pressure", func(m *Metrics) float64 { return m.EDP }},
	{"esp_mmhg", "mmHg", "ESP", "end-systolic pressure", func(m *Metrics) float64 { return m.ESP }},
	{"ea_mmhg_per_ml", "mmHg/mL", "Ea", "effective arterial elastance ESP/SV", func(m *Metrics) float64 { return m.Ea }},
	{"ees_mmhg_per_ml", "mmHg/mL", "Ees", "end-systolic elastance (slope of the ESPVR)", func(m *Metrics) float64 { return m.Ees }},
	{"ea_ees_ratio", "", "Ea/Ees", "ventricular–arterial coupling ratio", func(m *Metrics) float64 { return m.EaEes }},
	{"ea_hr_r_mmhg_per_ml", "mmHg/mL", "Ea≈HR·R", "Ea estimated as total resistance × heart rate (Sunagawa 1983)", func(m *Metrics) float64 { return m.EaRT }},
	{"ea_segers_mmhg_per_ml", "mmHg/mL", "Ea(Segers)", "Ea estimated as −0.13 + 1.02·R/T + 0.31/C (Segers 2002)", func(m *Metrics) float64 { return m.EaSegers }},
	{"hr_bpm", "bpm", "HR", "heart rate", func(m *Metrics) float64 { return m.HR }},
	{"co_l_per_min", "L/min", "CO", "cardiac output SV·HR, as the PV catheter reads it; with regurgitation above the output to the body (tot CO)", func(m *Metrics) float64 { return m.CO }},
	{"map_mmhg", "mmHg", "MAP", "mean proximal aortic pressure over the beat", func(m *Metrics) float64 { return m.MAP }},
	{"sbp_mmhg", "mmHg", "SBP", "systolic (peak) aortic pressure", func(m *Metrics) float64 { return m.SBP }},
	{"dbp_mmhg", "mmHg", "DBP", "diastolic (lowest) aortic pressure", func(m *Metrics) float64 { return m.DBP }},
	{"sw_mmhg_ml", "mmHg·mL", "SW", "stroke work, the loop area", func(m *Metrics) float64 { return m.SW }},
	{"pe_mmhg_ml", "mmHg·mL", "PE", "potential energy, between ESPVR and EDPVR left of the loop", func(m *Metrics) float64 { return m.PE }},
	{"pva_mmhg_ml", "mmHg·mL", "PVA", "pressure–volume area SW + PE", func(m *Metrics) float64 { return m.PVA }},
	{"efficiency", "", "SW/PVA", "work per pressure–volume area (fraction)", func(m *Metrics) float64 { return m.Efficiency }},
	{"vo2_ml_per_beat", "mL O2", "VO2", "myocardial O2 use per beat of the whole LV, from PVA (Suga)", func(m *Metrics) float64 { return m.VO2 }},
	{"vo2_ml_per_beat_100g", "mL O2/100 g", "VO2/100g", "myocardial O2 use per beat per 100 g of LV (Suga's per-mass form)", func(m *Metrics) float64 { return m.VO2Per100g }},
	{"mechanical_efficiency", "", "SW/VO2", "mechanical efficiency: stroke work over the energy of the O2 used (fraction)", func(m *Metrics) float64 { return m.MechEff }},
	{"dpdt_max_mmhg_per_s", "mmHg/s", "dP/dt max", "peak rate of LV pressure rise", func(m *Metrics) float64 { return m.DPdtMax }},
	{"dpdt_min_mmhg_per_s", "mmHg/s", "dP/dt min", "peak rate of LV pressure fall", func(m *Metrics) float64 { return m.DPdtMin }},
	{"tau_ms", "ms", "τ", "isovolumic relaxation time constant (Weiss)", func(m *Metrics) float64 { return m.Tau }},
	{"ed_wall_stress_kdyn_cm2", "10³ dyn/cm²", "σ ED", "end-diastolic meridional wall stress", func(m *Metrics) float64 { return m.EDStress }},
	{"es_wall_stress_kdyn_cm2", "10³ dyn/cm²", "σ ES", "end-systolic meridional wall stress", func(m *Metrics) float64 { return m.ESStress }},
	{"lap_mean_mmhg", "mmHg", "LAP", "mean left-atrial pressure (the filling pressure when held)", func(m *Metrics) float64 { return m.LAPMean }},
	{"atrial_filling_pct", "%", "A fill", "share of LV filling during atrial contraction (closed circulation)", func(m *Metrics) float64 { return m.AtrialFilling }},
	{"cvp_mmhg", "mmHg", "CVP", "mean right-atrial (central venous) pressure (closed circulation)", func(m *Metrics) float64 { return m.CVP }},
	{"pap_mean_mmhg", "mmHg", "mPAP", "mean pulmonary arterial pressure (closed circulation)", func(m *Metrics) float64 { return m.PAPMean }},
	{"rv_sv_ml", "mL", "RV SV", "right-ventricular stroke volume (closed circulation)", func(m *Metrics) float64 { return m.RVSV }},
	{"av_mean_gradient_mmhg", "mmHg", "AV ΔP", "mean LV − aortic pressure while the aortic valve passes forward flow", func(m *Metrics) float64 { return m.AVMeanGradient }},
	{"av_peak_gradient_mmhg", "mmHg", "AV pk ΔP", "peak instantaneous LV − aortic pressure during forward aortic flow", func(m *Metrics) float64 { return m.AVPeakGradient }},
	{"mv_mean_gradient_mmhg", "mmHg", "MV ΔP", "mean LA − LV pressure while the mitral valve passes forward flow", func(m *Metrics) float64 { return m.MVMeanGradient }},
	{"regurgitant_volume_ml", "mL", "RVol", "backflow through the mitral and aortic valves per beat", func(m *Metrics) float64 { return m.RegurgitantVolume }},
	{"regurgitant_fraction_pct", "%", "RF", "regurgitant volume over total stroke volume", func(m *Metrics) float64 { return m.RegurgitantFraction }},
	{"forward_sv_ml", "mL", "fwd SV", "net flow through the aortic valve per beat", func(m *Metrics) float64 { return m.ForwardSV }},
	{"total_sv_ml", "mL", "tot SV", "all the ventricle ejects, forward and back (as sv_ml)", func(m *Metrics) float64 { return m.TotalSV }},
	{"av_open_ms", "ms", "AV ET", "time the aortic valve passes forward flow (0: it stays shut)", func(m *Metrics) float64 { return m.AVOpen }},
	{"pump_co_l_per_min", "L/min", "pump", "mean flow of the LV-to-aorta pump", func(m *Metrics) float64 { return m.PumpCO }},
	{"total_co_l_per_min", "L/min", "tot CO", "output to the body: net aortic valve flow plus pump flow", func(m *Metrics) float64 { return m.TotalCO }},
	{"diastolic_augmentation_mmhg", "mmHg", "dia ↑", "peak aortic pressure in diastole less its value at aortic valve closure", func(m *Metrics) float64 { return m.DiastolicAugment }},
	{"aortic_edp_mmhg", "mmHg", "Ao EDP", "aortic pressure at the end of diastole (the onset of the next contraction)", func(m *Metrics) float64 { return m.AorticEDP }},
}

// MetricByKey returns the spec of a metric key.
func MetricByKey(key string) (MetricSpec, bool) {
	for _, s := range MetricSpecs {
		if s.Key == key {
			return s, true
		}
	}
	return MetricSpec{}, false
}
