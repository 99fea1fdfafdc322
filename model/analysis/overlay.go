package analysis

import (
	"math"
	"slices"
)

// Overlay is what a pressure–volume plane view needs to draw a recording
// beside the model's loop: the kept loops as polylines (V on x, P on y),
// the steady loop to compare with the model, the fitted relations and the
// bounds of all of it. Every value is finite.
type Overlay struct {
	Source string        // file name
	Loops  []OverlayLoop // kept beats in time order (at most maxOverlayLoops)
	// Representative indexes Loops: the steady beat whose EDV is nearest the
	// median of the steady beats'; −1 when there is no steady beat.
	Representative int
	ESPVR          *ESPVRFit  // nil when not fitted; draw P = Ees·(V − V0)
	EDPVR          *EDPVRFit  // nil when not fitted; draw P = A·(exp(B·(V − V0)) − 1)
	Unit           VolumeUnit // the unit to show volumes in (µL for a small heart)
	VMin, VMax     float64    // mL, over the loops
	PMin, PMax     float64    // mmHg, over the loops
}

// OverlayLoop is one recorded loop, closed (its last point is the next
// end-diastole, near its first).
type OverlayLoop struct {
	Beat   int       // Beat.Index
	Steady bool      // one of the steady beats
	V, P   []float64 // mL and mmHg, filtered, in time order
}

// maxOverlayLoops caps the loops drawn: a long recording has thousands,
// more than a terminal plot can tell apart.
const maxOverlayLoops = 200

// Overlay returns the kept loops of the analysis for drawing: all of them up
// to maxOverlayLoops; beyond that the runs' beats, the representative steady
// beat and evenly spaced others.
func (a *Analysis) Overlay() *Overlay {
	ov := &Overlay{Source: a.Recording.Source, Representative: -1, ESPVR: a.ESPVR, EDPVR: a.EDPVR, Unit: a.Unit,
		VMin: math.Inf(1), VMax: math.Inf(-1), PMin: math.Inf(1), PMax: math.Inf(-1)}
	steady := map[*Beat]bool{}
	var edvs []float64
	for _, b := range a.Steady {
		steady[b] = true
		edvs = append(edvs, b.Metrics.EDV)
	}
	var rep *Beat
	if len(edvs) > 0 {
		med := median(slices.Clone(edvs))
		best := math.Inf(1)
		for _, b := range a.Steady {
			if d := math.Abs(b.Metrics.EDV - med); d < best {
				best, rep = d, b
			}
		}
	}
	var kept []*Beat
	for _, b := range a.Kept() {
		if b.Measured {
			kept = append(kept, b)
		}
	}
	stride := 1
	if len(kept) > maxOverlayLoops {
		runBeats := 0
		for _, b := range kept {
			if b.Run >= 0 {
				runBeats++
			}
		}
		stride = (len(kept)-runBeats)/max(1, maxOverlayLoops-min(runBeats, maxOverlayLoops/2)) + 1
	}
	others := 0
	for _, b := range kept {
		if b != rep && b.Run < 0 {
			others++
			if (others-1)%stride != 0 {
				continue
			}
		}
		if b.Run >= 0 && len(ov.Loops) >= maxOverlayLoops && b != rep {
			continue
		}
		s := b.Samples()
		l := OverlayLoop{Beat: b.Index, Steady: steady[b], V: s.V, P: s.P}
		for i := range l.V {
			ov.VMin, ov.VMax = math.Min(ov.VMin, l.V[i]), math.Max(ov.VMax, l.V[i])
			ov.PMin, ov.PMax = math.Min(ov.PMin, l.P[i]), math.Max(ov.PMax, l.P[i])
		}
		if b == rep {
			ov.Representative = len(ov.Loops)
		}
		ov.Loops = append(ov.Loops, l)
	}
	if len(ov.Loops) == 0 {
		ov.VMin, ov.VMax, ov.PMin, ov.PMax = 0, 0, 0, 0
	}
	return ov
}
