package ui

import (
	"fmt"
	"strings"

	"github.com/charmbracelet/x/ansi"

	"pvcouple/model"
)

// leverPanel lists the levers with their value, unit and baseline value; the
// selected one is marked with ▸. In a column it has one lever a line; as a
// strip below the main area it has two columns of short names. The lesion
// and support levers, when listed, follow under a heading of their own; where
// the panel has no room for both groups it shows the selected one's.
type leverPanel struct {
	s     *Styles
	w, h  int
	strip bool
}

func newLeverPanel(s *Styles) *leverPanel { return &leverPanel{s: s} }

// leverColumnW is the width a column needs for the levers' full names;
// a narrower column uses the short names.
const leverColumnW = 48

// leverColumnLines is the height of the panel in a column.
func leverColumnLines() int { return 1 + len(model.Levers) }

// leverStripLines is the height of the panel as a two-column strip.
func leverStripLines() int { return 1 + (len(model.Levers)+1)/2 }

// SetSize sets the panel's size and whether it is a strip.
func (p *leverPanel) SetSize(w, h int, strip bool) { p.w, p.h, p.strip = w, h, strip }

// leverGroup is a run of the listed levers under one heading.
type leverGroup struct {
	first, n int
	heading  string
}

// groups splits levers (model.Levers, maybe followed by model.DeviceLevers)
// into the groups the panel shows, and returns the one holding sel.
func leverGroups(levers []model.Lever, sel int) (all []leverGroup, cur int) {
	n := len(model.Levers)
	all = []leverGroup{{0, n, "Levers"}}
	if len(levers) > n {
		all = append(all, leverGroup{n, len(levers) - n, "Lesions & support"})
		if sel >= n {
			cur = 1
		}
	}
	return all, cur
}

// Render draws the panel: exactly h lines of width w.
func (p *leverPanel) Render(st *state, levers []model.Lever, sel int) string {
	s := p.s
	var lines []string
	base := st.target
	var baseSt *model.Steady
	if st.base != nil {
		base, baseSt = st.base.Params, st.base
	}
	// The filling pressure of a closed circulation is the mean LAP its
	// volume gives.
	now := st.target
	now.FillingPressure = st.fillingPressure(st.target, st.shown)
	base.FillingPressure = st.fillingPressure(base, baseSt)
	groups, cur := leverGroups(levers, sel)
	if p.strip {
		g := groups[cur]
		l := levers[sel]
		head := fmt.Sprintf(" %s · %s: %s", g.heading, l.Name, l.Spec().Meaning)
		lines = append(lines, s.Heading.Render(padRight(ansi.Truncate(head, p.w, "…"), p.w)))
		half := (g.n + 1) / 2
		cw := p.w / 2
		for r := 0; r < half; r++ {
			line := p.cell(levers, g.first+r, now, base, sel, cw, true)
			if r+half < g.n {
				line += p.cell(levers, g.first+r+half, now, base, sel, p.w-cw, true)
			}
			lines = append(lines, padRight(line, p.w))
		}
	} else {
		short := p.w < leverColumnW
		need := 0
		for _, g := range groups {
			need += 1 + g.n
		}
		if need > p.h {
			// No room for both: the selected group, saying where the other is.
			g := groups[cur]
			if cur == 0 {
				g.heading = "Levers · d: lesions"
			}
			groups = []leverGroup{g}
		}
		for _, g := range groups {
			head := fmt.Sprintf(" %-20s%7s  %-10s%7s", g.heading, "now", "unit", "base")
			if short {
				head = fmt.Sprintf(" %-8s%6s %-9s%7s", ansi.Truncate(g.heading, 8, ""), "now", "unit", "(base)")
			}
			lines = append(lines, s.Heading.Render(padRight(head, p.w)))
			for j := g.first; j < g.first+g.n; j++ {
				lines = append(lines, p.cell(levers, j, now, base, sel, p.w, short))
			}
		}
	}
	for len(lines) < p.h {
		lines = append(lines, strings.Repeat(" ", p.w))
	}
	return strings.Join(lines[:p.h], "\n")
}

// cell renders lever i in width w: mark, name, value, unit, baseline
// (in brackets when short).
func (p *leverPanel) cell(levers []model.Lever, i int, now, base model.Params, sel, w int, short bool) string {
	s := p.s
	l := levers[i]
	spec := l.Spec()
	v, b := spec.Get(now), spec.Get(base)
	var name, rest string
	if short {
		name = fmt.Sprintf("%-8s", l.Short)
		rest = fmt.Sprintf("%6s %-9s", l.Format(v), spec.Unit) + s.Dim.Render(fmt.Sprintf("%7s", "("+l.Format(b)+")"))
	} else {
		name = fmt.Sprintf("%-20s", l.Name)
		rest = fmt.Sprintf("%7s  %-10s", l.Format(v), spec.Unit) + s.Dim.Render(fmt.Sprintf("%7s", l.Format(b)))
	}
	mark := "  "
	if i == sel {
		mark, name = s.Selected.Render("▸ "+name), ""
	}
	return padRight(mark+name+rest, w)
}
