package analysis

import (
	"fmt"
	"slices"

	"gonum.org/v1/gonum/stat"
)

// SingleBeat are the single-beat estimates from the steady beats of a
// recording: each input is the median over the beats.
type SingleBeat struct {
	Beats int     // steady beats used
	Ps    float64 // peak LV pressure, taken for systolic arterial pressure, mmHg
	Pd    float64 // LV pressure at the onset of ejection, taken for diastolic arterial pressure, mmHg
	SV    float64 // mL
	EF    float64 // fraction
	TNd   float64 // pre-ejection time / total systolic time
	EDV   float64 // mL
	EDP   float64 // mmHg

	Chen     *ChenEes    // nil when the method does not apply; see ChenErr
	ChenErr  string      //
	Klotz    *KlotzEDPVR // nil when the method does not apply; see KlotzErr
	KlotzErr string      //
}

// Timing of systole in an LV-only recording (no aortic pressure, no ECG;
// common practice, no source): the aortic valve opens at peak dP/dt, where
// ejection starts to slow the pressure rise, and the LV pressure there stands
// in for the diastolic arterial pressure. Systole runs from end-diastole (the
// onset of isovolumic contraction, standing in for the ECG's Q wave) to the
// end of ejection at the smallest volume.
//
// chenTiming finds, in a measured beat, the LV pressure at the onset of
// ejection and tNd.
func chenTiming(b *Beat) (pd, tnd float64, err error) {
	s := b.Samples
	imin, imax := 0, 0
	for i := range s.V {
		if s.V[i] < s.V[imin] {
			imin = i
		}
		if s.DPdt[i] > s.DPdt[imax] {
			imax = i
		}
	}
	if imax == 0 || imax >= imin {
		return 0, 0, fmt.Errorf("peak dP/dt does not precede the end of ejection")
	}
	pd = s.P[imax]
	tnd = (s.T[imax] - s.T[0]) / (s.T[imin] - s.T[0])
	return pd, tnd, nil
}

// singleBeat computes the single-beat estimates from steady, kept beats.
func singleBeat(beats []*Beat) *SingleBeat {
	var ps, pd, sv, ef, tnd, edv, edp []float64
	for _, b := range beats {
		d, t, err := chenTiming(b)
		if err != nil {
			continue
		}
		ps = append(ps, slices.Max(b.Samples.P))
		pd = append(pd, d)
		tnd = append(tnd, t)
		sv = append(sv, b.Metrics.SV)
		ef = append(ef, b.Metrics.EF/100)
		edv = append(edv, b.Metrics.EDV)
		edp = append(edp, b.Metrics.EDP)
	}
	if len(ps) == 0 {
		return nil
	}
	sb := &SingleBeat{Beats: len(ps), Ps: median(ps), Pd: median(pd), SV: median(sv), EF: median(ef), TNd: median(tnd),
		EDV: median(edv), EDP: median(edp)}
	if c, err := Chen2001(sb.Ps, sb.Pd, sb.SV, sb.EF, sb.TNd); err != nil {
		sb.ChenErr = err.Error()
	} else {
		sb.Chen = &c
	}
	if k, err := Klotz2006(sb.EDV, sb.EDP); err != nil {
		sb.KlotzErr = err.Error()
	} else {
		sb.Klotz = &k
	}
	return sb
}

// median of x (x is reordered).
func median(x []float64) float64 {
	slices.Sort(x)
	return stat.Quantile(0.5, stat.LinInterp, x, nil)
}
