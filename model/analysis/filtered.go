package analysis

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"

	"pvcouple/model"
)

// sgOrder is the polynomial degree of the filters: a cubic keeps the peaks
// of pressure and dP/dt.
const sgOrder = 3

// minWindow is the shortest Savitzky–Golay window, samples, that differs
// from the data (a cubic through 4 points is the data itself).
const minWindow = sgOrder + 2

// MinSmoothSamples is the shortest smoothing window allowed, in samples.
const MinSmoothSamples = minWindow

// signals are one segment of a recording with its filters. The detection
// signals (dP/dt smoothed for finding beats, and the volume as measured) are
// kept for the whole segment as float32; the samples a beat is measured
// from are filtered again when asked for (window), so memory does not grow
// with the filtered copies of a long recording.
type signals struct {
	rec    *Recording
	seg    Segment
	n      int     // samples
	dt     float64 // sampling interval, s
	sm, d1 *SavGol // measuring filters: smoothing and dP/dt
	ts, td *SavGol // timing filters: smoothing and derivative
	smooth bool    // pass smoothed (else raw) pressure and volume to the measurements

	// The timing of beats (end-diastole, onset and end of ejection) is read
	// from the timing filters, whose window is a fixed fraction of the beat
	// period: the smoothing setting changes the values measured, never where
	// a beat's events are found.
	detect []float32 // mmHg/s, dP/dt of the timing derivative, for finding upstrokes
	v      []float32 // mL, the volume of the timing smoother, for finding end-diastole

	noiseP    float64 // estimated SD of the pressure noise, mmHg
	noiseV    float64 // estimated SD of the volume noise, mL
	noiseVOut float64 // estimated SD of the noise left in the measured volume, mL
	noiseVT   float64 // estimated SD of the noise left in v, mL
	noiseFlow float64 // estimated SD of the noise of the timing derivative of volume, mL/s
}

// window lengths in samples for a span of seconds: odd, at least minWindow.
func samplesOf(span, dt float64) int {
	return max(int(math.Round(span/dt))|1, minWindow)
}

// newSignals prepares one segment: w is the windows of the recording.
func newSignals(r *Recording, s Segment, w *windows, smooth bool) (*signals, error) {
	n := s.To - s.From
	dt := s.Step
	ws := samplesOf(w.smooth, dt)
	wt := samplesOf(w.timing, dt)
	if n < max(ws, wt) || n < 3 {
		return nil, fmt.Errorf("segment of %d samples is shorter than the filters (%d)", n, max(ws, wt))
	}
	sig := &signals{rec: r, seg: s, n: n, dt: dt, smooth: smooth, detect: make([]float32, n), v: make([]float32, n)}
	var err error
	for _, f := range []struct {
		dst           **SavGol
		window, deriv int
	}{{&sig.sm, ws, 0}, {&sig.d1, ws, 1}, {&sig.ts, wt, 0}, {&sig.td, wt, 1}} {
		if *f.dst, err = NewSavGol(f.window, sgOrder, f.deriv); err != nil {
			return nil, err
		}
	}
	// Filter a block at a time; each block reads the raw samples half a
	// window beyond its ends, so the result equals filtering the whole segment.
	var rp, rv, dd, pt, vt []float64
	var ssP, ssV float64
	h := max(ws, wt) / 2
	for b := 0; b < n; b += blockSize {
		e := min(n, b+blockSize)
		lo, hi := max(0, b-h), min(n, e+h)
		rp = r.p.window(rp, s.From+lo, s.From+hi)
		rv = r.v.window(rv, s.From+lo, s.From+hi)
		dd = sig.td.Apply(grow(dd, len(rp)), rp, dt)
		pt = sig.ts.Apply(grow(pt, len(rp)), rp, dt)
		vt = sig.ts.Apply(grow(vt, len(rv)), rv, dt)
		for i := b; i < e; i++ {
			k := i - lo
			sig.detect[i] = float32(dd[k])
			sig.v[i] = float32(vt[k])
			ssP += (rp[k] - pt[k]) * (rp[k] - pt[k])
			ssV += (rv[k] - vt[k]) * (rv[k] - vt[k])
		}
	}
	// The residual of the timing smoother estimates white noise (whatever the
	// smoothing setting): its variance is σ²·(1 − c₀), c₀ the filter's centre
	// weight; a least-squares smoother passes white noise with variance σ²·c₀.
	ct := sig.ts.coef[wt/2][wt/2]
	sig.noiseP = math.Sqrt(ssP/float64(n)) / math.Sqrt(1-ct)
	sig.noiseV = math.Sqrt(ssV/float64(n)) / math.Sqrt(1-ct)
	sig.noiseVOut = sig.noiseV
	if smooth {
		sig.noiseVOut = sig.noiseV * math.Sqrt(sig.sm.coef[ws/2][ws/2])
	}
	sig.noiseVT = sig.noiseV * math.Sqrt(ct)
	sig.noiseFlow = sig.noiseV * floats.Norm(sig.td.coef[wt/2], 2) / dt
	return sig, nil
}

