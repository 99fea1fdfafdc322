package analysis

import (
	"math"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Thresholds of the data-quality warnings (common practice, no source).
const (
	noisyP      = 3    // mmHg SD
	noisyVFrac  = 0.05 // SD as a fraction of SV
	driftP      = 2    // mmHg of EDP change across the steady beats
	driftVFrac  = 0.03 // EDV change across the steady beats, fraction of EDV
	driftEes    = 0.02 // drift that would move the ESPVR slope by this fraction
	driftSpan   = 3    // s: shorter steady time is not judged for drift
	minDriftBts = 4    // steady beats needed to judge drift
	driftLevel  = 0.01 // a trend counts when a two-sided t-test rejects no trend at this level
)

// Drift is the baseline drift of a recording, measured on its steady
// segments only: the beat-to-beat trend of EDV and EDP against time, pooled
// within segments (each segment's own mean removed, one common slope), so
// that the jumps between steady states before and after an occlusion or a
// drug are not taken for drift.
type Drift struct {
	Beats    int     // steady beats
	Span     float64 // s of steady beats (the segments' spans summed)
	EDV, EDP Trend
}

// Trend is a least-squares slope with its standard error.
type Trend struct {
	Slope       float64 // per second
	SE          float64
	Significant bool // the t-test of no trend fails at driftLevel
}

// checkQuality warns of noise, baseline drift and volume offsets the
// measurements carry.
func (a *Analysis) checkQuality() {
	var sv []float64
	for _, b := range a.Kept() {
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
	for _, run := range a.Runs {
		e := run.ESPVR
		if e == nil {
			continue
		}
		if e.V0 < -0.3*run.Beats[0].Metrics.EDV {
			a.warnf("the ESPVR of beats %d–%d has V0 %.3g mL: volumes probably carry a negative offset (parallel volume over-corrected?)", run.First(), run.Last(), e.V0)
		}
		for _, p := range e.Points {
			if p.V < e.V0 {
				a.warnf("an end-systolic volume of beats %d–%d lies below the ESPVR's V0: the fit is doubtful", run.First(), run.Last())
				break
			}
		}
	}
	if sb := a.SingleBeat; sb != nil && sb.EF > 0.9 {
		a.warnf("ejection fraction %.0f %%: volumes probably carry an offset; EF is not trustworthy", sb.EF*100)
	}
}

// measureDrift pools the steady segments' trends of EDV and EDP; nil when
// there are too few steady beats or too little time.
func (a *Analysis) measureDrift() *Drift {
	var tc, vc, pc []float64
	d := &Drift{}
	segs := 0
	for _, seg := range a.SteadySegments {
		if len(seg) < 2 {
			continue
		}
		var mt, mv, mp float64
		for _, b := range seg {
			mt += b.Start
			mv += b.Metrics.EDV
			mp += b.Metrics.EDP
		}
		n := float64(len(seg))
		mt, mv, mp = mt/n, mv/n, mp/n
		for _, b := range seg {
			tc = append(tc, b.Start-mt)
			vc = append(vc, b.Metrics.EDV-mv)
			pc = append(pc, b.Metrics.EDP-mp)
		}
		d.Span += seg[len(seg)-1].Start - seg[0].Start
		segs++
	}
	d.Beats = len(tc)
	if d.Beats < minDriftBts || d.Span < driftSpan || d.Beats-segs-1 < 1 {
		return nil
	}
	d.EDV, d.EDP = pooledTrend(tc, vc, segs), pooledTrend(tc, pc, segs)
	return d
}

// pooledTrend is the common slope of y against t, both centred within each
// of segs segments (a regression through the origin), with its standard error.
func pooledTrend(t, y []float64, segs int) Trend {
	_, beta := stat.LinearRegression(t, y, nil, true)
	var rss, stt float64
	for i := range t {
		r := y[i] - beta*t[i]
		rss += r * r
		stt += t[i] * t[i]
	}
	dof := float64(len(t) - segs - 1)
	se := math.Sqrt(rss/dof) / math.Sqrt(stt)
	crit := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: dof}.Quantile(1 - driftLevel/2)
	return Trend{Slope: beta, SE: se, Significant: math.Abs(beta) > crit*se}
}

// checkDrift warns of a significant drift with its effect: over a preload
// run, drift of ΔV mL (ΔP mmHg) against end-systolic volumes spanning R_V
// (pressures spanning R_P) moves the ESPVR slope by about ΔV/R_V (ΔP/R_P);
// without one, what it adds to the volumes (pressures) across the steady beats.
func (a *Analysis) checkDrift() {
	d := a.measureDrift()
	a.Drift = d
	if d == nil {
		return
	}
	if len(a.Runs) > 0 {
		var worstV, worstP float64
		var wv, wp *Run
		var dv, dp, rvv, rpp float64
		for _, run := range a.Runs {
			b := run.Beats
			dur := b[len(b)-1].End - b[0].Start
			var esv, esp []float64
			for _, x := range b {
				esv = append(esv, x.Metrics.ESV)
				esp = append(esp, x.Metrics.ESP)
			}
			rv, rp := spread(esv), spread(esp)
			if e := math.Abs(d.EDV.Slope * dur / rv); d.EDV.Significant && rv > 0 && e > driftEes && e > worstV {
				worstV, wv, dv, rvv = e, run, dur, rv
			}
			if e := math.Abs(d.EDP.Slope * dur / rp); d.EDP.Significant && rp > 0 && e > driftEes && e > worstP {
				worstP, wp, dp, rpp = e, run, dur, rp
			}
		}
		if wv != nil {
			a.warnf("volume drifts about %+.2g mL/s in the steady beats (conductance drift?): over the %.0f-s preload run of beats %d–%d that is %.2g mL against end-systolic volumes spanning %.3g mL, moving the ESPVR slope by about %.0f %%",
				d.EDV.Slope, dv, wv.First(), wv.Last(), math.Abs(d.EDV.Slope*dv), rvv, 100*worstV)
		}
		if wp != nil {
			a.warnf("the pressure baseline drifts about %+.2g mmHg/s in the steady beats: over the %.0f-s preload run of beats %d–%d that is %.2g mmHg against end-systolic pressures spanning %.3g mmHg, moving the ESPVR slope by about %.0f %%",
				d.EDP.Slope, dp, wp.First(), wp.Last(), math.Abs(d.EDP.Slope*dp), rpp, 100*worstP)
		}
		return
	}
	var edv []float64
	for _, b := range a.Steady {
		edv = append(edv, b.Metrics.EDV)
	}
	medEDV := median(edv)
	if d.EDP.Significant && math.Abs(d.EDP.Slope*d.Span) > driftP {
		a.warnf("the pressure baseline drifts by about %+.2g mmHg over %.0f s of steady beats: pressures (EDP above all) carry the drift", d.EDP.Slope*d.Span, d.Span)
	}
	if d.EDV.Significant && math.Abs(d.EDV.Slope*d.Span) > driftVFrac*medEDV {
		a.warnf("volumes drift by about %+.2g mL over %.0f s of steady beats (conductance drift?): volumes carry the drift", d.EDV.Slope*d.Span, d.Span)
	}
}

func spread(x []float64) float64 {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range x {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	return hi - lo
}
