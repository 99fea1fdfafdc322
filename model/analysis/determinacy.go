package analysis

import (
	"math"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"

	"pvcouple/model"
)

// Determinacy classes by Spread (relative half-width of the values that fit
// almost as well; see FitModel).
const (
	wellDetermined   = 0.05
	fairlyDetermined = 0.25
	// hessStep is the finite-difference step in the search coordinates: 1 %
	// for the log-scaled parameters, 0.2 mL for V0.
	hessStep = 0.01
)

// determinacy estimates how well each fitted parameter is determined from
// the curvature of the cost at its minimum x (cost value best).
func determinacy(cost func([]float64) float64, x []float64, best float64, p, start model.Params) []FitParam {
	n := len(x)
	var h mat.SymDense
	fd.Hessian(&h, cost, x, &fd.Settings{Formula: fd.Central, Step: hessStep, OriginKnown: true, OriginValue: best})
	// Pseudo-inverse through the eigen-decomposition: directions of (near)
	// zero or negative curvature are undetermined.
	var eig mat.EigenSym
	ok := eig.Factorize(&h, true)
	r := math.Sqrt(2 * best) // root-mean-square residual
	dJ := 0.5 * ((r+detTol)*(r+detTol) - r*r)
	out := make([]FitParam, n)
	for i, k := range FitKeys {
		s, _ := model.SpecByKey(k)
		out[i] = FitParam{Key: k, Value: s.Get(p), Start: s.Get(start), Spread: math.Inf(1)}
	}
	if ok {
		vals := eig.Values(nil)
		var vecs mat.Dense
		eig.VectorsTo(&vecs)
		maxVal := 0.0
		for _, v := range vals {
			maxVal = math.Max(maxVal, v)
		}
		for i := 0; i < n; i++ {
			var inv float64
			flat := false
			for k, v := range vals {
				c := vecs.At(i, k)
				if v <= 1e-9*maxVal {
					if math.Abs(c) > 0.1 {
						flat = true
					}
					continue
				}
				inv += c * c / v
			}
			if flat || !(inv > 0) {
				continue
			}
			w := math.Sqrt(2 * dJ * inv)
			if FitKeys[i] == "v0_ml" {
				out[i].Spread = v0Scale * w / math.Max(math.Abs(out[i].Value), 1)
			} else {
				out[i].Spread = math.Expm1(w)
			}
		}
	}
	for i := range out {
		switch s := out[i].Spread; {
		case s <= wellDetermined:
			out[i].Note = "well determined"
		case s <= fairlyDetermined:
			out[i].Note = "fairly well determined"
		case !math.IsInf(s, 1):
			out[i].Note = "poorly determined: other values fit almost as well"
		default:
			out[i].Note = "not determined by this recording"
		}
	}
	return out
}
