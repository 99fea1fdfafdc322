package model

import "math"

// noDeviceMetrics marks the lesion and support metrics as not measured.
func (m *Metrics) noDeviceMetrics() {
	nan := math.NaN()
	m.AVMeanGradient, m.AVPeakGradient, m.MVMeanGradient = nan, nan, nan
	m.RegurgitantVolume, m.RegurgitantFraction, m.ForwardSV, m.TotalSV = nan, nan, nan, nan
	m.AVOpen, m.PumpCO, m.TotalCO, m.DiastolicAugment, m.AorticEDP = nan, nan, nan, nan, nan
}

// measureDevices adds to b's metrics what the valves and the support devices
// show, from the beat's samples (docs/science.md §11–12). The valves' events
// lie on samples, so that each interval between samples lies within one
// phase of a valve; an interval counts as forward flow (an open valve) when
// the gradient across the valve at its middle (the mean of its ends) is
// positive: the gradient has the sign of the flow, and at an event, where it
// is zero only to the solver's accuracy, the other end decides. The
// integrals are trapezoidal.
//
//   - Gradients across the aortic (LV − proximal aortic pressure) and mitral
//     valve (LA − LV pressure): the mean over the time of forward flow, and
//     the aortic valve's instantaneous peak.
//   - Regurgitant volume: the backflow through both valves; the regurgitant
//     fraction is its share of the total stroke volume (EDV − smallest
//     volume, as sv_ml). The forward stroke volume is the net flow through
//     the aortic valve; without a pump, in a steady beat, forward SV plus
//     regurgitant volume is the total SV when each valve's backflow and the
//     other's forward flow never overlap [derived].
//   - Output: the pump's mean flow, and the output to the body, net aortic
//     valve flow plus pump flow, in L/min.
//   - Diastolic augmentation: the highest proximal aortic pressure from the
//     start of diastole (b.DiastoleStart) to the end of the beat less the
//     pressure at that start; the aortic end-diastolic pressure is the
//     proximal aortic pressure at the end of the beat.
func (s *Solver) measureDevices(b *Beat) {
	m := &b.Metrics
	t, n := b.T, len(b.T)
	var av, avT, mv, mvT, back, fwd, pumped float64
	peak := math.Inf(-1)
	for i := 1; i < n; i++ {
		dt := t[i] - t[i-1]
		trap := func(y []float64) float64 { return 0.5 * (y[i] + y[i-1]) * dt }
		qa, qm := trap(b.QOut), trap(b.QIn)
		fwd += qa
		pumped += trap(b.QPump)
		back += math.Max(-qa, 0) + math.Max(-qm, 0)
		if g := 0.5 * (b.PLV[i] - b.PAO[i] + b.PLV[i-1] - b.PAO[i-1]); g > 0 {
			av += g * dt
			avT += dt
			for _, j := range [2]int{i - 1, i} {
				peak = math.Max(peak, b.PLV[j]-b.PAO[j])
			}
		}
		if g := 0.5 * (s.leftAtrial(b, i) - b.PLV[i] + s.leftAtrial(b, i-1) - b.PLV[i-1]); g > 0 {
			mv += g * dt
			mvT += dt
		}
	}
	nan := math.NaN()
	m.AVMeanGradient, m.AVPeakGradient, m.MVMeanGradient = nan, nan, nan
	if avT > 0 {
		m.AVMeanGradient, m.AVPeakGradient = av/avT, peak
	}
	if mvT > 0 {
		m.MVMeanGradient = mv / mvT
	}
	m.AVOpen = 1000 * avT
	m.TotalSV = m.SV
	m.ForwardSV = fwd
	m.RegurgitantVolume = back
	m.RegurgitantFraction = 100 * back / m.SV
	perMin := 60 / b.Period / 1000 // mL per beat to L/min
	m.PumpCO = pumped * perMin
	m.TotalCO = (fwd + pumped) * perMin

	m.AorticEDP = b.PAO[n-1]
	m.DiastolicAugment = nan
	for i, ti := range t {
		if ti >= b.DiastoleStart-1e-9 { // the start is a sample (mergeTimes)
			top := b.PAO[i]
			for _, p := range b.PAO[i:] {
				top = math.Max(top, p)
			}
			m.DiastolicAugment = top - b.PAO[i]
			break
		}
	}
}

// leftAtrial returns the left-atrial pressure at sample i: the held filling
// pressure, or the closed circulation's atrium.
func (s *Solver) leftAtrial(b *Beat, i int) float64 {
	if !s.c.closed {
		return s.p.FillingPressure
	}
	return b.P[LeftAtrium][i]
}
