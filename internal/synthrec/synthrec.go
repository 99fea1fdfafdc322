// Package synthrec makes synthetic pressure–volume recordings with the model
// for tests, benchmarks and examples: steady beats, a caval occlusion of our
// own (the filling pressure lowered beat by beat), premature beats, and the
// faults of a real recording (noise, baseline drift, a volume offset, gaps).
// Its output is model data, never patient data, and must be labelled so
// wherever it is kept.
package synthrec

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"strconv"

	"gonum.org/v1/gonum/interp"

	"pvcouple/model"
)

// Spec describes a recording to make.
type Spec struct {
	Params model.Params // the heart and load of the steady beats

	SteadyBeats    int     // beats at Params before the occlusion
	OcclusionBeats int     // beats of falling filling pressure
	OcclusionStep  float64 // filling pressure multiplier per occlusion beat (e.g. 0.88)
	RecoveryBeats  int     // beats back at Params after the occlusion

	// Premature lists beat numbers (0-based, over the whole run) that are cut
	// short to PrematureFraction of the period, so the next beat comes early.
	Premature         []int
	PrematureFraction float64

	Rate float64 // samples per second of the output

	Seed   uint64
	NoiseP float64 // SD of white noise on pressure, mmHg
	NoiseV float64 // SD of white noise on volume, mL
	DriftP float64 // linear pressure baseline drift over the whole recording, mmHg
	DriftV float64 // linear volume drift over the whole recording, mL
	// OffsetV is added to every volume (an uncorrected parallel conductance), mL.
	OffsetV float64
}

// Recording is a synthetic recording with the true beats it was made from.
type Recording struct {
	T, P, V, Pao []float64
	Beats        []*model.Beat // the simulated beats, in order
	Starts       []float64     // start time of each simulated beat, s
}

// Make runs the model beat by beat from its steady state and samples the
// concatenated beats on a uniform grid at spec.Rate. It runs the held
// circulation, whatever spec.Params says, so that the occlusion lowers the
// filling pressure itself and the truth of every beat is the levers set.
func Make(spec Spec) (*Recording, error) {
	spec.Params.Circulation, spec.Params.StressedVolume = model.Held, 0
	s := model.NewSolver()
	s.SampleInterval = 2.5e-4
	st, err := s.SteadyState(spec.Params, nil)
	if err != nil {
		return nil, err
	}
	x := st.Start
	total := spec.SteadyBeats + spec.OcclusionBeats + spec.RecoveryBeats
	premature := map[int]bool{}
	for _, i := range spec.Premature {
		premature[i] = true
	}
	rec := &Recording{}
	var ct, cp, cv, ca []float64
	offset := 0.0
	fp := spec.Params.FillingPressure
	for i := 0; i < total; i++ {
		p := spec.Params
		if i >= spec.SteadyBeats && i < spec.SteadyBeats+spec.OcclusionBeats {
			fp *= spec.OcclusionStep
			p.FillingPressure = fp
		}
		if premature[i] {
			p.HeartRate = spec.Params.HeartRate / spec.PrematureFraction
		}
		b, err := s.Step(p, x)
		if err != nil {
			return nil, fmt.Errorf("beat %d: %w", i, err)
		}
		rec.Beats = append(rec.Beats, b)
		rec.Starts = append(rec.Starts, offset)
		n := len(b.T)
		if i < total-1 {
			n-- // the last sample is the next beat's first
		}
		for j := 0; j < n; j++ {
			ct = append(ct, offset+b.T[j])
			cp = append(cp, b.PLV[j])
			cv = append(cv, b.VLV[j])
			ca = append(ca, b.PAO[j])
		}
		offset += b.Period
		x = b.End
	}
	dt := 1 / spec.Rate
	m := int(math.Floor(ct[len(ct)-1]/dt + 1e-9))
	rng := rand.New(rand.NewPCG(spec.Seed, 0x5eed))
	for _, col := range []struct {
		src []float64
		dst *[]float64
	}{{cp, &rec.P}, {cv, &rec.V}, {ca, &rec.Pao}} {
		var pl interp.PiecewiseLinear
		if err := pl.Fit(ct, col.src); err != nil {
			return nil, err
		}
		out := make([]float64, m+1)
		for k := range out {
			out[k] = pl.Predict(float64(k) * dt)
		}
		*col.dst = out
	}
	rec.T = make([]float64, m+1)
	dur := float64(m) * dt
	for k := range rec.T {
		t := float64(k) * dt
		rec.T[k] = t
		rec.P[k] += spec.NoiseP*rng.NormFloat64() + spec.DriftP*t/dur
		rec.Pao[k] += spec.NoiseP*rng.NormFloat64() + spec.DriftP*t/dur
		rec.V[k] += spec.NoiseV*rng.NormFloat64() + spec.DriftV*t/dur + spec.OffsetV
	}
	return rec, nil
}

// Cut removes the samples with from ≤ t < to, leaving a gap.
func (r *Recording) Cut(from, to float64) {
	keep := func(s []float64) []float64 {
		var out []float64
		for i, t := range r.T {
			if t < from || t >= to {
				out = append(out, s[i])
			}
		}
		return out
	}
	r.P, r.V, r.Pao = keep(r.P), keep(r.V), keep(r.Pao)
	r.T = keep(r.T)
}

// WriteCSV writes the recording with the given header names for time (s),
// LV pressure (mmHg) and LV volume (mL), and the aortic pressure too when
// aortic is not empty.
func (r *Recording) WriteCSV(w io.Writer, timeCol, pressureCol, volumeCol, aortic string) error {
	cw := csv.NewWriter(w)
	head := []string{timeCol, pressureCol, volumeCol}
	if aortic != "" {
		head = append(head, aortic)
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	row := make([]string, len(head))
	for i := range r.T {
		row[0] = strconv.FormatFloat(r.T[i], 'f', 4, 64)
		row[1] = strconv.FormatFloat(r.P[i], 'f', 3, 64)
		row[2] = strconv.FormatFloat(r.V[i], 'f', 3, 64)
		if aortic != "" {
			row[3] = strconv.FormatFloat(r.Pao[i], 'f', 3, 64)
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}
