package figure

import (
	"math"
	"strconv"

	"gonum.org/v1/plot"
)

// niceTicks marks an axis every 1, 2 or 5 × 10^k units, the least such step
// above a sixth of the range (three to seven labelled ticks), with an
// unlabelled tick halfway between.
type niceTicks struct{}

// Ticks returns the ticks between lo and hi.
func (niceTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || math.IsInf(hi-lo, 0) {
		return nil
	}
	raw := (hi - lo) / 6
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	step := mag * 10
	for _, m := range []float64{1, 2, 5} {
		if m*mag >= raw {
			step = m * mag
			break
		}
	}
	var ticks []plot.Tick
	for i := math.Ceil(lo / (step / 2)); i*step/2 <= hi+1e-9*step; i++ {
		v := i * step / 2
		t := plot.Tick{Value: v}
		if math.Mod(i, 2) == 0 {
			t.Label = strconv.FormatFloat(v, 'f', -1, 64)
		}
		ticks = append(ticks, t)
	}
	return ticks
}
