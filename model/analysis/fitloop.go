package analysis

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/interp"

	"pvcouple/model"
)

// Loop is one cardiac cycle on a phase grid: M samples spaced Period/M
// apart, starting phaseLead (a quarter period) before peak dP/dt. The
// recording's mean loop and a model's loop are compared on it, sample by
// sample.
type Loop struct {
	Period float64   // s
	T      []float64 // s from the start of the grid
	P      []float64 // LV pressure, mmHg
	V      []float64 // LV volume, mL
}

// loopPoints is the number of samples of a Loop; phaseLead is where the
// grid starts before peak dP/dt, as a fraction of the period.
const (
	loopPoints = 200
	phaseLead  = 0.25
)

// meanLoop averages the steady beats of an analysis on the phase grid. Each
// beat is aligned on its peak dP/dt (parabolically refined between samples)
// and read from the filtered, continuous recording, so the grid may run into
// the neighbouring beats.
func meanLoop(beats []*Beat, period float64) (*Loop, int, error) {
	l := newLoop(period)
	used := 0
	for _, b := range beats {
		s := b.seg
		f := b.filtered()
		ta := peakTime(f.T, f.DPdt)
		start := ta - phaseLead*period
		i0 := int(math.Floor((start-s.seg.Start)/s.dt)) - 1
		i1 := int(math.Ceil((start+period-s.seg.Start)/s.dt)) + 2
		if i0 < 0 || i1 > s.n {
			continue
		}
		w := s.window(i0, i1)
		var fp, fv interp.PiecewiseLinear
		if err := fp.Fit(w.T, w.P); err != nil {
			return nil, 0, err
		}
		if err := fv.Fit(w.T, w.V); err != nil {
			return nil, 0, err
		}
		for m, tau := range l.T {
			l.P[m] += fp.Predict(start + tau)
			l.V[m] += fv.Predict(start + tau)
		}
		used++
	}
	if used == 0 {
		return nil, 0, errors.New("no steady beat lies far enough from the ends of its segment")
	}
	for m := range l.T {
		l.P[m] /= float64(used)
		l.V[m] /= float64(used)
	}
	return l, used, nil
}

// rmsDiff is the root-mean-square difference of two equally long series.
func rmsDiff(a, b []float64) float64 {
	return floats.Distance(a, b, 2) / math.Sqrt(float64(len(a)))
}

func newLoop(period float64) *Loop {
	l := &Loop{Period: period, T: make([]float64, loopPoints), P: make([]float64, loopPoints), V: make([]float64, loopPoints)}
	for m := range l.T {
		l.T[m] = float64(m) * period / loopPoints
	}
	return l
}

// peakTime is the time of the largest value of y, refined by the vertex of
// the parabola through it and its neighbours.
func peakTime(t, y []float64) float64 {
	k := 0
	for i := range y {
		if y[i] > y[k] {
			k = i
		}
	}
	if k == 0 || k == len(y)-1 {
		return t[k]
	}
	x0, x1, x2 := t[k-1], t[k], t[k+1]
	y0, y1, y2 := y[k-1], y[k], y[k+1]
	den := (x0 - x1) * (x0 - x2) * (x1 - x2)
	a := (x2*(y1-y0) + x1*(y0-y2) + x0*(y2-y1)) / den
	bq := (x2*x2*(y0-y1) + x1*x1*(y2-y0) + x0*x0*(y1-y2)) / den
	if !(a < 0) {
		return t[k]
	}
	v := -bq / (2 * a)
	return math.Max(x0, math.Min(x2, v))
}

// modelLooper puts a model beat on the phase grid the way meanLoop treats the
// recording: resampled to the recording's sampling interval over one period,
// filtered with the same Savitzky–Golay filters (wrapping around, as the beat
// is periodic), aligned on its peak dP/dt.
type modelLooper struct {
	period  float64
	n       int // samples per period on the uniform grid
	dt      float64
	sm, d1  *SavGol
	raw     bool
	pad     int
	pb, vb  []float64 // padded periodic buffers
	pf, vf  []float64 // filtered
	dp      []float64
	tExt    []float64
	outLoop *Loop
}

func newModelLooper(period, dt, window float64, raw bool) (*modelLooper, error) {
	n := int(math.Round(period / dt))
	ml := &modelLooper{period: period, n: n, dt: period / float64(n), raw: raw}
	w := max(int(math.Round(window/ml.dt))|1, sgOrder+2)
	var err error
	if ml.sm, err = NewSavGol(w, sgOrder, 0); err != nil {
		return nil, err
	}
	if ml.d1, err = NewSavGol(w, sgOrder, 1); err != nil {
		return nil, err
	}
	ml.pad = w
	m := n + 2*ml.pad
	ml.pb, ml.vb = make([]float64, m), make([]float64, m)
	ml.pf, ml.vf, ml.dp = make([]float64, m), make([]float64, m), make([]float64, m)
	ml.tExt = make([]float64, m)
	for i := range ml.tExt {
		ml.tExt[i] = float64(i-ml.pad) * ml.dt
	}
	ml.outLoop = newLoop(period)
	return ml, nil
}

// loop returns the beat on the phase grid (valid until the next call).
func (ml *modelLooper) loop(b *model.Beat) (*Loop, error) {
	if math.Abs(b.Period-ml.period) > 1e-9 {
		return nil, fmt.Errorf("model period %g s differs from the recording's %g s", b.Period, ml.period)
	}
	// Uniform periodic samples of the beat, padded on both sides.
	var bp, bv interp.PiecewiseLinear
	if err := bp.Fit(b.T, b.PLV); err != nil {
		return nil, err
	}
	if err := bv.Fit(b.T, b.VLV); err != nil {
		return nil, err
	}
	for i := range ml.pb {
		t := math.Mod(float64(i-ml.pad)*ml.dt+ml.period, ml.period)
		ml.pb[i] = bp.Predict(t)
		ml.vb[i] = bv.Predict(t)
	}
	ml.d1.Apply(ml.dp, ml.pb, ml.dt)
	if ml.raw {
		copy(ml.pf, ml.pb)
		copy(ml.vf, ml.vb)
	} else {
		ml.sm.Apply(ml.pf, ml.pb, ml.dt)
		ml.sm.Apply(ml.vf, ml.vb, ml.dt)
	}
	in := ml.pad
	ta := peakTime(ml.tExt[in:in+ml.n], ml.dp[in:in+ml.n])
	start := ta - phaseLead*ml.period
	var fp, fv interp.PiecewiseLinear
	if err := fp.Fit(ml.tExt, ml.pf); err != nil {
		return nil, err
	}
	if err := fv.Fit(ml.tExt, ml.vf); err != nil {
		return nil, err
	}
	l := ml.outLoop
	for m, tau := range l.T {
		t := math.Mod(start+tau+2*ml.period, ml.period)
		l.P[m] = fp.Predict(t)
		l.V[m] = fv.Predict(t)
	}
	return l, nil
}
