package analysis

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/stat"
)

// SingleBeat are the single-beat estimates from the steady beats of a
// recording: each input is the median over the beats. They are estimates,
// not measurements: Chen's Ees rests on a normalised elastance averaged over
// patients, Klotz's EDPVR on a normalised curve averaged over hearts
// (docs/science.md §5).
type SingleBeat struct {
	Beats int     // steady beats used
	Ps    float64 // systolic arterial pressure, mmHg: the aortic SBP, else peak LV pressure
	Pd    float64 // diastolic arterial pressure, mmHg: the aortic DBP, else LV pressure at the onset of ejection
	// PFrom says where Ps and Pd come from: "aortic" or "lv".
	PFrom string
	SV    float64 // mL
	EF    float64 // fraction
	TNd   float64 // onset of ejection / end of ejection, both timed from end-diastole
	TOpen float64 // s from end-diastole to the onset of ejection (median)
	TEnd  float64 // s from end-diastole to the end of ejection (median)
	EDV   float64 // mL
	EDP   float64 // mmHg

	Chen     *ChenEes    // nil when the method does not apply; see ChenErr
	ChenErr  string      //
	Klotz    *KlotzEDPVR // nil when the method does not apply; see KlotzErr
	KlotzErr string      //
}

// Timing of systole in a recording without an ECG (common practice, no
// source; docs/science.md §5): end-diastole (the onset of isovolumic
// contraction) stands in for the ECG's Q wave; the onset and end of ejection
// come from the outflow (see Ejection). tNd is the pre-ejection time over the
// total systolic time measured so.

// singleBeat computes the single-beat estimates from steady, kept beats.
func singleBeat(beats []*Beat) *SingleBeat {
	var ps, pd, sv, ef, tnd, top, tend, edv, edp []float64
	aortic := len(beats) > 0 && !math.IsNaN(beats[0].Metrics.SBP)
	for _, b := range beats {
		e := b.Ejection
		if !e.Found() {
			continue
		}
		if aortic {
			ps = append(ps, b.Metrics.SBP)
			pd = append(pd, b.Metrics.DBP)
		} else {
			ps = append(ps, b.peakP)
			pd = append(pd, e.POpen)
		}
		tnd = append(tnd, e.Open/e.Close)
		top, tend = append(top, e.Open), append(tend, e.Close)
		sv = append(sv, b.Metrics.SV)
		ef = append(ef, b.Metrics.EF/100)
		edv = append(edv, b.Metrics.EDV)
		edp = append(edp, b.Metrics.EDP)
	}
	if len(ps) == 0 {
		return nil
	}
	sb := &SingleBeat{Beats: len(ps), Ps: median(ps), Pd: median(pd), PFrom: "lv", SV: median(sv), EF: median(ef), TNd: median(tnd),
		TOpen: median(top), TEnd: median(tend), EDV: median(edv), EDP: median(edp)}
	if aortic {
		sb.PFrom = "aortic"
	}
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
