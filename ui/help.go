package ui

import (
	"strings"

	"github.com/charmbracelet/bubbles/help"
	"github.com/charmbracelet/lipgloss"
)

// Caution is the notice the help carries: what the explorer is for.
const Caution = "A model for research and education planning, not for treating patients.\n" +
	"Defer to local protocols and licensed clinical judgement."

// newHelp returns the key line's help model with styles from s (its own
// defaults are adaptive colours, which would query the terminal).
func newHelp(s *Styles) help.Model {
	h := help.New()
	h.Styles = help.Styles{
		Ellipsis: s.Dim, ShortKey: s.Key, ShortDesc: s.Desc, ShortSeparator: s.Dim,
		FullKey: s.Key, FullDesc: s.Desc, FullSeparator: s.Dim,
	}
	h.ShortSeparator = " · "
	return h
}

// helpGroups names the groups of KeyMap.FullHelp.
var helpGroups = []string{"Levers", "Baseline and history", "Protocol playback", "Scenario and views", "This screen"}

// helpColumns stacks the groups of KeyMap.FullHelp in three columns, so the
// overlay fits 80 cells and 24 lines.
var helpColumns = [][]int{{0, 3}, {1, 4}, {2}}

// renderHelp is the help overlay: every key, what the screen's cues mean,
// and the caution. A tall window gets room between the parts.
func (m *Model) renderHelp() string {
	s := m.styles
	groups := m.keys.FullHelp()
	var cols []string
	for c, gs := range helpColumns {
		var b strings.Builder
		for n, g := range gs {
			if n > 0 {
				b.WriteString("\n\n")
			}
			b.WriteString(s.Heading.Render(helpGroups[g]))
			kw := 0
			for _, k := range groups[g] {
				kw = max(kw, lipgloss.Width(k.Help().Key))
			}
			for _, k := range groups[g] {
				h := k.Help()
				b.WriteString("\n" + s.Key.Render(h.Key+strings.Repeat(" ", kw-lipgloss.Width(h.Key))) + " " + s.Desc.Render(h.Desc))
			}
		}
		if c < len(helpColumns)-1 {
			cols = append(cols, pad(s, b.String()))
		} else {
			cols = append(cols, b.String())
		}
	}
	roomy := m.h >= 34
	gap := "\n"
	if roomy {
		gap = "\n\n"
	}
	keys := lipgloss.JoinHorizontal(lipgloss.Top, cols...)
	title := s.Heading.Render("Keys of the explorer") + s.Dim.Render("  (? or Esc closes)")
	cues := s.Dim.Render("Readouts: ▲ above, ▼ below the resting adult's normal range.")
	if roomy {
		cues = s.Dim.Render("PV plane: ━ the steady loop now, ┄ the baseline; ESPVR, EDPVR, Ea line.\n" +
			"Protocol: ━ the beat on screen; the beats before it grey (dotted without\n" +
			"colour); o end-systolic points; the ESPVR fitted to them (fit), the model's\n" +
			"own dotted (ESPVR).\n" +
			"Readouts: ▲ above, ▼ below the resting adult's normal range;\n" +
			"Δ and % are changes against the baseline (in a protocol, its starting beat).")
	}
	body := title + gap + keys + "\n\n" + cues + gap + s.Error.Render(Caution)
	return s.Box.Render(body)
}

// pad leaves three cells after a help column.
func pad(st *Styles, s string) string { return st.Renderer().NewStyle().PaddingRight(3).Render(s) }
