package analysis

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/interp"
	"gonum.org/v1/gonum/stat"
)

// Ejection is the timing of ejection in one beat, read from the outflow
// −dV/dt (the timing filter's, independent of the smoothing setting).
//
// The onset and the end of ejection are where the outflow's rising and
// falling limbs, each fitted by a straight line between limbLow and limbHigh
// of the peak outflow, reach zero (docs/science.md §5): the volume analogue of
// reading ejection time from the start and end of the aortic flow envelope,
// which is how the timing of Chen et al. 2001 was taken (from memory). The
// smallest volume is not used: volume is flat through isovolumic relaxation,
// so any smoothing slides its minimum towards mitral opening; the straight
// middle of a limb is kept by a cubic Savitzky–Golay filter of any length
// that fits inside it.
type Ejection struct {
	Open  float64 // s from end-diastole (the beat's first sample): onset of ejection
	Close float64 // s from end-diastole: end of ejection
	POpen float64 // LV pressure at the onset of ejection, mmHg
	Err   string  // why the timing could not be read; empty when it was
}

// Limbs of the outflow used for the timing, fractions of its peak (common
// practice, no source).
const (
	limbLow  = 0.2
	limbHigh = 0.8
)

func noEjection(why string) Ejection { return Ejection{Open: nan, Close: nan, POpen: nan, Err: why} }

// Found reports whether the timing was read.
func (e Ejection) Found() bool { return e.Err == "" }

// ejectionTiming reads the onset and end of ejection of a beat.
func ejectionTiming(f filtered) Ejection {
	q, t := f.Flow, f.T
	n := len(q)
	iq := 0
	for i := range q {
		if q[i] > q[iq] {
			iq = i
		}
	}
	qmax := q[iq]
	if !(qmax > 0) || iq == 0 || iq == n-1 {
		return noEjection("no outflow peak inside the beat")
	}
	// Rising limb: back from the peak to the last sample at or below
	// limbHigh, then on to the last at or below limbLow.
	hi := iq
	for hi > 0 && q[hi] > limbHigh*qmax {
		hi--
	}
	lo := hi
	for lo > 0 && q[lo] > limbLow*qmax {
		lo--
	}
	open, err := limbZero(t, q, lo, hi+1, qmax, 1)
	if err != nil {
		return noEjection("onset of ejection: " + err.Error())
	}
	hi2 := iq
	for hi2 < n-1 && q[hi2] > limbHigh*qmax {
		hi2++
	}
	lo2 := hi2
	for lo2 < n-1 && q[lo2] > limbLow*qmax {
		lo2++
	}
	closeT, err := limbZero(t, q, hi2, lo2+1, qmax, -1)
	if err != nil {
		return noEjection("end of ejection: " + err.Error())
	}
	t0 := t[0]
	if !(open >= t0 && open < t[iq] && closeT > t[iq] && closeT <= t[n-1]) {
		return noEjection(fmt.Sprintf("outflow limbs meet zero outside the beat (onset %.0f ms, end %.0f ms after end-diastole)", (open-t0)*1e3, (closeT-t0)*1e3))
	}
	return Ejection{Open: open - t0, Close: closeT - t0, POpen: interpAt(t, f.P, open)}
}

// limbZero fits a line to the samples [from, to) whose outflow lies between
// limbLow and limbHigh of qmax (or to all of them when fewer than 3 do) and
// returns where it reaches zero; sign is the slope's expected sign.
func limbZero(t, q []float64, from, to int, qmax, sign float64) (float64, error) {
	var xs, ys []float64
	for i := from; i < to; i++ {
		if q[i] >= limbLow*qmax && q[i] <= limbHigh*qmax {
			xs, ys = append(xs, t[i]), append(ys, q[i])
		}
	}
	if len(xs) < 3 {
		xs, ys = t[from:to], q[from:to]
	}
	if len(xs) < 2 {
		return 0, fmt.Errorf("outflow limb too steep for the sampling")
	}
	alpha, beta := stat.LinearRegression(xs, ys, nil, false)
	if !(sign*beta > 0) {
		return 0, fmt.Errorf("outflow limb has no clear slope")
	}
	return -alpha / beta, nil
}

// interpAt interpolates y(t) linearly at x, inside t.
func interpAt(t, y []float64, x float64) float64 {
	var pl interp.PiecewiseLinear
	if err := pl.Fit(t, y); err != nil {
		return nan
	}
	return pl.Predict(math.Max(t[0], math.Min(t[len(t)-1], x)))
}
