package ui

import (
	"math"

	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/model"
)

// traceView shows one steady beat against time: LV and aortic pressure
// above, LV volume below, with the baseline beat dotted beneath. Both plots
// share the time axis, from the start of activation to the end of the
// longer beat.
type traceView struct {
	s          *Styles
	pres, vol  *plot
	w, h       int
	fp, fv     frame
	fixed      bool
	cacheShown *model.Steady
	cacheBase  *model.Steady
	cache      string
}

func newTraceView(s *Styles) *traceView {
	v := &traceView{s: s, pres: newPlot(s, "t ms", "P mmHg"), vol: newPlot(s, "t ms", "V mL")}
	v.pres.legend = s.Loop.Render("━ LV") + "  " + s.Aortic.Render("━ Ao") + "  " + s.Baseline.Render("┄ baseline")
	v.vol.legend = s.Loop.Render("━ LV volume") + "  " + s.Baseline.Render("┄ baseline")
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
	hp := h * 3 / 5
	v.pres.SetSize(w, hp)
	v.vol.SetSize(w, h-hp)
	v.fixed, v.cache = false, ""
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
	bp, bv := emptyBounds(), emptyBounds()
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
	}
	if !v.fixed || !v.fp.holds(bp) || !v.fv.holds(bv) {
		nx, nyp := tickCounts(v.w, v.pres.h)
		_, nyv := tickCounts(v.w, v.vol.h)
		v.fp = fitFrame(bp, nx, nyp, 0.1)
		v.fv = fitFrame(bv, nx, nyv, 0.1)
		// One time axis for both: the wider of the two fits.
		if v.fv.X.Hi > v.fp.X.Hi {
			v.fp.X = v.fv.X
		}
		v.fp.X.Lo, v.fv.X = 0, v.fp.X
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
	v.cache = v.pres.Render(v.fp, ps, pl) + "\n" + v.vol.Render(v.fv, vs, nil)
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
