package ui

import (
	"fmt"

	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"
)

// The runes of a recording on the PV plane: cell marks rather than braille,
// so that without colour they read apart from the model's lines.
const (
	recLoopMark  = '•' // the representative steady beat
	recOtherMark = '·' // the other kept beats and the fitted ESPVR
)

// overlayStyles are the styles of a recording on the PV plane, built on the
// explorer's renderer (kept apart from Styles so the overlay is one idea in
// files of its own).
type overlayStyles struct {
	Loop   lipgloss.Style // the steady loop and the legend
	Others lipgloss.Style // the other beats
	ESPVR  lipgloss.Style // the fitted ESPVR
}

func newOverlayStyles(s *Styles) overlayStyles {
	n := s.Renderer().NewStyle
	return overlayStyles{
		Loop:   n().Foreground(colour("135", "13")),
		Others: n().Foreground(colour("97", "5")),
		ESPVR:  n().Foreground(colour("135", "13")),
	}
}

// recBounds grows b to hold the recording's loops and its ESPVR's intercept.
func recBounds(b *bounds, rec *recording) {
	if rec == nil {
		return
	}
	b.addPoint(rec.ov.VMin, rec.ov.PMin)
	b.addPoint(rec.ov.VMax, rec.ov.PMax)
	if es := rec.ov.ESPVR; es != nil {
		b.addPoint(es.V0, 0)
	}
}

// recSeries returns the recording's lines: under, drawn before the model's
// (the other beats and the fitted ESPVR), and over, drawn between the
// baseline and the model's loop (the steady beat), with the ESPVR's label.
func (v *pvView) recSeries(rec *recording) (under, over []series, ls []label) {
	if rec == nil {
		return nil, nil, nil
	}
	ov := rec.ov
	for i, l := range ov.Loops {
		if i != ov.Representative {
			under = append(under, series{X: l.V, Y: l.P, Closed: true, Dotted: true, Style: v.os.Others, Mark: recOtherMark})
		}
	}
	if es := ov.ESPVR; es != nil && es.Ees > 0 {
		top := v.f.Y.Hi
		line := series{X: []float64{es.V0, es.V0 + top/es.Ees}, Y: []float64{0, top}, Style: v.os.ESPVR, Mark: recOtherMark}
		under = append(under, line)
		ls = append(ls, endLabel(v.f, line, "rec", v.os.ESPVR))
	}
	if i := ov.Representative; i >= 0 {
		l := ov.Loops[i]
		over = append(over, series{X: l.V, Y: l.P, Closed: true, Style: v.os.Loop, Mark: recLoopMark})
	}
	return under, over, ls
}

// recLine is the line above the plot that names the recording, says which
// loop is which and gives its fitted ESPVR: the longest form that fits w.
func (v *pvView) recLine(rec *recording, w int) string {
	os := v.os
	steady := "no steady beat"
	if rec.rep != nil {
		steady = fmt.Sprintf("beat %d", rec.repBeat)
	}
	fit, short := "no ESPVR fitted", "no ESPVR"
	if es := rec.ov.ESPVR; es != nil {
		// A small heart's ESPVR in µL (the unit analysis picked for it).
		u := rec.ov.Unit
		ees, v0 := u.Value(es.Ees, -1), u.Value(es.V0, 1)
		fit = fmt.Sprintf("rec ESPVR Ees %s %s, V0 %s %s", fmtNum(ees, 2), u.Label("mmHg/mL"), fmtNum(v0, 1), u.Label("mL"))
		short = fmt.Sprintf("Ees %s, V0 %s", fmtNum(ees, 2), fmtNum(v0, 1))
	}
	others := ""
	if rec.kept > 1 {
		others = "  " + os.Others.Render("· others")
	}
	lead := os.Loop.Render("• ")
	for _, c := range []string{
		lead + os.Loop.Render(rec.name+" "+steady) + others + "  " + os.ESPVR.Render(fit),
		lead + os.Loop.Render("rec "+steady) + others + "  " + os.ESPVR.Render(fit),
		lead + os.Loop.Render("rec "+steady) + others + "  " + os.ESPVR.Render(short),
		lead + os.Loop.Render("rec "+steady) + "  " + os.ESPVR.Render(short),
	} {
		if ansi.StringWidth(c) <= w {
			return padRight(c, w)
		}
	}
	return padRight(ansi.Truncate(lead+os.Loop.Render(rec.name), w, "…"), w)
}

// btoi is 1 for true, 0 for false.
func btoi(b bool) int {
	if b {
		return 1
	}
	return 0
}
