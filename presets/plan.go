package presets

import (
	"fmt"

	"pvcouple/model"
)

// Plan is a protocol expanded for one starting parameter set: the parameters
// of every beat, ready for model.NewTransient.
type Plan struct {
	Protocol *Protocol
	Initial  model.Params   // the parameters before the first step (the run's steady state)
	Params   []model.Params // parameters of beat i (from 0)
	Steps    []int          // Steps[i] is the index in Protocol.Steps of beat i's step
	First    []int          // First[j] is the beat index where step j begins; −1 for a step left out in this circulation
}

// Label returns the label of the step that beat i (from 0) belongs to.
func (pl *Plan) Label(i int) string { return pl.Protocol.Steps[pl.Steps[i]].Label }

// Expand computes the parameters of every beat of the protocol when it starts
// from initial. The steps act in order on the levers as they stand:
//
//   - set: the levers take their values at the step's first beat;
//   - scale: the levers are multiplied by their factors at the step's first beat;
//   - ramp over N beats from value a to target b: beat k of the step (k = 1…N)
//     has a + (b − a)·k/N, so the first beat has moved one N-th of the way and the
//     last reaches b exactly;
//   - hold: nothing changes.
//
// A target `initial` is the lever's value in initial; a factor multiplies the
// lever's value at the start of the step. Every beat's parameters are checked
// against the ranges of model.Specs and Params.Validate; an error names the
// step's line in the file, the lever, the value reached and the allowed range.
//
// A step marked for one circulation is left out in the other. A step may
// change only levers that act in the run's circulation, and a closed run
// never the filling pressure: there the volume, not a held pressure, sets
// preload (stressed_volume_ml gives or takes blood at a beat's onset,
// caval_occlusion_pct narrows the venous return).
func (pr *Protocol) Expand(initial model.Params) (*Plan, error) {
	if err := initial.Validate(); err != nil {
		return nil, fmt.Errorf("starting parameters: %w", err)
	}
	circ := initial.Circulation
	total := pr.TotalBeats(circ)
	if total > MaxProtocolBeats {
		return nil, &FileError{File: pr.Source, Key: "steps", Msg: fmt.Sprintf("%d beats in all; at most %d are allowed", total, MaxProtocolBeats)}
	}
	pl := &Plan{Protocol: pr, Initial: initial,
		Params: make([]model.Params, 0, total), Steps: make([]int, 0, total), First: make([]int, len(pr.Steps))}
	cur := initial
	for j, st := range pr.Steps {
		pl.First[j] = -1
		if !st.RunsIn(circ) {
			continue
		}
		pl.First[j] = len(pl.Params)
		from := cur
		to := cur
		for _, c := range st.Changes {
			spec, ok := model.SpecByKey(c.Key)
			if !ok {
				return nil, &FileError{File: pr.Source, Line: c.Line, Key: changeKey(j, st, c), Msg: "unknown parameter (see `pvcouple params`)"}
			}
			if err := actsInRun(spec, circ); err != nil {
				return nil, &FileError{File: pr.Source, Line: c.Line, Key: changeKey(j, st, c), Msg: err.Error()}
			}
			var v float64
			switch c.Mode {
			case ToValue:
				v = c.Value
			case ByFactor:
				v = spec.Get(from) * c.Value
			case ToInitial:
				v = spec.Get(initial)
			}
			if err := spec.Check(v); err != nil {
				return nil, &FileError{File: pr.Source, Line: c.Line, Key: changeKey(j, st, c), Msg: fmt.Sprintf(
					"from %s the step would reach %v", startText(spec, from), err)}
			}
			spec.Set(&to, v)
		}
		for k := 1; k <= st.Beats; k++ {
			p := to
			if st.Kind == StepRamp && k < st.Beats {
				f := float64(k) / float64(st.Beats)
				for _, c := range st.Changes {
					spec, _ := model.SpecByKey(c.Key)
					a, b := spec.Get(from), spec.Get(to)
					spec.Set(&p, a+(b-a)*f)
				}
			}
			if err := p.Validate(); err != nil {
				return nil, &FileError{File: pr.Source, Line: st.Line, Key: stepKey(j), Msg: fmt.Sprintf(
					"step %q, beat %d of the run: %v", st.Label, len(pl.Params)+1, err)}
			}
			pl.Params = append(pl.Params, p)
			pl.Steps = append(pl.Steps, j)
		}
		cur = to
	}
	return pl, nil
}

// actsInRun refuses a lever change that would do nothing in a run of
// circulation c.
func actsInRun(spec model.Spec, c model.Circulation) error {
	other := model.Held
	if c == model.Held {
		other = model.Closed
	}
	switch {
	case c == model.Closed && spec.Key == "filling_pressure_mmhg":
		return fmt.Errorf("a closed circulation does not hold the filling pressure during a run: change preload with " +
			"caval_occlusion_pct (an occlusion) or stressed_volume_ml (volume), or mark the step `circulation: held`")
	case !spec.ActsIn(c):
		return fmt.Errorf("%s acts only in the %s circulation and this run is %s: mark the step `circulation: %s`",
			spec.Key, other, c, other)
	}
	return nil
}

// changeKey names a change of step j in errors.
func changeKey(j int, st Step, c Change) string {
	return stepKey(j) + "." + string(st.Kind) + "." + c.Key
}

// startText describes a lever's value at the start of a step.
func startText(spec model.Spec, p model.Params) string {
	return spec.Key + " = " + model.FormatValue(spec.Get(p))
}
