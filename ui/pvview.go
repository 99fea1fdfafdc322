package ui

import (
	"math"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"

	"pvcouple/model"
)

// pvView is the pressure–volume plane: the steady loop on screen, the
// baseline loop dotted beneath it, and the lines of coupling: the ESPVR
// through V0 with slope Ees, the EDPVR, and the Ea line from (EDV, 0) to
// (ESV, ESP). The axes hold still while the loops stay inside them.
type pvView struct {
	s     *Styles
	os    overlayStyles // a recording overlaid (overlayplot.go)
	plot  *plot
	w, h  int
	f     frame
	fixed bool // f holds until a loop leaves it

	// The last render, reused while nothing it shows has changed.
	cacheShown, cacheBase *model.Steady
	cacheRec              *recording
	cache                 string
}

func newPVView(s *Styles) *pvView {
	v := &pvView{s: s, os: newOverlayStyles(s), plot: newPlot(s, "V mL", "P mmHg")}
	v.plot.legend = s.Loop.Render("━ now") + "  " + s.Baseline.Render("┄ baseline") + "  " +
		s.ESPVR.Render("ESPVR") + " " + s.EDPVR.Render("EDPVR") + " " + s.Ea.Render("Ea")
	return v
}

// Name implements view.
func (v *pvView) Name() string { return "PV plane" }

// SetSize implements view.
func (v *pvView) SetSize(w, h int) {
	if w != v.w || h != v.h {
		v.w, v.h = w, h
		v.plot.SetSize(w, h)
		v.fixed, v.cache = false, ""
	}
}

// Update implements view.
func (v *pvView) Update(tea.Msg, *state) tea.Cmd { return nil }

// Refit implements view.
func (v *pvView) Refit() { v.fixed, v.cache = false, "" }

// pvHeadroom is the room, as a fraction of the loops' span, left above and
// to the right of the loops when the axes are fitted.
const pvHeadroom = 0.2

// Render implements view.
func (v *pvView) Render(st *state) string {
	if st.shown == v.cacheShown && st.base == v.cacheBase && st.rec == v.cacheRec && v.cache != "" {
		return v.cache
	}
	// A recording takes the top line for its legend.
	if ph := v.h - btoi(st.rec != nil); v.plot.h != ph {
		v.plot.SetSize(v.w, ph)
		v.fixed = false
	}
	b := emptyBounds()
	recBounds(&b, st.rec)
	for _, s := range []*model.Steady{st.shown, st.base} {
		if s != nil {
			b.add(s.VLV, s.PLV)
			b.addPoint(math.Min(0, s.Params.V0), 0)
		}
	}
	if !v.fixed || !v.f.holds(b) {
		nx, ny := tickCounts(v.w, v.plot.h)
		v.f = fitFrame(b, nx, ny, pvHeadroom)
		v.fixed = true
	}
	recUnder, recOver, recLabels := v.recSeries(st.rec)
	ss := recUnder
	var ls []label
	if base := st.base; base != nil {
		if st.shown == nil || base.Params.Ees != st.shown.Params.Ees || base.Params.V0 != st.shown.Params.V0 {
			ss = append(ss, v.espvr(base.Params, v.s.Baseline, true))
		}
		if st.shown == nil || base.Params.EdpvrA != st.shown.Params.EdpvrA || base.Params.EdpvrB != st.shown.Params.EdpvrB ||
			base.Params.V0 != st.shown.Params.V0 {
			ss = append(ss, v.edpvr(base.Params, v.s.Baseline, true))
		}
		ss = append(ss, series{X: base.VLV, Y: base.PLV, Closed: true, Dotted: true, Style: v.s.Baseline})
	}
	ss = append(ss, recOver...)
	if cur := st.shown; cur != nil {
		p, m := cur.Params, cur.Metrics
		es, ed := v.espvr(p, v.s.ESPVR, false), v.edpvr(p, v.s.EDPVR, false)
		ea := series{X: []float64{m.EDV, m.ESV}, Y: []float64{0, m.ESP}, Style: v.s.Ea}
		ss = append(ss, es, ed, ea, series{X: cur.VLV, Y: cur.PLV, Closed: true, Style: v.s.Loop})
		ls = append(ls,
			endLabel(v.f, es, "ESPVR", v.s.ESPVR),
			endLabel(v.f, ed, "EDPVR", v.s.EDPVR),
			label{X: m.EDV, Y: 0, Text: "Ea", Style: v.s.Ea, At: []offset{{1, 0}, {1, -1}, {2, -1}, {-3, 0}}})
	}
	v.cache = v.plot.Render(v.f, ss, append(ls, recLabels...))
	if st.rec != nil {
		v.cache = v.recLine(st.rec, v.w) + "\n" + v.cache
	}
	v.cacheShown, v.cacheBase, v.cacheRec = st.shown, st.base, st.rec
	return v.cache
}

// espvr is the end-systolic line P = Ees·(V − V0) across the frame.
func (v *pvView) espvr(p model.Params, s lipgloss.Style, dotted bool) series {
	top := v.f.Y.Hi
	return series{X: []float64{p.V0, p.V0 + top/p.Ees}, Y: []float64{0, top}, Dotted: dotted, Style: s}
}

// edpvrPoints is the number of points drawn of the EDPVR curve.
const edpvrPoints = 96

// edpvr is the end-diastolic curve from V0 to the right edge of the frame.
func (v *pvView) edpvr(p model.Params, s lipgloss.Style, dotted bool) series {
	xs, ys := make([]float64, 0, edpvrPoints), make([]float64, 0, edpvrPoints)
	lo, hi := p.V0, v.f.X.Hi
	for i := 0; i < edpvrPoints; i++ {
		x := lo + (hi-lo)*float64(i)/float64(edpvrPoints-1)
		y := p.EDPVR(x)
		xs, ys = append(xs, x), append(ys, y)
		if y > v.f.Y.Hi {
			break
		}
	}
	return series{X: xs, Y: ys, Dotted: dotted, Style: s}
}

// endLabel places text at the last point of a line inside the frame, to its
// left and a row down, so it sits under the line's end.
func endLabel(f frame, s series, text string, st lipgloss.Style) label {
	for i := len(s.X) - 1; i > 0; i-- {
		if _, _, x1, y1, in := clip(f, s.X[i-1], s.Y[i-1], s.X[i], s.Y[i]); in {
			n := len(text)
			return label{X: x1, Y: y1, Text: text, Style: st,
				At: []offset{{-n - 1, 0}, {-n - 1, 1}, {-n, 1}, {1, 0}, {1, 1}, {-n - 2, 2}}}
		}
	}
	return label{}
}
