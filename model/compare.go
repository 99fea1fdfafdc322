package model

// MetricChange is the change of one metric from a baseline beat to a what-if.
type MetricChange struct {
	Spec     MetricSpec
	Baseline float64
	WhatIf   float64
	Delta    float64 // WhatIf − Baseline
	Percent  float64 // 100·Delta/|Baseline|; NaN when Baseline is 0 or either value is not finite
}

// CompareMetrics returns the change of every metric from base to whatIf, in
// the order of MetricSpecs.
func CompareMetrics(base, whatIf *Metrics) []MetricChange {
	out := make([]MetricChange, len(MetricSpecs))
	for i, s := range MetricSpecs {
		b, w := s.Get(base), s.Get(whatIf)
		d, pct := Change(w, b)
		out[i] = MetricChange{Spec: s, Baseline: b, WhatIf: w, Delta: d, Percent: pct}
	}
	return out
}
