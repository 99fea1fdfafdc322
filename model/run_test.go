package model_test

import (
	"errors"
	"io"
	"math"
	"strings"
	"testing"

	"pvcouple/model"
)

func repeat(p model.Params, n int) []model.Params {
	s := make([]model.Params, n)
	for i := range s {
		s[i] = p
	}
	return s
}

// relDiffFloor is |a − b| / max(|b|, floor).
func relDiffFloor(a, b, floor float64) float64 { return math.Abs(a-b) / math.Max(math.Abs(b), floor) }

// A run whose levers never change stays at the steady state it starts from:
// every beat measures what the steady beat measures, to the steady-state
// tolerance (the start state is periodic within model.SteadyTol).
func TestTransientHoldStaysAtSteadyState(t *testing.T) {
	p := normalParams(t)
	tr, err := model.NewTransient(p, repeat(p, 8), model.TransientOptions{})
	if err != nil {
		t.Fatal(err)
	}
	st := tr.Steady()
	prev := st.Beat
	for rb, err := range tr.All() {
		if err != nil {
			t.Fatal(err)
		}
		if rb.Start != prev.End {
			t.Errorf("beat %d starts at %+v, the previous beat ended at %+v", rb.Index+1, rb.Start, prev.End)
		}
		if want := float64(rb.Index) * st.Period; math.Abs(rb.TStart-want) > 1e-12 {
			t.Errorf("beat %d starts at %.15g s, want %.15g", rb.Index+1, rb.TStart, want)
		}
		for _, m := range model.MetricSpecs {
			// 1e-5: state periodic to 1e-6, and metrics like dP/dt or τ
			// amplify a state difference by at most an order of magnitude.
			if d := relDiffFloor(m.Get(&rb.Metrics), m.Get(&st.Metrics), 1); d > 1e-5 {
				t.Errorf("beat %d %s = %g, steady %g", rb.Index+1, m.Key, m.Get(&rb.Metrics), m.Get(&st.Metrics))
			}
		}
		prev = rb.Beat
	}
	if !tr.Done() || tr.Len() != 8 {
		t.Errorf("done %v, len %d", tr.Done(), tr.Len())
	}
	if _, err := tr.Next(); !errors.Is(err, io.EOF) {
		t.Errorf("after the last beat Next returned %v, want io.EOF", err)
	}
}

