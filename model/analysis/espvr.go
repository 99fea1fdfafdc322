package analysis

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/stat"

	"pvcouple/model"
)

// Point is a pressure–volume point.
type Point struct {
	V float64 // mL
	P float64 // mmHg
}

// ESPVRFit is an end-systolic pressure–volume relation fitted to a family of
// loops recorded while preload changes.
type ESPVRFit struct {
	Ees        float64 // slope, mmHg/mL
	V0         float64 // volume intercept, mL
	R2         float64 // coefficient of determination of the last fit
	Beats      int     // loops used
	Method     string  // "iterated-max-elastance-linear" or "…-quadratic"
	Curvature  float64 // mmHg/mL², of a quadratic fit (0 for a linear one)
	Iterations int     // V0 iterations until the end-systolic points stopped changing
	Points     []Point // end-systolic points of the last iteration
}

// maxElastanceFloor: see maxElastancePoint.
const maxElastanceFloor = 0.02

// MinESPVRBeats is the fewest loops an ESPVR is fitted to.
const MinESPVRBeats = 5

// MinESPVRSpan is the least spread of the end-systolic volumes that an ESPVR
// is fitted to, as a fraction of the largest of them above V0: a line through
// points bunched closer than this follows noise, not the ESPVR (common
// practice, no source; an occlusion moves ESV by a fifth or more). 2 % is
// 1 mL for a human ventricle ending systole at 50 mL.
const MinESPVRSpan = 0.02

// FitESPVR fits P = Ees·(V − V0) to the end-systolic points of the loops by the
// iterated maximal-elastance method (docs/science.md §6): guess V0, take each loop's
// point of maximal P/(V − V0), fit a line by least squares, take its volume
// intercept as the new V0, and repeat until V0 moves less than 1e-6 mL. In a
// pure elastance model this recovers Ees and V0. v0Guess starts the iteration
// (0 when unknown).
func FitESPVR(beats []model.BeatSamples, v0Guess float64) (ESPVRFit, error) {
	return iterateESPVR(beats, v0Guess, "iterated-max-elastance-linear", func(vs, ps []float64, fit *ESPVRFit) (float64, error) {
		alpha, beta := stat.LinearRegression(vs, ps, nil, false)
		if !(beta > 0) {
			return 0, fmt.Errorf("end-systolic points do not rise with volume (slope %.3g mmHg/mL): preload did not change enough", beta)
		}
		fit.Ees, fit.V0 = beta, -alpha/beta
		fit.R2 = stat.RSquared(vs, ps, nil, alpha, beta)
		return fit.V0, nil
	})
}

// iterateESPVR is the iteration of the maximal-elastance method shared by the
// linear and quadratic relations: for the current V0 it takes each loop's
// point of maximal P/(V − V0), lets relate fit the relation to those points
// (filling fit and returning the new V0), and repeats until V0 moves less than
// 1e-6 mL (at most 100 times).
func iterateESPVR(beats []model.BeatSamples, v0Guess float64, method string,
	relate func(vs, ps []float64, fit *ESPVRFit) (float64, error)) (ESPVRFit, error) {
	if len(beats) < MinESPVRBeats {
		return ESPVRFit{}, fmt.Errorf("an ESPVR needs at least %d loops with changing preload, got %d", MinESPVRBeats, len(beats))
	}
	v0 := v0Guess
	vs := make([]float64, len(beats))
	ps := make([]float64, len(beats))
	fit := ESPVRFit{Beats: len(beats), Method: method}
	for it := 1; it <= 100; it++ {
		for i, b := range beats {
			p, err := maxElastancePoint(b, v0)
			if err != nil {
				return ESPVRFit{}, fmt.Errorf("loop %d: %w", i+1, err)
			}
			vs[i], ps[i] = p.V, p.P
		}
		if lo, hi := floats.Min(vs), floats.Max(vs); !(hi-lo >= MinESPVRSpan*(hi-v0)) {
			return ESPVRFit{}, fmt.Errorf("preload did not change enough: end-systolic volumes span only %.2g mL (need %.0f %% of %.3g mL)", hi-lo, MinESPVRSpan*100, hi-v0)
		}
		next, err := relate(vs, ps, &fit)
		if err != nil {
			return ESPVRFit{}, err
		}
		fit.Iterations = it
		if math.Abs(next-v0) < 1e-6 {
			break
		}
		v0 = next
	}
	fit.Points = make([]Point, len(beats))
	for i := range vs {
		fit.Points[i] = Point{vs[i], ps[i]}
	}
	return fit, nil
}

// maxElastancePoint is the sample of a loop with maximal P/(V − v0), among
// samples more than maxElastanceFloor of the loop's largest volume above v0
// (so that a near-empty ventricle cannot give a spurious maximum; model.Measure
// has the same guard).
func maxElastancePoint(b model.BeatSamples, v0 float64) (Point, error) {
	best, idx := math.Inf(-1), -1
	floor := maxElastanceFloor * (floats.Max(b.V) - v0)
	for i := range b.V {
		if x := b.V[i] - v0; x > floor {
			if r := b.P[i] / x; r > best {
				best, idx = r, i
			}
		}
	}
	if idx < 0 {
		return Point{}, errors.New("no sample lies above the volume intercept")
	}
	return Point{b.V[idx], b.P[idx]}, nil
}