// grow returns b resized to n.
func grow(b []float64, n int) []float64 {
	if cap(b) < n {
		return make([]float64, n)
	}
	return b[:n]
}

// filtered are samples of a stretch of a segment as the measurements see them.
type filtered struct {
	T, P, V, DPdt []float64
	Pao           []float64 // nil without aortic pressure
	VT            []float64 // volume from the timing smoother, mL
	Flow          []float64 // outflow −dV/dt from the timing derivative, mL/s
}

// window filters samples [from, to) of the segment (indices within it): the
// same values filtering the whole segment would give. The slices are new.
func (s *signals) window(from, to int) filtered {
	var b windowBuf
	return s.windowInto(&b, from, to)
}

// windowBuf holds the work arrays of windowInto.
type windowBuf struct {
	t, rp, rv, pa, dp, vt, q, p, v, pao []float64
}

// windowInto is window with the arrays of buf (valid until its next use), so
// that measuring thousands of beats makes no garbage.
func (s *signals) windowInto(buf *windowBuf, from, to int) filtered {
	wmax := max(s.sm.Window, s.ts.Window)
	h := wmax / 2
	lo, hi := max(0, from-h), min(s.n, to+h)
	if hi-lo < wmax {
		lo, hi = 0, s.n // only near a short segment's ends
	}
	r := s.rec
	g := s.seg.From
	n := hi - lo
	buf.rp = r.p.window(buf.rp, g+lo, g+hi)
	buf.rv = r.v.window(buf.rv, g+lo, g+hi)
	a, b := from-lo, to-lo
	var f filtered
	buf.t = grow(buf.t, to-from)
	for i := range buf.t {
		buf.t[i] = s.seg.Start + float64(from+i)*s.dt
	}
	f.T = buf.t
	buf.dp = s.d1.Apply(grow(buf.dp, n), buf.rp, s.dt)
	buf.vt = s.ts.Apply(grow(buf.vt, n), buf.rv, s.dt)
	buf.q = s.td.Apply(grow(buf.q, n), buf.rv, s.dt)
	for i := range buf.q {
		buf.q[i] = -buf.q[i]
	}
	f.DPdt, f.VT, f.Flow = buf.dp[a:b], buf.vt[a:b], buf.q[a:b]
	if s.smooth {
		buf.p = s.sm.Apply(grow(buf.p, n), buf.rp, s.dt)
		buf.v = s.sm.Apply(grow(buf.v, n), buf.rv, s.dt)
		f.P, f.V = buf.p[a:b], buf.v[a:b]
	} else {
		f.P, f.V = buf.rp[a:b], buf.rv[a:b]
	}
	if r.hasAortic {
		buf.pa = r.pao.window(buf.pa, g+lo, g+hi)
		pao := buf.pa
		if s.smooth {
			buf.pao = s.sm.Apply(grow(buf.pao, n), buf.pa, s.dt)
			pao = buf.pao
		}
		f.Pao = pao[a:b]
	}
	return f
}

// samples are the filtered samples of a beat for model.Measure.
func (f filtered) samples() model.BeatSamples {
	return model.BeatSamples{T: f.T, P: f.P, V: f.V, DPdt: f.DPdt, Pao: f.Pao, EDAtStart: true}
}

// time of sample i of the segment, s.
func (s *signals) time(i int) float64 { return s.seg.Start + float64(i)*s.dt }
