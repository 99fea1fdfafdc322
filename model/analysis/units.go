package analysis

import (
	"math"
	"strings"

	"pvcouple/model"
)

// smallHeart is the largest volume, mL, below which a heart is small: it is
// measured in µL (model.Measure's floors are in mL) and shown in µL.
const smallHeart = 2

// VolumeUnit is the unit volumes are shown in: "mL", or "µL" for a small
// heart. Scale multiplies a value in mL to give it in the unit.
type VolumeUnit struct {
	Name  string
	Scale float64
}

var (
	unitML = VolumeUnit{"mL", 1}
	unitUL = VolumeUnit{"µL", 1000}
)

// volumeUnitFor picks µL for a small heart (or a small species).
func volumeUnitFor(r *Recording) VolumeUnit {
	if r.Species != nil {
		if r.Species.Small {
			return unitUL
		}
		return unitML
	}
	if r.vRange[1] < smallHeart {
		return unitUL
	}
	return unitML
}

// VolumePower is the power of volume in a unit such as "mL", "mmHg/mL",
// "mmHg·mL", "L/min" or "1/mL": 1, −1, 1, 1 and −1 (0 when volume is not
// in it; "mL O2" is oxygen, not heart volume).
func VolumePower(unit string) int {
	switch {
	case strings.Contains(unit, "O2"):
		return 0
	case strings.HasSuffix(unit, "/mL"), strings.HasSuffix(unit, "/mL²"):
		if strings.HasSuffix(unit, "²") {
			return -2
		}
		return -1
	case strings.Contains(unit, "mL"), strings.HasPrefix(unit, "L/"):
		return 1
	}
	return 0
}

// Value converts x, in a unit with volume to the power pw in mL, to the unit u.
func (u VolumeUnit) Value(x float64, pw int) float64 {
	return x * math.Pow(u.Scale, float64(pw))
}

// Label rewrites a unit in mL as the unit u: "mmHg/mL" → "mmHg/µL", "L/min"
// → "mL/min".
func (u VolumeUnit) Label(unit string) string {
	if u.Scale == 1 {
		return unit
	}
	if strings.HasPrefix(unit, "L/") {
		return "mL" + unit[1:]
	}
	return strings.ReplaceAll(unit, "mL", u.Name)
}

// measureScaled measures a beat with volumes multiplied by s (1000 for a
// small heart, so that model.Measure's floors in mL become floors in µL) and
// gives the metrics back in mL. VO2 from PVA is a relation of human-sized
// hearts (docs/science.md §4) and is not given for a small heart, nor is
// wall stress.
func measureScaled(b model.BeatSamples, k model.Known, s float64) (model.Metrics, error) {
	if s == 1 {
		return model.Measure(b, k)
	}
	v := make([]float64, len(b.V))
	for i, x := range b.V {
		v[i] = x * s
	}
	b.V = v
	k.V0 *= s
	k.Ees /= s
	k.EdpvrB /= s
	k.Resistance /= s
	k.Compliance *= s
	m, err := model.Measure(b, k)
	if err != nil {
		return m, err
	}
	for _, x := range []*float64{&m.EDV, &m.ESV, &m.SV, &m.CO, &m.SW, &m.PE, &m.PVA} {
		*x /= s
	}
	for _, x := range []*float64{&m.Ea, &m.Ees, &m.EaRT, &m.EaSegers} {
		*x *= s
	}
	m.VO2, m.EDStress, m.ESStress = nan, nan, nan
	return m, nil
}
