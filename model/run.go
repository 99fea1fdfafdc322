package model

import (
	"errors"
	"fmt"
	"io"
	"iter"
	"math"
)

// TransientOptions tune a Transient.
type TransientOptions struct {
	// RecordRate, when positive, adds to every beat its LV pressure and volume
	// on a uniform grid of this many samples per second of run time, as a
	// catheter recording holds them (see Recording). Zero records nothing.
	RecordRate int
}

// MaxRecordRate is the highest RecordRate accepted, samples per second.
const MaxRecordRate = 10000

// Recording is the part of a uniformly sampled LV pressure and volume record
// that falls in one beat. Sample k of the run lies at time k/rate; a beat holds
// the samples in [TStart, TStart + Period), and the last beat of a run also its
// end point, so consecutive beats neither repeat nor miss a sample.
type Recording struct {
	T []float64 // s from the start of the run
	P []float64 // LV pressure, mmHg
	V []float64 // LV volume, mL
}

// RunBeat is one beat of a transient run.
type RunBeat struct {
	*Beat
	Index     int       // position in the schedule, from 0
	TStart    float64   // s from the start of the run to this beat's activation onset
	Recording Recording // empty unless TransientOptions.RecordRate is set
}

// Transient runs the model beat by beat through a schedule of parameters: the
// levers change between beats, at the onset of activation, and each beat
// starts from the state where the previous one ended, so the heart and the
// arterial load carry their volumes and pressures across the change (a
// transient, not a string of steady states). The run starts from the periodic
// steady state of the initial parameters, as after a long stable baseline.
//
// A beat runs from activation onset to the next onset, so a change acts on
// that beat's contraction, ejection and relaxation at once, while its
// end-diastolic volume was filled in the previous beat: a change of filling
// pressure shows in EDV one beat later, as after a caval occlusion.
//
// A Transient is a pull iterator: Next integrates and returns one beat (about
// under half a millisecond of work at rest), so a caller can play a run at any
// pace, show beats as they come and stop at any time. It is not safe for
// concurrent use.
type Transient struct {
	solver   *Solver
	schedule []Params
	steady   *Steady
	state    State
	t        float64 // run time at the onset of the next beat, s
	next     int     // schedule index of the next beat
	rate     int     // recording rate, Hz; 0 for none
	k        int     // index of the next recording sample
	err      error   // sticky error of a failed beat
}

// NewTransient solves the periodic steady state of initial and prepares to
// run schedule[0], schedule[1], … from it. The schedule is not copied: do not
// change it during the run.
func NewTransient(initial Params, schedule []Params, opts TransientOptions) (*Transient, error) {
	if len(schedule) == 0 {
		return nil, errors.New("the schedule holds no beats")
	}
	if opts.RecordRate < 0 || opts.RecordRate > MaxRecordRate {
		return nil, fmt.Errorf("recording rate %d Hz: allowed 0 to %d Hz", opts.RecordRate, MaxRecordRate)
	}
	for i, p := range schedule {
		if err := p.Validate(); err != nil {
			return nil, fmt.Errorf("beat %d: %w", i+1, err)
		}
	}
	s := NewSolver()
	st, err := s.SteadyState(initial, nil)
	if err != nil {
		return nil, fmt.Errorf("initial steady state: %w", err)
	}
	return &Transient{solver: s, schedule: schedule, steady: st, state: st.End, rate: opts.RecordRate}, nil
}

// Steady returns the steady state the run starts from.
func (r *Transient) Steady() *Steady { return r.steady }

// Len returns the number of beats in the schedule.
func (r *Transient) Len() int { return len(r.schedule) }

// Done reports whether every beat has been returned or a beat failed.
func (r *Transient) Done() bool { return r.next >= len(r.schedule) || r.err != nil }

// Time returns the run time at the onset of the next beat, s.
func (r *Transient) Time() float64 { return r.t }

// Next integrates and returns the next beat of the schedule. After the last
// beat it returns io.EOF; after a failure it keeps returning that failure.
func (r *Transient) Next() (*RunBeat, error) {
	if r.err != nil {
		return nil, r.err
	}
	if r.next >= len(r.schedule) {
		return nil, io.EOF
	}
	i := r.next
	b, err := r.solver.Step(r.schedule[i], r.state)
	if err != nil {
		r.err = fmt.Errorf("beat %d of %d at %.3f s: %w", i+1, len(r.schedule), r.t, err)
		return nil, r.err
	}
	rb := &RunBeat{Beat: b, Index: i, TStart: r.t}
	end := r.t + b.Period
	if r.rate > 0 {
		rb.Recording = r.record(r.t, end, i == len(r.schedule)-1)
	}
	r.state, r.t = b.End, end
	r.next++
	return rb, nil
}

// All returns an iterator over the remaining beats; it stops after the last
// beat, or after yielding the error of a beat that failed. Breaking out of the
// loop leaves the run where it stopped.
func (r *Transient) All() iter.Seq2[*RunBeat, error] {
	return func(yield func(*RunBeat, error) bool) {
		for !r.Done() {
			rb, err := r.Next()
			if !yield(rb, err) || err != nil {
				return
			}
		}
		if r.err != nil && r.next < len(r.schedule) {
			yield(nil, r.err)
		}
	}
}

// recordTol absorbs the rounding of summed beat periods when a grid sample
// falls on a beat boundary, s.
const recordTol = 1e-9

// record samples the beat just integrated (from t0 to t1 of run time) on the
// run's uniform grid, from the solver's dense output.
func (r *Transient) record(t0, t1 float64, last bool) Recording {
	s := r.solver
	rate := float64(r.rate)
	var rec Recording
	var local []float64
	for ; ; r.k++ {
		t := float64(r.k) / rate
		if t >= t1-recordTol && !(last && t <= t1+recordTol) {
			break
		}
		rec.T = append(rec.T, t)
		local = append(local, math.Min(math.Max(t-t0, 0), t1-t0))
	}
	if len(local) == 0 {
		return rec
	}
	n := s.c.dim()
	cols := make([][]float64, n)
	for i := range cols {
		cols[i] = make([]float64, len(local))
	}
	s.dense.Eval(local, cols)
	rec.V = cols[LeftVentricle]
	rec.P = make([]float64, len(local))
	for i, t := range local {
		e, _ := s.c.table.at(t)
		rec.P[i] = s.c.lv.pressure(e, rec.V[i])
	}
	return rec
}

// Samples returns the beat's LV pressure, volume and dP/dt with its aortic
// pressure and mitral flow, for Measure and the loop analyses of model/analysis.
func (b *Beat) Samples() BeatSamples {
	return BeatSamples{T: b.T, P: b.PLV, V: b.VLV, DPdt: b.DPdt, Pao: b.PAO, QIn: b.QIn}
}
