package ui

import (
	"errors"
	"fmt"
	"io"
	"math"

	"pvcouple/model"
	"pvcouple/model/analysis"
	"pvcouple/presets"
)

// playRun is one playing of a protocol: its plan for the levers it started
// from, the transient that computes its beats one at a time, and the beats
// computed so far. It is used on the UI goroutine only.
type playRun struct {
	id    int // tags the run's tick messages
	pr    *presets.Protocol
	plan  *presets.Plan
	tr    *model.Transient
	start *model.Steady // the steady beat the run starts from
	beats []*model.RunBeat
	loops []model.BeatSamples // beats[i].Samples(), for the ESPVR fit
	err   error               // the failure of a beat; no more beats after it
	box   bounds              // of the starting loop and the beats so far, with (min(0, V0), 0)

	groups deviceGroup // the lesion and device readouts of the run's beats

	espvr bool   // the protocol leaves the ESPVR alone, so a fit makes sense
	why   string // why not, when !espvr

	// The last fit, over fitN loops.
	fitN   int
	fit    analysis.ESPVRFit
	fitErr error
}

// newPlayRun expands pr for the levers p and prepares its transient; it
// computes no beat yet. Errors name the protocol's file, line and key.
func newPlayRun(id int, pr *presets.Protocol, p model.Params) (*playRun, error) {
	plan, err := pr.Expand(p)
	if err != nil {
		return nil, err
	}
	tr, err := model.NewTransient(plan.Initial, plan.Params, model.TransientOptions{})
	if err != nil {
		return nil, fmt.Errorf("%s: %w", pr.Source, err)
	}
	r := &playRun{id: id, pr: pr, plan: plan, tr: tr, start: tr.Steady(), box: emptyBounds()}
	r.box.add(r.start.VLV, r.start.PLV)
	r.box.addPoint(math.Min(0, r.start.Params.V0), 0)
	r.espvr, r.why = pr.ESPVRFixed()
	r.groups = deviceGroups(&r.start.Params)
	for i := range plan.Params {
		r.groups |= deviceGroups(&plan.Params[i])
	}
	return r, nil
}

// total is the number of beats of the run.
func (r *playRun) total() int { return len(r.plan.Params) }

// done reports whether no more beats will come.
func (r *playRun) done() bool { return len(r.beats) == r.total() || r.err != nil }

// next computes the next beat. It returns io.EOF after the last one, and
// the failure of a beat (which ends the run) once.
func (r *playRun) next() error {
	if r.err != nil {
		return io.EOF
	}
	b, err := r.tr.Next()
	switch {
	case errors.Is(err, io.EOF):
		return io.EOF
	case err != nil:
		r.err = err
		return err
	}
	r.beats = append(r.beats, b)
	r.loops = append(r.loops, b.Samples())
	r.box.add(b.VLV, b.PLV)
	return nil
}

// fitTo fits the ESPVR to the first n loops (cached for the last n asked).
func (r *playRun) fitTo(n int) (analysis.ESPVRFit, error) {
	if n != r.fitN {
		// V0 starts at 0, as in a study that does not know it, and
		// always so: a beat's fit is the same however it was reached.
		r.fit, r.fitErr = analysis.FitESPVR(r.loops[:n], 0)
		r.fitN = n
	}
	return r.fit, r.fitErr
}

// fitReadout is the fit section of the readouts with the beats up to beat i
// (from 0): the fit against the model's Ees and V0 of that beat.
func (r *playRun) fitReadout(i int) fitReadout {
	if !r.espvr {
		return noFit("Not fitted: " + r.why + ".")
	}
	n := i + 1
	if n < analysis.MinESPVRBeats {
		return noFit(fmt.Sprintf("Fitted from %d loops on (%d so far).", analysis.MinESPVRBeats, n))
	}
	fit, err := r.fitTo(n)
	if err != nil {
		return noFit("Not fitted yet: " + err.Error() + ".")
	}
	p := r.plan.Params[i]
	return fitReadout{shown: true, ok: true, ees: fit.Ees, v0: fit.V0, r2: fit.R2, loops: fit.Beats, modelEes: p.Ees, modelV0: p.V0}
}
