// Package synthrec makes synthetic pressure–volume recordings with the model
// for tests, benchmarks and examples: steady beats, caval occlusions of our
// own (the filling pressure lowered beat by beat), premature beats, the
// faults of a real recording (noise, baseline drift, a volume offset, gaps),
// a hypertonic-saline run of a conductance catheter, and hearts of other
// sizes by scaling time and volume. Its output is model data, never patient
// data, and must be labelled so wherever it is kept. Noise comes from a
// PCG generator seeded with Spec.Seed: the same spec gives the same samples.
package synthrec

import (
	"bufio"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"strconv"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/interp"

	"pvcouple/model"
)

// Spec describes a recording to make.
type Spec struct {
	Params model.Params // the heart and load of the steady beats

	SteadyBeats    int     // beats at Params before each occlusion
	OcclusionBeats int     // beats of falling filling pressure
	OcclusionStep  float64 // filling pressure multiplier per occlusion beat (e.g. 0.88)
	RecoveryBeats  int     // beats back at Params after each occlusion
	// Repeats is how many times the steady–occlusion–recovery cycle runs
	// (0 or 1: once).
	Repeats int

	// Premature lists beat numbers (0-based, over the whole run) that are cut
	// short to PrematureFraction of the period, so the next beat comes early.
	Premature         []int
	PrematureFraction float64

	Rate float64 // samples per second of the output (in scaled time)

	Seed   uint64
	NoiseP float64 // SD of white noise on pressure, mmHg
	NoiseV float64 // SD of white noise on volume, mL (scaled)
	DriftP float64 // linear pressure baseline drift over the whole recording, mmHg
	DriftV float64 // linear volume drift over the whole recording, mL (scaled)
	// OffsetV is added to every volume (an uncorrected parallel volume), mL (scaled).
	OffsetV float64

	// TimeScale and VolumeScale (0: 1) stretch the model's beats into those
	// of another heart: times are multiplied by TimeScale, volumes by
	// VolumeScale. The truth scales with them: heart rate ÷ TimeScale, V0 and
	// volumes × VolumeScale, Ees ÷ VolumeScale; pressures are kept.
	TimeScale, VolumeScale float64

	// Alpha (0: 1) multiplies the blood's share of the volume signal, as a
	// conductance catheter's slope factor α does: V_signal = α·g(t)·V + OffsetV.
	Alpha float64
	// A hypertonic-saline bolus raises the blood's conductivity g(t) from 1
	// by up to SalineGain over SalineBeats beats from beat SalineStart (a
	// raised-cosine hump); 0 beats for none.
	SalineStart, SalineBeats int
	SalineGain               float64
}

// Recording is a synthetic recording with the true beats it was made from.
type Recording struct {
	T, P, V, Pao []float64
	Beats        []*model.Beat // the simulated beats, in order (model units, unscaled)
	Starts       []float64     // start time of each simulated beat, s (scaled)
}

// Make runs the model beat by beat from its steady state and samples the
// concatenated beats on a uniform grid at spec.Rate. It runs the held
// circulation, whatever spec.Params says, so that the occlusion lowers the
// filling pressure itself and the truth of every beat is the levers set.
func Make(spec Spec) (*Recording, error) {
	rec := &Recording{}
	err := run(spec, func(b *model.Beat, start float64) {
		rec.Beats, rec.Starts = append(rec.Beats, b), append(rec.Starts, start)
	},
		func(t, p, v, pao float64) {
			rec.T, rec.P, rec.V, rec.Pao = append(rec.T, t), append(rec.P, p), append(rec.V, v), append(rec.Pao, pao)
		})
	if err != nil {
		return nil, err
	}
	return rec, nil
}

// Stream makes the recording of spec (in the held circulation, as Make) and writes it as CSV without holding
// it (for long recordings), with the columns of WriteCSV; volumes are
// written multiplied by vFactor (1000 for a µL column).
func Stream(spec Spec, w io.Writer, timeCol, pressureCol, volumeCol string, vFactor float64) error {
	bw := bufio.NewWriterSize(w, 1<<16)
	if _, err := fmt.Fprintf(bw, "%s,%s,%s\n", timeCol, pressureCol, volumeCol); err != nil {
		return err
	}
	var line []byte
	var werr error
	err := run(spec, nil, func(t, p, v, _ float64) {
		line = strconv.AppendFloat(line[:0], t, 'f', 4, 64)
		line = append(line, ',')
		line = strconv.AppendFloat(line, p, 'f', 3, 64)
		line = append(line, ',')
		line = strconv.AppendFloat(line, v*vFactor, 'f', 3, 64)
		line = append(line, '\n')
		if werr == nil {
			_, werr = bw.Write(line)
		}
	})
	if err != nil {
		return err
	}
	if werr != nil {
		return werr
	}
	return bw.Flush()
}

