package analysis

import (
	"fmt"
	"slices"
)

// MinDuration is the shortest recording analysed, s.
const MinDuration = 1.0

// Plausible ranges of LV pressure and volume in the units read (common
// practice, no source): LV pressure falls near zero in every diastole and
// peaks below 400 mmHg; a ventricle holds less than 2000 mL.
const (
	maxLVDiastolic = 40   // mmHg; a column that never falls below it is not LV pressure
	maxLVPressure  = 400  // mmHg
	minLVPeak      = 25   // mmHg; a lower peak suggests kPa read as mmHg, or not a pressure
	maxVolume      = 2000 // mL
)

// checkPlausible refuses pressure and volume columns whose values cannot be
// what their names say, and warns of offsets. It uses the 1st and 99th
// percentiles so a few spikes do not decide.
func (r *Recording) checkPlausible() error {
	if d := r.Duration(); d < MinDuration {
		return &InputError{File: r.Source, Msg: fmt.Sprintf("the recording lasts %.3g s; at least %g s (a few beats) is needed", d, MinDuration)}
	}
	perr := func(col, format string, a ...any) error {
		return &InputError{File: r.Source, Column: col, Msg: fmt.Sprintf(format, a...)}
	}
	pc, vc := r.Columns.Pressure, r.Columns.Volume
	p1, p99 := percentiles(r.P)
	switch {
	case p99-p1 < 5:
		return perr(pc, "LV pressure hardly varies (%.3g to %.3g mmHg); is it the right column?", p1, p99)
	case p99 > maxLVPressure:
		return perr(pc, "LV pressure reaches %.4g mmHg, above %d mmHg; check the column and its unit (--pressure-unit)", p99, maxLVPressure)
	case p99 < minLVPeak:
		return perr(pc, "LV pressure peaks at only %.3g mmHg; if the values are kPa give --pressure-unit kpa, else check the column", p99)
	case p1 > maxLVDiastolic:
		return perr(pc, "values never fall below %.4g mmHg, but LV pressure falls near 0 in diastole; "+
			"is this a volume or an aortic pressure? Name the LV pressure column with --pressure-col", p1)
	case p1 < -20:
		r.warnf("LV pressure falls to %.3g mmHg: the transducer may not be zeroed; pressures carry the offset", p1)
	}
	v1, v99 := percentiles(r.V)
	switch {
	case v99-v1 <= 1e-3*max(v99, -v1):
		return perr(vc, "LV volume hardly varies (%.4g to %.4g mL); is it the right column?", v1, v99)
	case v99 > maxVolume:
		return perr(vc, "LV volume reaches %.4g mL, above %d mL; if the values are µL give --volume-unit ul, else check the column", v99, maxVolume)
	case v99 <= 0:
		return perr(vc, "LV volume is never above 0 mL (up to %.4g mL): the volume signal has an offset; correct it with --volume-offset", v99)
	case v1 < 0:
		r.warnf("LV volume falls to %.3g mL: the volume signal has an offset (uncorrected parallel conductance?); "+
			"volumes, EF and V0 carry it, slopes (Ees, Ea) do not; --volume-offset corrects it", v1)
	}
	if r.Pao != nil {
		if a1, _ := percentiles(r.Pao); a1 < 20 {
			r.warnf("column %q falls to %.3g mmHg, low for an aortic pressure; MAP, SBP and DBP come from it", r.Columns.Aortic, a1)
		}
	}
	return nil
}

// percentiles returns the 1st and 99th percentiles of x.
func percentiles(x []float64) (lo, hi float64) {
	s := slices.Clone(x)
	slices.Sort(s)
	n := len(s)
	return s[n/100], s[n-1-n/100]
}
