package analysis

import "math"

// A preload run is a stretch of kept beats whose end-diastolic volume falls
// (caval occlusion) or rises (release, leg raise) beat after beat, by at least
// minPreloadChange of the largest EDV and minPreloadML, over at least
// MinESPVRBeats beats (common practice, no source). A step against the trend
// of up to preloadTol of EDV (noise) does not end the run.
const (
	minPreloadChange = 0.10
	minPreloadML     = 5
	preloadTol       = 0.01
	plateauTol       = 0.015
	plateauML        = 2
)

// preloadRun returns the beats of the largest preload change among kept,
// measured beats in time order, or nil when there is none.
func preloadRun(beats []*Beat) []*Beat {
	var kept []*Beat
	for _, b := range beats {
		if b.Kept() && b.Measured {
			kept = append(kept, b)
		}
	}
	var best []*Beat
	bestChange := 0.0
	for _, dir := range []float64{-1, 1} {
		for i := 0; i < len(kept); i++ {
			// Extend from i while EDV moves in dir (within the tolerance),
			// remembering the farthest point reached.
			far, farJ := kept[i].Metrics.EDV, i
			for j := i + 1; j < len(kept); j++ {
				prev, cur := kept[j-1].Metrics.EDV, kept[j].Metrics.EDV
				if dir*(cur-prev) < -preloadTol*math.Max(prev, cur) {
					break
				}
				if dir*(cur-far) > 0 {
					far, farJ = cur, j
				}
			}
			change := math.Abs(far - kept[i].Metrics.EDV)
			top := math.Max(far, kept[i].Metrics.EDV)
			if farJ-i+1 >= MinESPVRBeats && change >= minPreloadChange*top && change >= minPreloadML && change > bestChange {
				best, bestChange = kept[i:farJ+1], change
			}
		}
	}
	return trimPlateau(best)
}

// trimPlateau drops leading beats of a run that sit on the steady plateau
// before the change begins: it starts the run at the last beat whose EDV is
// within plateauTol (and plateauML) of the run's first, keeping at least
// MinESPVRBeats beats.
func trimPlateau(run []*Beat) []*Beat {
	if len(run) <= MinESPVRBeats {
		return run
	}
	first := run[0].Metrics.EDV
	last := run[len(run)-1].Metrics.EDV
	dir := math.Copysign(1, last-first)
	tol := math.Max(plateauTol*first, plateauML)
	start := 0
	for k := 1; k < len(run)-MinESPVRBeats+1; k++ {
		if dir*(run[k].Metrics.EDV-first) <= tol {
			start = k
		}
	}
	return run[start:]
}
