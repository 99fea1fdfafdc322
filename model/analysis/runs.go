package analysis

import (
	"cmp"
	"math"
	"slices"
)

// A preload run is a stretch of kept beats whose end-diastolic volume falls
// (caval occlusion) or rises (release, volume) beat after beat (common
// practice, no source):
//   - it changes EDV by at least minPreloadChange of the largest EDV and by
//     minPreloadNoise noise SDs of EDV, over at least MinESPVRBeats beats;
//   - a step against the trend of up to preloadTol of EDV (or stepNoise SDs)
//     does not end it, but a stall does: over any stallBeats steps EDV must
//     move on by stallFrac of EDV (or stallNoise SDs), so a run never runs on
//     into the steady beats after it;
//   - it starts at the last beat still on the plateau before the change.
//
// Runs do not overlap; a recording may hold several, each fitted on its own.
const (
	minPreloadChange = 0.10
	minPreloadNoise  = 6
	preloadTol       = 0.01
	stepNoise        = 3
	stallBeats       = 3
	stallFrac        = 0.005
	stallNoise       = 2
	plateauTol       = 0.015
	plateauNoise     = 3
)

// findRuns returns the preload runs among the kept, measured beats (in time
// order), largest change first chosen, then sorted by time. sd is the noise
// SD of one EDV, mL.
func findRuns(kept []*Beat, sd float64) [][]*Beat {
	type cand struct {
		from, to int // kept[from:to+1]
		change   float64
	}
	var cands []cand
	edv := func(i int) float64 { return kept[i].Metrics.EDV }
	for _, dir := range []float64{-1, 1} {
		for i := 0; i < len(kept); i++ {
			far, farJ := edv(i), i
			for j := i + 1; j < len(kept); j++ {
				if !adjacentKept(kept[j-1], kept[j]) {
					break
				}
				prev, cur := edv(j-1), edv(j)
				if dir*(cur-prev) < -math.Max(preloadTol*math.Max(prev, cur), stepNoise*sd) {
					break
				}
				if j-i >= stallBeats && dir*(cur-edv(j-stallBeats)) < math.Max(stallFrac*cur, stallNoise*sd) {
					break
				}
				if dir*(cur-far) > 0 {
					far, farJ = cur, j
				}
			}
			change := math.Abs(far - edv(i))
			top := math.Max(far, edv(i))
			if farJ-i+1 >= MinESPVRBeats && change >= minPreloadChange*top && change >= minPreloadNoise*sd {
				cands = append(cands, cand{i, farJ, change})
			}
		}
	}
	// Largest changes first, skipping any that overlaps one already taken.
	// (The stable sort keeps the earlier of equal changes first.)
	slices.SortStableFunc(cands, func(x, y cand) int { return cmp.Compare(y.change, x.change) })
	taken := make([]bool, len(kept))
	var runs [][]*Beat
	for _, c := range cands {
		span := taken[c.from : c.to+1]
		if slices.Contains(span, true) {
			continue
		}
		for i := range span {
			span[i] = true
		}
		runs = append(runs, trimPlateau(kept[c.from:c.to+1], sd))
	}
	// In time order (the runs do not overlap).
	slices.SortFunc(runs, func(x, y []*Beat) int { return x[0].Index - y[0].Index })
	return runs
}

// adjacentKept reports whether two kept beats are close enough to belong to
// one run: in one segment, at most two dropped beats (an ectopic beat and the
// one after it) between them.
func adjacentKept(a, b *Beat) bool { return a.seg == b.seg && b.Index-a.Index <= 3 }

// trimPlateau drops leading beats of a run that sit on the steady plateau
// before the change begins: it starts the run at the last beat whose EDV is
// within plateauTol (and plateauNoise SDs) of the run's first, keeping at
// least MinESPVRBeats beats.
func trimPlateau(run []*Beat, sd float64) []*Beat {
	if len(run) <= MinESPVRBeats {
		return run
	}
	first := run[0].Metrics.EDV
	last := run[len(run)-1].Metrics.EDV
	dir := math.Copysign(1, last-first)
	tol := math.Max(plateauTol*first, plateauNoise*sd)
	start := 0
	for k := 1; k < len(run)-MinESPVRBeats+1; k++ {
		if dir*(run[k].Metrics.EDV-first) <= tol {
			start = k
		}
	}
	return run[start:]
}
