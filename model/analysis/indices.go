package analysis

import (
	"fmt"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/stat"
)

// PRSWFit is preload-recruitable stroke work (Glower et al. 1985,
// Circulation; docs/science.md §13): stroke work against end-diastolic
// volume across an occlusion run, SW = Mw·(EDV − Vw), fitted by least squares.
type PRSWFit struct {
	Mw    float64 // slope, mmHg (mmHg·mL per mL)
	Vw    float64 // volume intercept, mL
	R2    float64
	Beats int
}

// FitPRSW fits SW = Mw·(EDV − Vw) to beats' end-diastolic volumes (mL) and
// stroke work (mmHg·mL).
func FitPRSW(edv, sw []float64) (PRSWFit, error) {
	alpha, beta, r2, err := line(edv, sw, "stroke work", "end-diastolic volume")
	if err != nil {
		return PRSWFit{}, err
	}
	return PRSWFit{Mw: beta, Vw: -alpha / beta, R2: r2, Beats: len(edv)}, nil
}

// SlopeFit is a straight line y = Slope·(x − X0) fitted by least squares.
type SlopeFit struct {
	Slope float64
	X0    float64 // x where the line crosses y = 0
	R2    float64
	Beats int
}

// FitDPdtEDV fits dP/dt max against end-diastolic volume across an occlusion
// run (Little 1985, Circulation; docs/science.md §13): the slope, in
// mmHg/s per mL, is an index of contractility little moved by preload.
func FitDPdtEDV(edv, dpdtMax []float64) (SlopeFit, error) {
	alpha, beta, r2, err := line(edv, dpdtMax, "dP/dt max", "end-diastolic volume")
	if err != nil {
		return SlopeFit{}, err
	}
	return SlopeFit{Slope: beta, X0: -alpha / beta, R2: r2, Beats: len(edv)}, nil
}

// line fits y = alpha + beta·x by least squares (gonum), needing at least
// MinESPVRBeats points, a spread of x and a rising line.
func line(x, y []float64, yName, xName string) (alpha, beta, r2 float64, err error) {
	if len(x) < MinESPVRBeats {
		return 0, 0, 0, fmt.Errorf("needs at least %d beats, got %d", MinESPVRBeats, len(x))
	}
	if lo, hi := floats.Min(x), floats.Max(x); !(hi-lo > minSpreadFrac*hi) {
		return 0, 0, 0, fmt.Errorf("%s spans only %.3g to %.3g: too little change", xName, lo, hi)
	}
	alpha, beta = stat.LinearRegression(x, y, nil, false)
	if !(beta > 0) {
		return 0, 0, 0, fmt.Errorf("%s does not rise with %s (slope %.3g)", yName, xName, beta)
	}
	return alpha, beta, stat.RSquared(x, y, nil, alpha, beta), nil
}

// minSpreadFrac is the least spread of a regressor, as a fraction of its
// largest value, that a line is fitted across (common practice, no source).
const minSpreadFrac = 0.02
