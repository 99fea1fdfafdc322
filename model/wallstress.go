package model

import "math"

// mmHgToKdynCm2 converts mmHg to 10³ dyn/cm² (1 mmHg = 1333 dyn/cm²), the
// factor 1.332 of Grossman et al.'s formula as given in docs/science.md §7.
const mmHgToKdynCm2 = 1.332

// wallStress is the thick-wall meridional stress (Grossman, Jones & McLaurin
// 1975, J Clin Invest; docs/science.md §7) in 10³ dyn/cm²,
//
//	σ = 1.332·P·r / [2h·(1 + h/(2r))],
//
// of a sphere with cavity volume v (mL = cm³) inside a wall of volume wall (mL):
// r is the cavity radius and h the wall thickness. NaN if the geometry is
// unknown or impossible.
func wallStress(p, v, wall float64) float64 {
	if !(v > 0) || !(wall > 0) {
		return math.NaN()
	}
	r := math.Cbrt(3 * v / (4 * math.Pi))
	h := math.Cbrt(3*(v+wall)/(4*math.Pi)) - r
	return mmHgToKdynCm2 * p * r / (2 * h * (1 + h/(2*r)))
}
