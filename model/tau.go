package model

import (
	"math"

	"gonum.org/v1/gonum/stat"
)

// weissTau is the time constant of isovolumic relaxation in ms by Weiss,
// Frederiksen & Weisfeldt (1976): ln P is fitted linearly against t from the
// sample of peak −dP/dt (start) until P first falls to pEnd, and τ = −1/slope.
// It is NaN when fewer than three points qualify or P does not fall.
func weissTau(t, p []float64, start int, pEnd float64) float64 {
	var xs, ys []float64
	for i := start; i < len(p) && p[i] > pEnd; i++ {
		if p[i] <= 0 {
			break
		}
		xs = append(xs, t[i])
		ys = append(ys, math.Log(p[i]))
	}
	if len(xs) < 3 {
		return math.NaN()
	}
	_, slope := stat.LinearRegression(xs, ys, nil, false)
	if !(slope < 0) {
		return math.NaN()
	}
	return -1000 / slope
}
