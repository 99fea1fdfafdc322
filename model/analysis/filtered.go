package analysis

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
)

// DefaultSmoothWindow is the Savitzky–Golay window, s, used to smooth
// pressure and volume and to differentiate pressure: short against the
// 50–100 ms of the pressure upstroke, long against the sampling interval
// (common practice, no source).
const DefaultSmoothWindow = 0.03

// detectWindow is the shortest Savitzky–Golay window, s, of the dP/dt used to
// find upstrokes and end-diastole: longer than the measuring window so that
// noise cannot make an upstroke (common practice, no source).
const detectWindow = 0.04

// sgOrder is the polynomial degree of the filters: a cubic keeps the peaks
// of pressure and dP/dt.
const sgOrder = 3

// signals are one segment of a recording after filtering.
type signals struct {
	from       int       // index of the segment's first sample in the recording
	t          []float64 // s
	p, v, pao  []float64 // smoothed (or raw when smoothing is off)
	dpdt       []float64 // mmHg/s, Savitzky–Golay derivative
	detect     []float64 // mmHg/s, smoother derivative for finding beats
	dt         float64   // mean sampling interval, s
	noiseP     float64   // estimated SD of the pressure noise, mmHg
	noiseV     float64   // estimated SD of the volume noise, mL
	noiseVOut  float64   // estimated SD of the noise left in v, mL
	noiseCount int       // samples the noise estimates rest on
}

// filterSegment smooths and differentiates one segment. window is the filter
// length in seconds; smooth false passes pressure and volume through raw.
func filterSegment(r *Recording, s Span, window float64, smooth bool) (*signals, error) {
	n := s.To - s.From
	t := r.T[s.From:s.To]
	dt := (t[n-1] - t[0]) / float64(n-1)
	w := int(math.Round(window/dt)) | 1
	w = max(w, sgOrder+2)
	if n < w {
		return nil, fmt.Errorf("segment of %d samples is shorter than the filter (%d)", n, w)
	}
	sm, err := NewSavGol(w, sgOrder, 0)
	if err != nil {
		return nil, err
	}
	d1, err := NewSavGol(w, sgOrder, 1)
	if err != nil {
		return nil, err
	}
	wd := max(w, int(math.Round(detectWindow/dt))|1)
	if n < wd {
		return nil, fmt.Errorf("segment of %d samples is shorter than the filter (%d)", n, wd)
	}
	d2, err := NewSavGol(wd, sgOrder, 1)
	if err != nil {
		return nil, err
	}
	sig := &signals{from: s.From, t: t, dt: dt}
	rawP, rawV := r.P[s.From:s.To], r.V[s.From:s.To]
	sig.dpdt = d1.Apply(nil, rawP, dt)
	sig.detect = d2.Apply(nil, rawP, dt)
	ps := sm.Apply(nil, rawP, dt)
	vs := sm.Apply(nil, rawV, dt)
	// The residual of the smooth fit estimates white noise: its variance is
	// σ²·(1 − c₀), c₀ the filter's centre weight.
	c0 := sm.coef[w/2][w/2]
	sig.noiseP = rmsDiff(rawP, ps) / math.Sqrt(1-c0)
	sig.noiseV = rmsDiff(rawV, vs) / math.Sqrt(1-c0)
	sig.noiseCount = n
	if smooth {
		// A least-squares smoother passes white noise with variance σ²·c₀.
		sig.p, sig.v = ps, vs
		sig.noiseVOut = sig.noiseV * math.Sqrt(c0)
	} else {
		sig.p, sig.v = rawP, rawV
		sig.noiseVOut = sig.noiseV
	}
	if r.Pao != nil {
		sig.pao = r.Pao[s.From:s.To]
		if smooth {
			sig.pao = sm.Apply(nil, sig.pao, dt)
		}
	}
	return sig, nil
}

// rmsDiff is the root-mean-square difference of two equally long series.
func rmsDiff(a, b []float64) float64 {
	return floats.Distance(a, b, 2) / math.Sqrt(float64(len(a)))
}
