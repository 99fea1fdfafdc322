package analysis

import (
	"math"

	"gonum.org/v1/gonum/stat"
)

// Thresholds of the data-quality warnings (common practice, no source).
const (
	noisyP      = 3    // mmHg SD
	noisyVFrac  = 0.05 // SD as a fraction of SV
	driftP      = 3    // mmHg of baseline change across the steady beats
	driftVFrac  = 0.05 // EDV change across the steady beats, fraction
	driftSpan   = 5    // s: shorter steady stretches are not judged for drift
	minDriftBts = 5    // steady beats needed to judge drift
)

// noise combines the segments' noise estimates.
func (a *Analysis) noise(sigs []*signals) {
	var sp, sv, n float64
	for _, s := range sigs {
		w := float64(s.noiseCount)
		sp += w * s.noiseP * s.noiseP
		sv += w * s.noiseV * s.noiseV
		n += w
	}
	a.NoiseP, a.NoiseV = math.Sqrt(sp/n), math.Sqrt(sv/n)
}

// checkQuality warns of noise, baseline drift and volume offsets the
// measurements carry.
func (a *Analysis) checkQuality() {
	kept := a.Kept()
	var sv []float64
	for _, b := range kept {
		if b.Measured {
			sv = append(sv, b.Metrics.SV)
		}
	}
	if len(sv) > 0 {
		msv := median(sv)
		if a.NoiseP > noisyP {
			a.warnf("pressure is noisy (noise SD about %.2g mmHg): EDP, dP/dt and τ are uncertain", a.NoiseP)
		}
		if a.NoiseV > noisyVFrac*msv {
			a.warnf("volume is noisy (noise SD about %.2g mL, %.0f %% of SV): EDV, ESV and the ESPVR are uncertain", a.NoiseV, 100*a.NoiseV/msv)
		}
	}
	// Drift: across steady beats, a trend in the lowest diastolic pressure
	// with EDV unchanged is a pressure baseline drift; a trend in EDV and ESV
	// together with pressures unchanged looks like volume drift.
	st := a.Steady
	if len(st) >= minDriftBts && st[len(st)-1].Start-st[0].Start >= driftSpan {
		n := len(st)
		ts, pmin, edv, esv, esp := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
		for i, b := range st {
			ts[i] = b.Start
			pmin[i] = minOf(b.Samples.P)
			edv[i], esv[i], esp[i] = b.Metrics.EDV, b.Metrics.ESV, b.Metrics.ESP
		}
		span := ts[n-1] - ts[0]
		change := func(y []float64) float64 {
			_, beta := stat.LinearRegression(ts, y, nil, false)
			return beta * span
		}
		dp, dedv, desv, desp := change(pmin), change(edv), change(esv), change(esp)
		medEDV := median(append([]float64(nil), edv...))
		if math.Abs(dp) > driftP && math.Abs(dedv) < driftVFrac*medEDV {
			a.warnf("the pressure baseline drifts by about %+.2g mmHg over %.0f s of steady beats while EDV holds: pressures (EDP above all) carry the drift",
				dp, span)
		}
		if math.Abs(dedv) > driftVFrac*medEDV && math.Abs(desv-dedv) < 0.5*math.Abs(dedv) && math.Abs(desp) < driftP {
			a.warnf("EDV and ESV drift together by about %+.2g mL over %.0f s of steady beats while pressures hold: volume drift (conductance) is likely; volumes carry it",
				dedv, span)
		}
	}
	// A volume offset shows as V0 far from the usual range or ESV below V0.
	if e := a.ESPVR; e != nil {
		if e.V0 < -50 {
			a.warnf("the ESPVR's V0 is %.3g mL: volumes probably carry a negative offset (parallel conductance over-corrected?)", e.V0)
		}
		for _, p := range e.Points {
			if p.V < e.V0 {
				a.warnf("an end-systolic volume lies below the ESPVR's V0: the fit is doubtful")
				break
			}
		}
	}
	if sb := a.SingleBeat; sb != nil && sb.EF > 0.9 {
		a.warnf("ejection fraction %.0f %%: volumes probably carry an offset; EF is not trustworthy", sb.EF*100)
	}
}

func minOf(x []float64) float64 {
	m := math.Inf(1)
	for _, v := range x {
		m = math.Min(m, v)
	}
	return m
}
