package ui

import (
	"fmt"
	"strings"

	"github.com/charmbracelet/x/ansi"
)

// fitReadout is the ESPVR fit section of the readout panel: the slope and
// intercept fitted to the loops of a protocol so far, against the model's
// own Ees and V0, or why there is no fit.
type fitReadout struct {
	shown             bool // the panel has the section
	ok                bool // a fit was made
	ees, v0, r2       float64
	loops             int
	modelEes, modelV0 float64
	note              string // why there is no fit, when !ok
}

// fitLines is the height of the fit section.
const fitLines = 4

// fitSection renders the fit section in the readouts' columns: a heading,
// Ees and V0 as fitted against the model's (wide: in the base column;
// narrow: on the last line), and R² with the number of loops.
func (p *readoutPanel) fitSection(f fitReadout, c columns) []string {
	s := p.s
	head := fmt.Sprintf(" %-*s%*s  %-*s", c.label, "ESPVR", c.val, "fit", c.unit, "unit")
	if c.base > 0 {
		head += fmt.Sprintf("%*s", c.base, "model")
	}
	head += fmt.Sprintf(" %*s", c.delta, "Δ")
	if c.pct > 0 {
		head += fmt.Sprintf(" %*s", c.pct, "%")
	}
	if !f.ok {
		lines := []string{s.Heading.Render(padRight(" ESPVR fit", p.w))}
		wrapped := strings.Split(ansi.Wrap(f.note, p.w-2, " "), "\n")
		for i, l := range wrapped {
			if i == fitLines-1 {
				break
			}
			if i == fitLines-2 && len(wrapped) > fitLines-1 {
				l = ansi.Truncate(l, p.w-3, "") + "…"
			}
			lines = append(lines, s.Dim.Render(padRight(" "+strings.TrimSpace(l), p.w)))
		}
		for len(lines) < fitLines {
			lines = append(lines, strings.Repeat(" ", p.w))
		}
		return lines
	}
	row := func(label, unit string, fit, model float64, decimals int) string {
		line := fmt.Sprintf(" %-*s%*s  ", c.label, label, c.val, fmtNum(fit, decimals))
		dim := fmt.Sprintf("%-*s", c.unit, unit)
		if c.base > 0 {
			dim += fmt.Sprintf("%*s", c.base, fmtNum(model, decimals))
		}
		return padRight(line+s.Dim.Render(dim)+p.change(fit, model, decimals, c), p.w)
	}
	foot := fmt.Sprintf(" R² %s · fitted to %d loops", fmtNum(f.r2, 4), f.loops)
	if !p.wide {
		foot = fmt.Sprintf(" model Ees %s V0 %s · R² %s", fmtNum(f.modelEes, 2), fmtNum(f.modelV0, 1), fmtNum(f.r2, 4))
	}
	return []string{
		s.Heading.Render(padRight(head, p.w)),
		row("Ees", "mmHg/mL", f.ees, f.modelEes, 2),
		row("V0", "mL", f.v0, f.modelV0, 1),
		s.Dim.Render(padRight(foot, p.w)),
	}
}

// noFit is a fit section that says why there is no fit.
func noFit(note string) fitReadout {
	return fitReadout{shown: true, note: note}
}
