package analysis

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/optimize"
	"gonum.org/v1/gonum/stat"
)

// EDPVRFit is an exponential end-diastolic pressure–volume relation fitted
// to the end-diastolic points of a preload run, in the model's form
// P = A·(exp(B·(V − V0)) − 1) with V0 held at the given value.
type EDPVRFit struct {
	A     float64 // mmHg
	B     float64 // 1/mL
	V0    float64 // mL, held fixed
	R2    float64 // coefficient of determination
	RMSE  float64 // root-mean-square pressure residual, mmHg
	Beats int     // end-diastolic points used
}

// minEDPVRSpan: 4 % is about 5 mL of a human ventricle filled 120 mL above V0
// (common practice, no source).
const minEDPVRSpan = 0.04

// FitEDPVR fits P = A·(exp(B·(V − v0)) − 1) to end-diastolic points by least
// squares (docs/science.md §1 for the form, §6 for the method). For a given B the
// best A is linear; B is found by Nelder–Mead on ln B. It needs at least
// MinESPVRBeats points spread over at least minEDPVRSpan of the largest
// volume above V0.
func FitEDPVR(points []Point, v0 float64) (EDPVRFit, error) {
	if len(points) < MinESPVRBeats {
		return EDPVRFit{}, fmt.Errorf("an EDPVR needs at least %d end-diastolic points, got %d", MinESPVRBeats, len(points))
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, p := range points {
		lo, hi = math.Min(lo, p.V), math.Max(hi, p.V)
	}
	if lo-v0 <= 0 {
		return EDPVRFit{}, fmt.Errorf("end-diastolic volumes reach down to %.3g mL, not above V0 = %.3g mL", lo, v0)
	}
	// The stiffness is searched as b = B·(largest EDV − V0), which does not
	// depend on the size of the heart.
	scale := hi - v0
	if hi-lo < minEDPVRSpan*scale {
		return EDPVRFit{}, fmt.Errorf("end-diastolic volumes span only %.3g mL; an EDPVR needs at least %.0f %% of %.3g mL", hi-lo, minEDPVRSpan*100, scale)
	}
	// bestA returns the least-squares A for B and the sum of squares.
	bestA := func(b float64) (a, ss float64) {
		var gy, gg float64
		for _, p := range points {
			g := math.Expm1(b * (p.V - v0))
			gy += g * p.P
			gg += g * g
		}
		a = gy / gg
		for _, p := range points {
			r := p.P - a*math.Expm1(b*(p.V-v0))
			ss += r * r
		}
		return a, ss
	}
	prob := optimize.Problem{Func: func(x []float64) float64 {
		if x[0] < math.Log(1e-2) || x[0] > math.Log(100) {
			return math.Inf(1)
		}
		_, ss := bestA(math.Exp(x[0]) / scale)
		return ss
	}}
	// A coarse scan of b finds the start.
	start, bestSS := math.Log(3), math.Inf(1)
	for lb := math.Log(1.1e-2); lb < math.Log(100); lb += 0.25 {
		if ss := prob.Func([]float64{lb}); ss < bestSS {
			start, bestSS = lb, ss
		}
	}
	res, err := optimize.Minimize(prob, []float64{start}, &optimize.Settings{FuncEvaluations: 400}, &optimize.NelderMead{SimplexSize: 0.1})
	if err != nil && res == nil {
		return EDPVRFit{}, fmt.Errorf("EDPVR fit: %w", err)
	}
	b := math.Exp(res.X[0]) / scale
	a, ss := bestA(b)
	if !(a > 0) {
		return EDPVRFit{}, errors.New("end-diastolic pressure does not rise with volume")
	}
	ys := make([]float64, len(points))
	est := make([]float64, len(points))
	for i, p := range points {
		ys[i] = p.P
		est[i] = a * math.Expm1(b*(p.V-v0))
	}
	return EDPVRFit{A: a, B: b, V0: v0, R2: stat.RSquaredFrom(est, ys, nil),
		RMSE: math.Sqrt(ss / float64(len(points))), Beats: len(points)}, nil
}
