package analysis

import (
	"math"

	"gonum.org/v1/gonum/stat"
)

// Thresholds of the data-quality warnings (common practice, no source).
const (
	noisyP      = 3    // mmHg SD
	noisyVFrac  = 0.05 // SD as a fraction of SV
	driftP      = 2    // mmHg of baseline change across the steady beats
	driftVFrac  = 0.03 // volume change across the steady beats, fraction of EDV
	driftEes    = 0.02 // drift that would move the ESPVR slope by this fraction
	driftSpan   = 3    // s: shorter steady stretches are not judged for drift
	minDriftBts = 4    // steady beats needed to judge drift
	driftSig    = 2.5  // a trend counts when its slope exceeds this many standard errors
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
	a.checkDrift()
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

// checkDrift looks for baseline drift in the steady beats, where nothing
// should change: a trend in the lowest pressure of each beat is pressure
// drift; a trend in the mean of EDV and ESV is volume drift. A significant
// trend is reported with its effect: over a preload run, drift of ΔV mL (ΔP
// mmHg) against end-systolic volumes spanning R_V (pressures spanning R_P)
// moves the ESPVR slope by about ΔV/R_V (ΔP/R_P).
func (a *Analysis) checkDrift() {
	st := a.Steady
	if len(st) < minDriftBts || st[len(st)-1].Start-st[0].Start < driftSpan {
		return
	}
	n := len(st)
	ts, pmin, vmid := make([]float64, n), make([]float64, n), make([]float64, n)
	for i, b := range st {
		ts[i] = b.Start
		pmin[i] = minOf(b.Samples.P)
		vmid[i] = 0.5 * (b.Metrics.EDV + b.Metrics.ESV)
	}
	span := ts[n-1] - ts[0]
	sp, okP := trend(ts, pmin)
	sv, okV := trend(ts, vmid)
	medEDV := median(append([]float64(nil), vmid...))
	if run := a.PreloadRun; len(run) > 0 {
		dur := run[len(run)-1].End - run[0].Start
		var esv, esp []float64
		for _, b := range run {
			esv = append(esv, b.Metrics.ESV)
			esp = append(esp, b.Metrics.ESP)
		}
		rv, rp := spread(esv), spread(esp)
		if okV && rv > 0 && math.Abs(sv*dur/rv) > driftEes {
			a.warnf("volume drifts about %+.2g mL/s in the steady beats (conductance drift?): over the %.0f-s preload run that is %.2g mL against end-systolic volumes spanning %.3g mL, moving the ESPVR slope by about %.0f %%",
				sv, dur, math.Abs(sv*dur), rv, 100*math.Abs(sv*dur/rv))
		}
		if okP && rp > 0 && math.Abs(sp*dur/rp) > driftEes {
			a.warnf("the pressure baseline drifts about %+.2g mmHg/s in the steady beats: over the %.0f-s preload run that is %.2g mmHg against end-systolic pressures spanning %.3g mmHg, moving the ESPVR slope by about %.0f %%",
				sp, dur, math.Abs(sp*dur), rp, 100*math.Abs(sp*dur/rp))
		}
		return
	}
	if okP && math.Abs(sp*span) > driftP {
		a.warnf("the pressure baseline drifts by about %+.2g mmHg over %.0f s of steady beats: pressures (EDP above all) carry the drift", sp*span, span)
	}
	if okV && math.Abs(sv*span) > driftVFrac*medEDV {
		a.warnf("volumes drift by about %+.2g mL over %.0f s of steady beats (conductance drift?): volumes carry the drift", sv*span, span)
	}
}

// trend is the least-squares slope of y against t, and whether it exceeds
// driftSig standard errors.
func trend(t, y []float64) (float64, bool) {
	alpha, beta := stat.LinearRegression(t, y, nil, false)
	var rss, stt float64
	mt := stat.Mean(t, nil)
	for i := range t {
		r := y[i] - alpha - beta*t[i]
		rss += r * r
		stt += (t[i] - mt) * (t[i] - mt)
	}
	se := math.Sqrt(rss/float64(len(t)-2)) / math.Sqrt(stt)
	return beta, math.Abs(beta) > driftSig*se
}

func spread(x []float64) float64 {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range x {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	return hi - lo
}
