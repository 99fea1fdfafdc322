package ui

import (
	"math"

	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/model"
)

// traceView shows one steady beat against time: LV and aortic pressure
// above, LV volume below, with the baseline beat dotted beneath. Where a
// valve leaks or a pump runs (on screen or in the baseline), a third plot
// shows the flows: the aortic and mitral valves', negative for backflow,
// and the pump's; in a window too low for three, it takes the volume's
// place. The plots share the time axis, from the start of
// activation to the end of the longer beat.
type traceView struct {
	s               *Styles
	pres, vol, flow *plot
	w, h            int
	flows           bool // the flow plot is on screen
	fp, fv, ff      frame
	fixed           bool
	cacheShown      *model.Steady
	cacheBase       *model.Steady
	cache           string
}

func newTraceView(s *Styles) *traceView {
	v := &traceView{s: s, pres: newPlot(s, "t ms", "P mmHg"), vol: newPlot(s, "t ms", "V mL"), flow: newPlot(s, "t ms", "Q mL/s")}
	v.pres.legend = s.Loop.Render("━ LV") + "  " + s.Aortic.Render("━ Ao") + "  " + s.Baseline.Render("┄ baseline")
	v.vol.legend = s.Loop.Render("━ LV volume") + "  " + s.Baseline.Render("┄ baseline")
	v.flow.legend = s.Aortic.Render("━ aortic valve") + "  " + s.Mitral.Render("━ mitral") + "  " +
		s.Pump.Render("━ pump") + "  " + s.Baseline.Render("┄ baseline pump")
	return v
}

// Name implements view.
func (v *traceView) Name() string { return "Beat traces" }

// SetSize implements view.
func (v *traceView) SetSize(w, h int) {
	if w == v.w && h == v.h {
		return
	}
	v.w, v.h = w, h
	v.split()
}

// split shares the height between the plots.
func (v *traceView) split() {
	w, h := v.w, v.h
	switch {
	case v.flows && h/4 >= minPlotH+2:
		hp, hv := h/2, h/4
		v.pres.SetSize(w, hp)
		v.vol.SetSize(w, hv)
		v.flow.SetSize(w, h-hp-hv)
	case v.flows:
		// Too low for three plots: the flows take the volume's place.
		hp := h * 3 / 5
		v.pres.SetSize(w, hp)
		v.vol.SetSize(w, 0)
		v.flow.SetSize(w, h-hp)
	default:
		hp := h * 3 / 5
		v.pres.SetSize(w, hp)
		v.vol.SetSize(w, h-hp)
	}
	v.fixed, v.cache = false, ""
}

// needsFlows reports whether a beat on screen or the baseline has a
// leaking valve or a pump.
func needsFlows(st *state) bool {
	for _, s := range []*model.Steady{st.shown, st.base} {
		if s != nil && (s.Params.PumpFlow > 0 || s.Params.AorticRegurgitantArea > 0 || s.Params.MitralRegurgitantArea > 0) {
			return true
		}
	}
	return false
}

// Update implements view.
func (v *traceView) Update(tea.Msg, *state) tea.Cmd { return nil }

// Refit implements view.
func (v *traceView) Refit() { v.fixed, v.cache = false, "" }