// After a step change of the levers the beats are a genuine transient that
// settles on the periodic steady state of the new levers, which SteadyState
// finds by a different method (Newton shooting on the beat map). The arterial
// pressure relaxes by about exp(−T/(R·C)) per beat (docs/science.md §2), about 0.6
// here, so 60 beats leave a difference far below the tolerance.
func TestTransientSettlesOnNewSteadyState(t *testing.T) {
	p := normalParams(t)
	q := p
	q.FillingPressure = 14
	q.Resistance *= 1.3
	tr, err := model.NewTransient(p, repeat(q, 60), model.TransientOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want, err := model.NewSolver().SteadyState(q, nil)
	if err != nil {
		t.Fatal(err)
	}
	var first, last *model.RunBeat
	for rb, err := range tr.All() {
		if err != nil {
			t.Fatal(err)
		}
		if first == nil {
			first = rb
		}
		last = rb
	}
	if d := relDiffFloor(first.Metrics.MAP, want.Metrics.MAP, 1); d < 0.02 {
		t.Errorf("first beat after the change already at the new MAP (%.2f vs %.2f): not a transient", first.Metrics.MAP, want.Metrics.MAP)
	}
	for _, m := range model.MetricSpecs {
		if d := relDiffFloor(m.Get(&last.Metrics), m.Get(&want.Metrics), 1); d > 1e-5 {
			t.Errorf("after 60 beats %s = %g, new steady state %g", m.Key, m.Get(&last.Metrics), m.Get(&want.Metrics))
		}
	}
}

// The recording is one uniform grid across the run: sample k at k/rate s,
// each in the beat that covers it, none repeated or missed at the boundaries
// (also when the rate and so the period change), and on the first beat the
// same pressure and volume as the beat's own samples at the same times.
func TestTransientRecordingIsOneUniformGrid(t *testing.T) {
	p := normalParams(t)
	fast := p
	fast.HeartRate = 97 // a period of no whole number of milliseconds
	sched := append(repeat(p, 3), repeat(fast, 4)...)
	tr, err := model.NewTransient(p, sched, model.TransientOptions{RecordRate: 1000})
	if err != nil {
		t.Fatal(err)
	}
	k := 0
	var end float64
	for rb, err := range tr.All() {
		if err != nil {
			t.Fatal(err)
		}
		rec := rb.Recording
		if len(rec.T) != len(rec.P) || len(rec.T) != len(rec.V) || len(rec.T) < 600 {
			t.Fatalf("beat %d: %d times, %d pressures, %d volumes", rb.Index+1, len(rec.T), len(rec.P), len(rec.V))
		}
		for _, tm := range rec.T {
			if tm != float64(k)/1000 {
				t.Fatalf("beat %d: sample %d at %.15g s, want %d ms", rb.Index+1, k, tm, k)
			}
			if tm < rb.TStart-1e-9 || tm > rb.TStart+rb.Period+1e-9 {
				t.Errorf("sample at %g s outside beat %d [%g, %g]", tm, rb.Index+1, rb.TStart, rb.TStart+rb.Period)
			}
			k++
		}
		if rb.Index == 0 {
			for i := range rec.T {
				j := i // the beat's own samples start on the same millisecond grid
				for rb.T[j] < rec.T[i]-1e-12 {
					j++
				}
				if relDiffFloor(rec.V[i], rb.VLV[j], 1) > 1e-12 || relDiffFloor(rec.P[i], rb.PLV[j], 1) > 1e-9 {
					t.Fatalf("t = %g: recording P %g V %g, beat P %g V %g", rec.T[i], rec.P[i], rec.V[i], rb.PLV[j], rb.VLV[j])
				}
			}
		}
		end = rb.TStart + rb.Period
	}
	if want := int(math.Floor(end*1000+1e-6)) + 1; k != want {
		t.Errorf("%d samples over %.6f s, want %d", k, end, want)
	}
}

func TestTransientErrorsAndStopping(t *testing.T) {
	p := normalParams(t)
	if _, err := model.NewTransient(p, nil, model.TransientOptions{}); err == nil {
		t.Error("empty schedule accepted")
	}
	bad := p
	bad.HeartRate = 300
	if _, err := model.NewTransient(p, []model.Params{p, bad}, model.TransientOptions{}); err == nil ||
		!strings.Contains(err.Error(), "beat 2") || !strings.Contains(err.Error(), "heart_rate_bpm = 300") {
		t.Errorf("invalid beat: %v", err)
	}
	if _, err := model.NewTransient(p, repeat(p, 2), model.TransientOptions{RecordRate: -1}); err == nil {
		t.Error("negative recording rate accepted")
	}
	if _, err := model.NewTransient(bad, repeat(p, 2), model.TransientOptions{}); err == nil ||
		!strings.Contains(err.Error(), "initial steady state") {
		t.Errorf("invalid initial parameters: %v", err)
	}
	tr, err := model.NewTransient(p, repeat(p, 5), model.TransientOptions{})
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, err := range tr.All() {
		if err != nil {
			t.Fatal(err)
		}
		if n++; n == 2 {
			break
		}
	}
	if tr.Done() || tr.Time() <= 0 {
		t.Errorf("stopped after 2 of 5 beats: done %v at %g s", tr.Done(), tr.Time())
	}
	rb, err := tr.Next()
	if err != nil || rb.Index != 2 {
		t.Errorf("resume: beat %v, %v", rb, err)
	}
}

// A beat's stroke volume is what it ejects, also in a transient: when the
// filling pressure rises at a beat's onset, the extra filling at the end of
// that beat feeds the next beat and must not count as this beat's EDV. The
// check is mass balance: SV against the integral of aortic flow [derived];
// 0.2 % covers the trapezoidal sum's error at the edges of ejection.
func TestTransientStrokeVolumeIsWhatIsEjected(t *testing.T) {
	p := normalParams(t)
	up, down := p, p
	up.FillingPressure, down.FillingPressure = 16, 5
	for _, sched := range [][]model.Params{repeat(up, 3), append(repeat(p, 1), repeat(down, 2)...)} {
		tr, err := model.NewTransient(p, sched, model.TransientOptions{})
		if err != nil {
			t.Fatal(err)
		}
		for rb, err := range tr.All() {
			if err != nil {
				t.Fatal(err)
			}
			ejected := 0.0
			for i := 1; i < len(rb.T); i++ {
				ejected += 0.5 * (rb.QOut[i] + rb.QOut[i-1]) * (rb.T[i] - rb.T[i-1])
			}
			if d := (ejected - rb.Metrics.SV) / ejected; math.Abs(d) > 0.002 {
				t.Errorf("FP %g, beat %d: SV %.2f mL, ejected %.2f mL (EDV %.2f, end volume %.2f)",
					rb.Params.FillingPressure, rb.Index+1, rb.Metrics.SV, ejected, rb.Metrics.EDV, rb.End.V)
			}
		}
	}
}
