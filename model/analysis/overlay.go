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
	Loops  []OverlayLoop // kept beats in time order
	// Representative indexes Loops: the steady beat whose EDV is the median of
	// the steady beats'; −1 when there is no steady beat.
	Representative int
	ESPVR          *ESPVRFit // nil when not fitted; draw P = Ees·(V − V0)
	EDPVR          *EDPVRFit // nil when not fitted; draw P = A·(exp(B·(V − V0)) − 1)
	VMin, VMax     float64   // mL, over the loops
	PMin, PMax     float64   // mmHg, over the loops
}

// OverlayLoop is one recorded loop, closed (its last point is the next
// end-diastole, near its first).
type OverlayLoop struct {
	Beat   int       // Beat.Index
	Steady bool      // one of the steady beats
	V, P   []float64 // mL and mmHg, filtered, in time order
}

// Open reads and analyses a recording: LoadCSV then Analyze.
func Open(path string, ro ReadOptions, o Options) (*Analysis, error) {
	r, err := LoadCSV(path, ro)
	if err != nil {
		return nil, err
	}
	return Analyze(r, o)
}

// Overlay returns the kept loops of the analysis for drawing.
func (a *Analysis) Overlay() *Overlay {
	ov := &Overlay{Source: a.Recording.Source, Representative: -1, ESPVR: a.ESPVR, EDPVR: a.EDPVR,
		VMin: math.Inf(1), VMax: math.Inf(-1), PMin: math.Inf(1), PMax: math.Inf(-1)}
	steady := map[*Beat]bool{}
	for _, b := range a.Steady {
		steady[b] = true
	}
	var edvs []float64
	for _, b := range a.Kept() {
		if !b.Measured {
			continue
		}
		l := OverlayLoop{Beat: b.Index, Steady: steady[b], V: slices.Clone(b.Samples.V), P: slices.Clone(b.Samples.P)}
		for i := range l.V {
			ov.VMin, ov.VMax = math.Min(ov.VMin, l.V[i]), math.Max(ov.VMax, l.V[i])
			ov.PMin, ov.PMax = math.Min(ov.PMin, l.P[i]), math.Max(ov.PMax, l.P[i])
		}
		ov.Loops = append(ov.Loops, l)
		if l.Steady {
			edvs = append(edvs, b.Metrics.EDV)
		}
	}
	if len(edvs) > 0 {
		med := median(slices.Clone(edvs))
		best := math.Inf(1)
		for i, l := range ov.Loops {
			if !l.Steady {
				continue
			}
			if d := math.Abs(l.V[0] - med); d < best {
				best, ov.Representative = d, i
			}
		}
	}
	if len(ov.Loops) == 0 {
		ov.VMin, ov.VMax, ov.PMin, ov.PMax = 0, 0, 0, 0
	}
	return ov
}