// Render implements view.
func (v *traceView) Render(st *state) string {
	if st.shown == v.cacheShown && st.base == v.cacheBase && v.cache != "" {
		return v.cache
	}
	if f := needsFlows(st); f != v.flows {
		v.flows = f
		v.split()
	}
	bp, bv, bf := emptyBounds(), emptyBounds(), emptyBounds()
	var ms [][]float64 // time in ms of shown and base
	for _, s := range []*model.Steady{st.shown, st.base} {
		if s == nil {
			ms = append(ms, nil)
			continue
		}
		t := make([]float64, len(s.T))
		for i, x := range s.T {
			t[i] = 1000 * x
		}
		ms = append(ms, t)
		bp.add(t, s.PLV)
		bp.add(t, s.PAO)
		bp.addPoint(0, 0)
		bv.add(t, s.VLV)
		bv.addPoint(0, math.Min(0, s.Params.V0))
		bf.add(t, s.QOut)
		bf.add(t, s.QIn)
		bf.add(t, s.QPump)
		bf.addPoint(0, 0)
	}
	if !v.fixed || !v.fp.holds(bp) || !v.fv.holds(bv) || v.flows && !v.ff.holds(bf) {
		nx, nyp := tickCounts(v.w, v.pres.h)
		_, nyv := tickCounts(v.w, v.vol.h)
		_, nyf := tickCounts(v.w, v.flow.h)
		v.fp = fitFrame(bp, nx, nyp, 0.1)
		v.fv = fitFrame(bv, nx, nyv, 0.1)
		v.ff = fitFrame(bf, nx, nyf, 0.1)
		// One time axis for all: the wider of the fits.
		if v.fv.X.Hi > v.fp.X.Hi {
			v.fp.X = v.fv.X
		}
		v.fp.X.Lo, v.fv.X, v.ff.X = 0, v.fp.X, v.fp.X
		v.fixed = true
	}
	var ps, vs []series
	if b := st.base; b != nil {
		ps = append(ps, series{X: ms[1], Y: b.PAO, Dotted: true, Style: v.s.Baseline},
			series{X: ms[1], Y: b.PLV, Dotted: true, Style: v.s.Baseline})
		vs = append(vs, series{X: ms[1], Y: b.VLV, Dotted: true, Style: v.s.Baseline})
	}
	var pl []label
	if c := st.shown; c != nil {
		ps = append(ps, series{X: ms[0], Y: c.PAO, Style: v.s.Aortic}, series{X: ms[0], Y: c.PLV, Style: v.s.Loop})
		vs = append(vs, series{X: ms[0], Y: c.VLV, Style: v.s.Loop})
		n := len(c.T) - 1
		pl = append(pl, label{X: ms[0][n], Y: c.PAO[n], Text: "Ao", Style: v.s.Aortic, At: []offset{{1, -1}, {1, 0}, {1, 1}, {-3, -1}}})
		i := argmax(c.PLV)
		pl = append(pl, label{X: ms[0][i], Y: c.PLV[i], Text: "LV", Style: v.s.Loop, At: []offset{{1, -1}, {-3, -1}, {2, 0}, {0, -2}}})
	}
	v.cache = v.pres.Render(v.fp, ps, pl)
	if v.vol.h > 0 {
		v.cache += "\n" + v.vol.Render(v.fv, vs, nil)
	}
	if v.flows {
		v.cache += "\n" + v.flowPlot(st, ms)
	}
	v.cacheShown, v.cacheBase = st.shown, st.base
	return v.cache
}

// argmax is the index of the largest value.
func argmax(y []float64) int {
	k := 0
	for i, v := range y {
		if v > y[k] {
			k = i
		}
	}
	return k
}

// flowPlot draws the valves' and the pump's flows of the beat on screen, with
// the baseline's pump flow dotted; ms are the beats' times in ms.
func (v *traceView) flowPlot(st *state, ms [][]float64) string {
	var fs []series
	var fl []label
	if b := st.base; b != nil && b.Params.PumpFlow > 0 {
		fs = append(fs, series{X: ms[1], Y: b.QPump, Dotted: true, Style: v.s.Baseline})
	}
	if c := st.shown; c != nil {
		n := len(c.T) - 1
		fs = append(fs, series{X: ms[0], Y: c.QIn, Style: v.s.Mitral}, series{X: ms[0], Y: c.QOut, Style: v.s.Aortic})
		i := argmax(c.QOut)
		fl = append(fl, label{X: ms[0][i], Y: c.QOut[i], Text: "Ao", Style: v.s.Aortic, At: []offset{{1, -1}, {-3, -1}, {2, 0}}})
		j := argmax(c.QIn)
		fl = append(fl, label{X: ms[0][j], Y: c.QIn[j], Text: "MV", Style: v.s.Mitral, At: []offset{{1, -1}, {-3, -1}, {2, 0}}})
		if c.Params.PumpFlow > 0 {
			fs = append(fs, series{X: ms[0], Y: c.QPump, Style: v.s.Pump})
			fl = append(fl, label{X: ms[0][n], Y: c.QPump[n], Text: "pump", Style: v.s.Pump, At: []offset{{-5, -1}, {-5, 1}, {1, 0}}})
		}
	}
	return v.flow.Render(v.ff, fs, fl)
}
