package analysis

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/stat"
)

// EmaxFit is the time-varying elastance of a ventricle found across the
// beats of an occlusion run (the isochronal method of Suga & Sagawa, Circ
// Res 1973–1974; docs/science.md §1 and §13): at each time t after end-diastole a
// line P = E(t)·(V − V0(t)) is fitted through the beats' samples at that
// time; Emax is the largest E(t) during ejection, at TMax.
type EmaxFit struct {
	Emax  float64      // mmHg/mL
	TMax  float64      // s after end-diastole
	V0    float64      // mL, intercept of the line at TMax
	R2    float64      // of the line at TMax
	Beats int          // beats used
	Curve []EmaxSample // E(t) through systole, every emaxStep
}

// EmaxSample is one isochrone of the fit.
type EmaxSample struct {
	T  float64 // s after end-diastole
	E  float64 // mmHg/mL
	V0 float64 // mL
	R2 float64
}

// Isochrones are fitted every emaxStep of the period (at least every
// sample), from end-diastole to
// the median end of ejection; a line with r² below emaxMinR2 is not taken for
// Emax (common practice, no source).
const (
	emaxStep  = 0.005
	emaxMinR2 = 0.9
)

// fitEmax fits E(t) to the beats of a run. Beats are aligned on their onset
// of contraction, where dP/dt first passes onsetFrac of its peak (in the
// isovolumic phase dP/dt is the activation's rate times a factor of the
// load, so this point does not move with preload as end-diastole can); end
// is the time after it where ejection ends, s.
func fitEmax(beats []*Beat, end float64) (*EmaxFit, error) {
	if len(beats) < MinESPVRBeats {
		return nil, errors.New("too few beats")
	}
	// Beats of one segment share its sampling interval, so the isochrone at
	// sample k of each beat is the same time after end-diastole.
	type pv struct{ p, v []float64 }
	loops := make([]pv, 0, len(beats))
	shortest, dt := math.MaxInt, beats[0].seg.dt
	for _, b := range beats {
		if b.seg.dt != dt {
			return nil, errors.New("the run's beats are sampled at different intervals")
		}
		f := b.seg.window(b.onset-b.seg.seg.From, b.to-b.seg.seg.From)
		loops = append(loops, pv{f.P, f.V})
		shortest = min(shortest, len(f.P))
	}
	last := min(shortest-1, int(end/dt))
	stride := max(1, int(math.Round(emaxStep*float64(shortest))))
	fit := &EmaxFit{Beats: len(beats), Emax: math.Inf(-1)}
	ps := make([]float64, len(loops))
	vs := make([]float64, len(loops))
	for k := stride; k <= last; k += stride {
		for i, l := range loops {
			ps[i], vs[i] = l.p[k], l.v[k]
		}
		alpha, beta := stat.LinearRegression(vs, ps, nil, false)
		r2 := stat.RSquared(vs, ps, nil, alpha, beta)
		s := EmaxSample{T: float64(k) * dt, E: beta, V0: -alpha / beta, R2: r2}
		fit.Curve = append(fit.Curve, s)
		if r2 >= emaxMinR2 && beta > fit.Emax {
			fit.Emax, fit.TMax, fit.V0, fit.R2 = beta, s.T, s.V0, r2
		}
	}
	if math.IsInf(fit.Emax, -1) {
		return nil, errors.New("no isochrone during ejection fits a line (r² ≥ 0.9)")
	}
	return fit, nil
}
