package ui

import "pvcouple/model"

// state is what the explorer shows: the scenario, the levers' setting, the
// loop on screen and the baseline it is compared with. Views and panels read
// it and never change it.
type state struct {
	name   string       // scenario name
	origin string       // where it came from: "preset normal" or a file path
	target model.Params // the levers' setting; solved, or being solved
	// fill asks for the closed circulation's volume to be found so that the
	// mean LAP is target.FillingPressure (a fluid challenge), not kept.
	fill  bool
	shown *model.Steady // the last settled loop; shown.Params may lag target
	base  *model.Steady // the baseline loop

	rec *recording // a recording overlaid on the PV plane; nil when none (overlay.go)
}

// settled reports whether the loop on screen belongs to the levers' setting.
func (s *state) settled() bool { return s.shown != nil && s.shown.Params == s.target && !s.fill }

// fillingPressure is the filling-pressure lever's value: held, the lever;
// closed, the mean left-atrial pressure of the loop on screen, which the
// other levers move at a fixed blood volume.
func (s *state) fillingPressure(p model.Params, st *model.Steady) float64 {
	if p.Circulation == model.Closed && st != nil && st.Params == p {
		return st.Metrics.LAPMean
	}
	return p.FillingPressure
}
