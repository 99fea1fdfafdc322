package analysis

import "fmt"

// MinDuration is the shortest recording analysed, s.
const MinDuration = 1.0

// Plausible ranges of LV pressure and volume in the units read (common
// practice, no source): LV pressure falls near zero in every diastole and
// peaks below 400 mmHg; a ventricle holds less than 2000 mL. A species hint
// narrows the volumes (docs/science.md §14): beyond unitFactor times its range
// the volume unit is wrong.
const (
	maxLVDiastolic = 40   // mmHg; a column that never falls below it is not LV pressure
	maxLVPressure  = 400  // mmHg
	minLVPeak      = 25   // mmHg; a lower peak suggests kPa read as mmHg, or not a pressure
	maxVolume      = 2000 // mL
	unitFactor     = 20
)

// checkPlausible refuses pressure and volume columns whose values cannot be
// what their names say, and warns of offsets. It uses the 1st and 99th
// percentiles so a few spikes do not decide. Errors point at the header cell
// of the column at fault.
func (r *Recording) checkPlausible(rd *reader) error {
	if d := r.Duration(); d < MinDuration {
		return rd.at(-1, "the recording lasts %.3g s; at least %g s (a few beats) is needed", d, MinDuration)
	}
	perr := func(k int, format string, a ...any) error {
		name := []string{r.Columns.Time, r.Columns.Pressure, r.Columns.Volume, r.Columns.Aortic}[k]
		return r.cellErr(k, name, fmt.Sprintf(format, a...))
	}
	p1, p99 := percentiles(&r.p)
	r.pRange = [2]float64{p1, p99}
	switch {
	case p99-p1 < 5:
		return perr(1, "LV pressure hardly varies (%.3g to %.3g mmHg); is it the right column?", p1, p99)
	case p99 > maxLVPressure:
		return perr(1, "LV pressure reaches %.4g mmHg, above %d mmHg; check the column and its unit (--pressure-unit)", p99, maxLVPressure)
	case p99 < minLVPeak:
		return perr(1, "LV pressure peaks at only %.3g mmHg; if the values are kPa give --pressure-unit kpa, else check the column", p99)
	case p1 > maxLVDiastolic:
		return perr(1, "values never fall below %.4g mmHg, but LV pressure falls near 0 in diastole; "+
			"is this a volume or an aortic pressure? Name the LV pressure column with --pressure-col", p1)
	case p1 < -20:
		r.warnf("LV pressure falls to %.3g mmHg: the transducer may not be zeroed; pressures carry the offset", p1)
	}
	v1, v99 := percentiles(&r.v)
	r.vRange = [2]float64{v1, v99}
	sp := r.Species
	switch {
	case v99-v1 <= 1e-3*max(v99, -v1):
		return perr(2, "LV volume hardly varies (%.4g to %.4g mL); is it the right column?", v1, v99)
	case v99 > maxVolume:
		return perr(2, "LV volume reaches %.4g mL, above %d mL; if the values are µL give --volume-unit ul, else check the column", v99, maxVolume)
	case v99 <= 0:
		return perr(2, "LV volume is never above 0 mL (up to %.4g mL): the volume signal has an offset; correct it with --volume-offset or --parallel-volume", v99)
	case sp != nil && v99 > unitFactor*sp.MaxEDV:
		hint := "is --species right? Else check the column and its unit"
		if v99/1000 <= sp.MaxEDV*unitFactor {
			hint = "the values look like µL: give --volume-unit ul or name the column e.g. volume_ul (or check --species)"
		}
		return perr(2, "LV volume reaches %.4g mL, %.0f times the largest %s heart's %.3g mL (%s): %s", v99, v99/sp.MaxEDV, sp.Name, sp.MaxEDV, sp.Source, hint)
	case sp != nil && v99 < sp.MinEDV/unitFactor:
		hint := "is --species right? Else check the column and its unit (--volume-unit)"
		return perr(2, "LV volume reaches only %.4g mL, far below a %s heart's %.3g mL (%s): %s", v99, sp.Name, sp.MinEDV, sp.Source, hint)
	case v1 < 0:
		r.warnf("LV volume falls to %.3g mL: the volume signal has an offset (uncorrected parallel conductance?); "+
			"volumes, EF and V0 carry it, slopes (Ees, Ea) do not; --parallel-volume corrects it", v1)
	}
	if r.hasAortic {
		if a1, _ := percentiles(&r.pao); a1 < 20 {
			r.warnf("column %q falls to %.3g mmHg, low for an aortic pressure; MAP, SBP and DBP come from it", r.Columns.Aortic, a1)
		}
	}
	return nil
}

// percentiles returns the 1st and 99th percentiles of a column.
func percentiles(c *column) (lo, hi float64) {
	return quantileOf(c.n, c.at, 0.01), quantileOf(c.n, c.at, 0.99)
}
