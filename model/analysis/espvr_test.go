package analysis

import (
	"math"
	"testing"

	"pvcouple/model"
)

// rectLoop is a rectangular loop with its end-systolic corner at (esv, pes).
func rectLoop(edv, esv, pes float64) model.BeatSamples {
	var b model.BeatSamples
	corners := [][2]float64{{edv, 2}, {edv, pes}, {esv, pes}, {esv, 2}, {edv, 2}}
	for s := 0; s < 4; s++ {
		for i := 0; i < 40; i++ {
			f := float64(i) / 40
			b.V = append(b.V, corners[s][0]+f*(corners[s+1][0]-corners[s][0]))
			b.P = append(b.P, corners[s][1]+f*(corners[s+1][1]-corners[s][1]))
		}
	}
	for i := range b.V {
		b.T = append(b.T, float64(i)*0.005)
	}
	return b
}

// Loops whose end-systolic corners lie on P = Ees·(V − V0): the iterated fit
// must return that line exactly (docs/science.md §6, derived), from any start.
func TestFitESPVRRecoversLine(t *testing.T) {
	const ees, v0 = 2.2, 12.0
	var beats []model.BeatSamples
	for i := 0; i < 8; i++ {
		esv := 40 + 4*float64(i)
		beats = append(beats, rectLoop(esv+60, esv, ees*(esv-v0)))
	}
	for _, guess := range []float64{0, -20, 30} {
		fit, err := FitESPVR(beats, guess)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(fit.Ees-ees) > 1e-9 || math.Abs(fit.V0-v0) > 1e-6 || fit.R2 < 1-1e-12 || fit.Beats != 8 {
			t.Errorf("guess %g: %+v", guess, fit)
		}
	}
	if _, err := FitESPVR(beats[:3], 0); err == nil {
		t.Error("3 loops accepted")
	}
}

// Loops that barely differ (a steady run) give no ESPVR: a line through
// bunched points would follow noise.
func TestFitESPVRRefusesBunchedPoints(t *testing.T) {
	var beats []model.BeatSamples
	for i := 0; i < 8; i++ {
		esv := 50 + 0.01*float64(i)
		beats = append(beats, rectLoop(esv+60, esv, 2*(esv-5)))
	}
	if _, err := FitESPVR(beats, 0); err == nil {
		t.Error("fitted an ESPVR to end-systolic volumes 0.07 mL apart")
	}
}