// run simulates the beats of spec, calling beat for each and sample for
// each output sample in time order.
func run(spec Spec, beat func(*model.Beat, float64), sample func(t, p, v, pao float64)) error {
	spec.Params.Circulation, spec.Params.StressedVolume = model.Held, 0
	ts, vs, alpha := orOne(spec.TimeScale), orOne(spec.VolumeScale), orOne(spec.Alpha)
	s := model.NewSolver()
	s.SampleInterval = 2.5e-4
	st, err := s.SteadyState(spec.Params, nil)
	if err != nil {
		return err
	}
	x := st.Start
	cycle := spec.SteadyBeats + spec.OcclusionBeats + spec.RecoveryBeats
	total := cycle * max(1, spec.Repeats)
	premature := map[int]bool{}
	for _, i := range spec.Premature {
		premature[i] = true
	}
	// The duration, for the drifts: the sum of the periods.
	var periods []float64
	for i := 0; i < total; i++ {
		hr := spec.Params.HeartRate
		if premature[i] {
			hr /= spec.PrematureFraction
		}
		periods = append(periods, 60/hr*ts)
	}
	dur := floats.Sum(periods)
	hump := salineHump(spec, periods)
	dt := 1 / spec.Rate
	m := int(math.Floor(dur/dt + 1e-9))
	dur = float64(m) * dt
	rng := rand.New(rand.NewPCG(spec.Seed, 0x5eed))
	k := 0
	offset := 0.0
	fp := spec.Params.FillingPressure
	for i := 0; i < total; i++ {
		p := spec.Params
		if c := i % cycle; c == 0 {
			fp = spec.Params.FillingPressure
		} else if c >= spec.SteadyBeats && c < spec.SteadyBeats+spec.OcclusionBeats {
			fp *= spec.OcclusionStep
			p.FillingPressure = fp
		}
		if premature[i] {
			p.HeartRate = spec.Params.HeartRate / spec.PrematureFraction
		}
		b, err := s.Step(p, x)
		if err != nil {
			return fmt.Errorf("beat %d: %w", i, err)
		}
		if beat != nil {
			beat(b, offset)
		}
		var pp, pv, pa interp.PiecewiseLinear
		bt := make([]float64, len(b.T))
		for j := range bt {
			bt[j] = offset + b.T[j]*ts
		}
		if err := pp.Fit(bt, b.PLV); err != nil {
			return err
		}
		if err := pv.Fit(bt, b.VLV); err != nil {
			return err
		}
		if err := pa.Fit(bt, b.PAO); err != nil {
			return err
		}
		end := offset + b.Period*ts
		for ; k <= m && (float64(k)*dt < end || i == total-1); k++ {
			t := math.Min(float64(k)*dt, bt[len(bt)-1])
			g := 1 + spec.SalineGain*hump(t)
			sample(float64(k)*dt,
				pp.Predict(t)+spec.NoiseP*rng.NormFloat64()+spec.DriftP*t/dur,
				alpha*g*pv.Predict(t)*vs+spec.NoiseV*rng.NormFloat64()+spec.DriftV*t/dur+spec.OffsetV,
				pa.Predict(t)+spec.NoiseP*rng.NormFloat64()+spec.DriftP*t/dur)
		}
		offset = end
		x = b.End
	}
	return nil
}

// salineHump returns the bolus's hump as a function of time, 0 to 1, for
// beats of the given periods.
func salineHump(spec Spec, periods []float64) func(t float64) float64 {
	var t0, t1 float64
	for i, p := range periods {
		if i < spec.SalineStart {
			t0 += p
		}
		if i < spec.SalineStart+spec.SalineBeats {
			t1 += p
		}
	}
	return func(t float64) float64 {
		if spec.SalineBeats == 0 || t <= t0 || t >= t1 {
			return 0
		}
		return 0.5 * (1 - math.Cos(2*math.Pi*(t-t0)/(t1-t0)))
	}
}

func orOne(x float64) float64 {
	if x == 0 {
		return 1
	}
	return x
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
	return r.WriteCSVScaled(w, timeCol, pressureCol, volumeCol, aortic, 1)
}

// WriteCSVScaled is WriteCSV with the volumes multiplied by vFactor (1000
// for a column in µL).
func (r *Recording) WriteCSVScaled(w io.Writer, timeCol, pressureCol, volumeCol, aortic string, vFactor float64) error {
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
		row[2] = strconv.FormatFloat(r.V[i]*vFactor, 'f', 3, 64)
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

// WriteFile writes the recording to a new file at path (see WriteCSVScaled).
func (r *Recording) WriteFile(path, timeCol, pressureCol, volumeCol string, vFactor float64) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	if err := r.WriteCSVScaled(f, timeCol, pressureCol, volumeCol, "", vFactor); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}
