package model

import "math"

// measureCirculation adds to b's metrics what the rest of the circulation
// shows. Held: the left-atrial pressure is the filling pressure and the rest
// is not modelled (NaN). Closed: the time means of left-atrial,
// right-atrial (central venous) and pulmonary arterial pressure, the right
// ventricle's stroke volume (its largest less its smallest volume), and the
// share of forward mitral inflow that enters while the atria contract (the A
// wave of the filling, docs/science.md §9).
func (s *Solver) measureCirculation(b *Beat) {
	m := &b.Metrics
	m.LAPMean = b.LAPMean
	if !s.c.closed {
		return
	}
	m.CVP = timeMean(b.T, b.P[RightAtrium])
	m.PAPMean = timeMean(b.T, b.P[PulmonaryArteries])
	hi, lo := extremes(b.V[RightVentricle])
	m.RVSV = hi - lo
	var all, atrial float64
	for i := 1; i < len(b.T); i++ {
		q := 0.5 * (b.QIn[i] + b.QIn[i-1]) * (b.T[i] - b.T[i-1])
		if q <= 0 {
			continue // mitral regurgitation is not filling
		}
		all += q
		if s.c.atr.contracting(0.5 * (b.T[i] + b.T[i-1])) {
			atrial += q
		}
	}
	m.AtrialFilling = math.NaN()
	if all > 0 {
		m.AtrialFilling = 100 * atrial / all
	}
}
