package model

import "math"

// NormalRange is the range of a measurement in resting adults, with where it
// comes from (docs/science.md §3 and §8). The explorer marks values outside it.
// Ranges recalled from memory are range checks only, never precise limits.
type NormalRange struct {
	Key       string  // metric key (see MetricSpecs)
	Low, High float64 // in the metric's unit
	Source    string
}

// NormalRanges lists the normal ranges the explorer knows. Metrics without a
// published or common range (stroke work, PVA, …) have none and are never
// marked.
var NormalRanges = []NormalRange{
	{"ea_mmhg_per_ml", 1.2, 2.0, "healthy humans 1.2–2.0 mmHg/mL [memory, docs/science.md §3]"},
	{"ees_mmhg_per_ml", 1.5, 3, "healthy humans 1.5–3 mmHg/mL [memory, docs/science.md §3]"},
	{"ea_ees_ratio", 0.5, 0.9, "healthy humans 0.5–0.9 [memory, docs/science.md §3]"},
	{"edv_ml", 83, 218, "CMR mean ± 2 SD, women 135 ± 26 and men 160 ± 29 mL (Hudsmith et al. 2005) [derived, docs/science.md §8]"},
	{"esv_ml", 18, 82, "CMR mean ± 2 SD, women 42 ± 12 and men 50 ± 16 mL (Hudsmith et al. 2005) [derived, docs/science.md §8]"},
	{"sv_ml", 60, 100, "resting adult 60–100 mL [common practice, no source]"},
	{"ef_pct", 48, 71, "CMR mean ± 2 SD, 58–61 ± 5 % (Petersen et al. 2017) [derived, docs/science.md §8]"},
	{"esp_mmhg", 80, 120, "0.9 × systolic pressure (Chen et al. 2001, docs/science.md §5) of 90–130 mmHg [common practice, no source]"},
	{"edp_mmhg", 4, 16, "LVEDP above 16 mmHg is raised (Paulus et al. 2007) [memory, docs/science.md §8]; below 4 underfilled [common practice, no source]"},
	{"co_l_per_min", 4, 8, "resting adult 4–8 L/min [common practice, no source]"},
	{"map_mmhg", 70, 105, "resting adult 70–105 mmHg [common practice, no source]"},
	{"efficiency", 0.69, 0.80, "SW/PVA = 1/(1 + ½·Ea/Ees) at Ea/Ees 0.5–0.9 [derived, docs/science.md §3]"},
	{"lap_mean_mmhg", 6, 12, "mean left-atrial or wedge pressure 6–12 mmHg [memory, docs/science.md §8]"},
	{"cvp_mmhg", 2, 6, "right-atrial pressure 2–6 mmHg [memory, docs/science.md §9]"},
	{"pap_mean_mmhg", 12, 20, "mean pulmonary arterial pressure 12–16, up to 20 mmHg [memory, docs/science.md §9]"},
}

// NormalRangeOf returns the normal range of a metric key, if one is known.
func NormalRangeOf(key string) (NormalRange, bool) {
	for _, r := range NormalRanges {
		if r.Key == key {
			return r, true
		}
	}
	return NormalRange{}, false
}

// Classify tells where v lies against the range: −1 below, +1 above, 0
// within (or NaN, which cannot be judged).
func (r NormalRange) Classify(v float64) int {
	switch {
	case v < r.Low:
		return -1
	case v > r.High:
		return 1
	}
	return 0
}

// Change is the change of a value from its baseline: delta = now − base and
// percent = 100·delta/|base|. The percentage is NaN when the baseline is 0 or
// either value is not finite; delta is NaN when either value is.
func Change(now, base float64) (delta, percent float64) {
	delta = now - base
	if base == 0 || !finite(delta) {
		return delta, math.NaN()
	}
	return delta, 100 * delta / math.Abs(base)
}
