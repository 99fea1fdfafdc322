package sweep

import (
	"fmt"
	"math"

	"pvcouple/model"
)

// MapMetrics are the metric keys offered for a map of the coupling plane:
// stroke volume, stroke work, mechanical efficiency, end-systolic pressure and
// ejection fraction.
var MapMetrics = []string{"sv_ml", "sw_mmhg_ml", "efficiency", "esp_mmhg", "ef_pct"}

// AxisAround returns an axis of n values for key centred on the value c: from
// c/2 to 2c (an even span on a log scale) for a parameter whose range is
// positive, else c ± a quarter of the range; in both cases clipped to the
// parameter's range. A map around the current state uses it for its levers.
func AxisAround(key string, c float64, n int) (Axis, error) {
	spec, ok := model.SpecByKey(key)
	if !ok {
		return Axis{}, fmt.Errorf("unknown parameter %q (see `pvcouple params`)", key)
	}
	if err := spec.Check(c); err != nil {
		return Axis{}, err
	}
	if n < 2 {
		return Axis{}, fmt.Errorf("%s: a map axis needs at least 2 values, got %d", key, n)
	}
	var lo, hi float64
	if spec.Min > 0 {
		lo, hi = c/2, 2*c
	} else {
		w := (spec.Max - spec.Min) / 4
		lo, hi = c-w, c+w
	}
	lo, hi = math.Max(lo, spec.Min), math.Min(hi, spec.Max)
	return Axis{Key: key, From: lo, To: hi, N: n}, nil
}

// MapAround returns the grid of a two-lever map centred on the parameters p:
// nx values of keyX (the fast axis, one row of the map) by ny values of keyY
// (the slow axis), spans chosen by AxisAround. Point (ix, iy) of the map is
// point iy·nx + ix of the grid, so Field of the result is ny rows of nx values.
func MapAround(p model.Params, keyX, keyY string, nx, ny int) (Grid, error) {
	if keyX == keyY {
		return Grid{}, fmt.Errorf("a map needs two different levers, got %s twice", keyX)
	}
	spec, ok := model.SpecByKey(keyX)
	if !ok {
		return Grid{}, fmt.Errorf("unknown parameter %q (see `pvcouple params`)", keyX)
	}
	ax, err := AxisAround(keyX, spec.Get(p), nx)
	if err != nil {
		return Grid{}, err
	}
	if spec, ok = model.SpecByKey(keyY); !ok {
		return Grid{}, fmt.Errorf("unknown parameter %q (see `pvcouple params`)", keyY)
	}
	ay, err := AxisAround(keyY, spec.Get(p), ny)
	if err != nil {
		return Grid{}, err
	}
	g := Grid{Base: p, Axes: []Axis{ay, ax}}
	return g, g.Validate()
}
