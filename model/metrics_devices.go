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
//     fraction is its share of the total stroke volume (the volume ejected,
//     as sv_ml). The forward stroke volume is the net flow through
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
	laPrev := s.leftAtrial(b, 0)
	var av, avT, mv, mvT, back, fwd, pumped float64
	peak := math.Inf(-1)
	gPrev := b.PLV[0] - b.PAO[0]
	for i := 1; i < n; i++ {
		dt := t[i] - t[i-1]
		qa := 0.5 * (b.QOut[i] + b.QOut[i-1]) * dt
		qm := 0.5 * (b.QIn[i] + b.QIn[i-1]) * dt
		fwd += qa
		pumped += 0.5 * (b.QPump[i] + b.QPump[i-1]) * dt
		if qa < 0 {
			back -= qa
		}
		if qm < 0 {
			back -= qm
		}
		g := b.PLV[i] - b.PAO[i]
		if mid := 0.5 * (g + gPrev); mid > 0 {
			av += mid * dt
			avT += dt
			if gPrev > peak {
				peak = gPrev
			}
			if g > peak {
				peak = g
			}
		}
		gPrev = g
		laI := s.leftAtrial(b, i)
		if mid := 0.5 * (laI - b.PLV[i] + laPrev - b.PLV[i-1]); mid > 0 {
			mv += mid * dt
			mvT += dt
		}
		laPrev = laI
	}
	// Measure has marked the gradients and the augmentation not measured.
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
	for i, ti := range t {
		if ti >= b.DiastoleStart-1e-9 { // the start is a sample (mergeTimes)
			top, _ := extremes(b.PAO[i:])
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
