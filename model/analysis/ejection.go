package analysis

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/floats"
)

// Ejection is the timing of ejection in one beat, read from the timing
// filters (fixed fractions of the beat period, independent of the smoothing
// setting; docs/science.md §5):
//
//   - the onset of ejection is where the outflow −dV/dt, rising towards its
//     peak, crosses onsetFlowFrac of the peak (or three noise SDs of the
//     outflow, if more): the start of the volume fall;
//   - the end of ejection is where the volume, after the peak outflow,
//     reaches the plateau of isovolumic relaxation: it first comes within
//     three noise SDs (at least 0.1 % of EDV) of its smallest value before
//     filling starts (inflow beyond the onset threshold; the last half window
//     before it is left out, where the smoother dips ahead of the inflow).
//
// These are the volume analogues of reading ejection from the start and end
// of the aortic flow, as the timing of Chen et al. 2001 was read (from
// memory). The smallest volume itself is not used: volume is flat through
// isovolumic relaxation, so where along the plateau its minimum falls is
// noise, and smoothing slides it towards mitral opening.
type Ejection struct {
	Open  float64 // s from end-diastole (the beat's first sample): onset of ejection
	Close float64 // s from end-diastole: end of ejection
	POpen float64 // LV pressure at the onset of ejection, mmHg
	// VEnd is the volume left at the end of ejection, mL: the median of the
	// measured volume over the plateau from the end of ejection to where
	// filling starts (the volume ejected is EDV − VEnd); TEnd is the middle
	// of that plateau, s from end-diastole.
	VEnd, TEnd float64
	Err        string // why the timing could not be read; empty when it was
}

// onsetFlowFrac is the share of the peak outflow that marks the onset of
// ejection; endBandSD and endBandMin the band of the end (common practice,
// no source).
const (
	onsetFlowFrac = 0.05
	endBandSD     = 3
	endBandMin    = 1e-3
)

func noEjection(why string) Ejection {
	return Ejection{Open: nan, Close: nan, POpen: nan, VEnd: nan, TEnd: nan, Err: why}
}

// Found reports whether the timing was read.
func (e Ejection) Found() bool { return e.Err == "" }

// ejectionTiming reads the onset and end of ejection of a beat; sig gives
// the noise of its timing signals.
func ejectionTiming(f filtered, sig *signals) Ejection {
	q, t, v := f.Flow, f.T, f.VT
	n := len(q)
	iq := floats.MaxIdx(q)
	qmax := q[iq]
	if !(qmax > 0) || iq == 0 || iq == n-1 {
		return noEjection("no outflow peak inside the beat")
	}
	thr := math.Max(onsetFlowFrac*qmax, 3*sig.noiseFlow)
	if !(thr < qmax) {
		return noEjection("the outflow does not rise above its noise")
	}
	open, pOpen := math.NaN(), math.NaN()
	for i := iq; i > 0; i-- {
		if q[i] >= thr && q[i-1] < thr {
			// The crossing, and the pressure there, between two samples.
			frac := (thr - q[i-1]) / (q[i] - q[i-1])
			open, pOpen = t[i-1]+frac*(t[i]-t[i-1]), f.P[i-1]+frac*(f.P[i]-f.P[i-1])
			break
		}
	}
	if math.IsNaN(open) {
		return noEjection("the outflow is already high at end-diastole")
	}
	// The plateau ends where filling starts (inflow beyond the threshold);
	// the smoother dips below the plateau half its window before that.
	fill := n
	for i := iq; i < n; i++ {
		if q[i] <= -thr {
			fill = i
			break
		}
	}
	last := fill - sig.ts.Window/2
	if last <= iq+1 {
		last = fill
	}
	vmin := slices.Min(v[iq:last])
	band := math.Max(endBandSD*sig.noiseVT, endBandMin*v[0])
	closeT, iClose := math.NaN(), 0
	for i := iq + 1; i < last; i++ {
		if v[i] <= vmin+band {
			lvl := vmin + band
			closeT, iClose = t[i-1]+(v[i-1]-lvl)/(v[i-1]-v[i])*(t[i]-t[i-1]), i
			break
		}
	}
	t0 := t[0]
	if math.IsNaN(closeT) || !(closeT > t[iq]) || closeT >= t[n-1] {
		return noEjection(fmt.Sprintf("no end of the volume fall after the peak outflow (%.0f ms after end-diastole)", (t[iq]-t0)*1e3))
	}
	end := max(last, iClose+1)
	plateau := append([]float64(nil), f.V[iClose:end]...)
	return Ejection{Open: open - t0, Close: closeT - t0, POpen: pOpen, VEnd: median(plateau),
		TEnd: 0.5*(t[iClose]+t[end-1]) - t0}
}
