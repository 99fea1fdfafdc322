package analysis

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"

	"pvcouple/model"
)

// FitESPVRQuadratic fits P = Ees·(V − V0) + Curvature·(V − V0)² to the
// end-systolic points, iterated like FitESPVR (docs/science.md §6, the quadratic
// alternative): the points of maximal P/(V − V0) for the current V0, a
// least-squares quadratic P = a + b·V + c·V², and its root nearest the points
// on their left as the new V0. Ees is the slope at the mean end-systolic
// volume of the points, the middle of the range the relation was measured in.
func FitESPVRQuadratic(beats []model.BeatSamples, v0Guess float64) (ESPVRFit, error) {
	return iterateESPVR(beats, v0Guess, "iterated-max-elastance-quadratic", func(vs, ps []float64, fit *ESPVRFit) (float64, error) {
		c, err := quadFit(vs, ps)
		if err != nil {
			return 0, err
		}
		// Root of c0 + c1·V + c2·V² left of the smallest end-systolic volume.
		next, ok := leftRoot(c, floats.Min(vs))
		if !ok {
			return 0, errors.New("the quadratic ESPVR does not reach zero pressure left of the end-systolic points; use the linear fit")
		}
		fit.V0 = next
		fit.Ees = c[1] + 2*c[2]*stat.Mean(vs, nil)
		fit.Curvature = c[2]
		est := make([]float64, len(vs))
		for i, v := range vs {
			est[i] = c[0] + c[1]*v + c[2]*v*v
		}
		fit.R2 = stat.RSquaredFrom(est, ps, nil)
		if !(fit.Ees > 0) {
			return 0, fmt.Errorf("the quadratic ESPVR falls within its points (slope %.3g mmHg/mL)", fit.Ees)
		}
		return next, nil
	})
}

// quadFit returns c with P ≈ c0 + c1·V + c2·V² by least squares.
func quadFit(vs, ps []float64) ([3]float64, error) {
	n := len(vs)
	a := mat.NewDense(n, 3, nil)
	for i, v := range vs {
		a.Set(i, 0, 1)
		a.Set(i, 1, v)
		a.Set(i, 2, v*v)
	}
	var x mat.VecDense
	if err := x.SolveVec(a, mat.NewVecDense(n, append([]float64(nil), ps...))); err != nil {
		return [3]float64{}, fmt.Errorf("end-systolic points do not determine a quadratic: %w", err)
	}
	return [3]float64{x.AtVec(0), x.AtVec(1), x.AtVec(2)}, nil
}

// leftRoot is the largest root of the quadratic below vmax.
func leftRoot(c [3]float64, vmax float64) (float64, bool) {
	if math.Abs(c[2]) < 1e-12 {
		if c[1] == 0 {
			return 0, false
		}
		r := -c[0] / c[1]
		return r, r < vmax
	}
	d := c[1]*c[1] - 4*c[2]*c[0]
	if d < 0 {
		return 0, false
	}
	sq := math.Sqrt(d)
	r1, r2 := (-c[1]-sq)/(2*c[2]), (-c[1]+sq)/(2*c[2])
	best, ok := math.Inf(-1), false
	for _, r := range []float64{r1, r2} {
		if r < vmax && r > best {
			best, ok = r, true
		}
	}
	return best, ok
}
