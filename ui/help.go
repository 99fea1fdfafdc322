package ui

import (
	"fmt"
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

// helpGroups names the columns of KeyMap.FullHelp.
var helpGroups = []string{"Levers", "Baseline and history", "Scenario and views", "This screen",
	"Recording and map"}

// renderHelp is the help overlay: every key, what the screen's cues mean,
// and the caution. A tall window gets room between the parts.
func (m *Model) renderHelp() string {
	s := m.styles
	var cols []string
	for i, g := range m.keys.FullHelp() {
		var b strings.Builder
		b.WriteString(s.Heading.Render(helpGroups[i]))
		for _, k := range g {
			h := k.Help()
			b.WriteString("\n" + s.Key.Render(fmt.Sprintf("%-10s", h.Key)) + " " + s.Desc.Render(h.Desc))
		}
		cols = append(cols, b.String())
	}
	roomy := m.h >= 34
	gap := "\n"
	if roomy {
		gap = "\n\n"
	}
	// As many columns of key groups in a row as fit the box.
	keys := packColumns(s, cols, m.w-helpBoxFrame, gap)
	title := s.Heading.Render("Keys of the explorer") + s.Dim.Render("  (? or Esc closes)")
	cues := s.Dim.Render("Readouts: ▲ above, ▼ below the resting adult's normal range.")
	if roomy {
		cues = s.Dim.Render("PV plane: ━ the steady loop now, ┄ the baseline; ESPVR, EDPVR, Ea line.\n" +
			"Readouts: ▲ above, ▼ below the resting adult's normal range;\n" +
			"Δ and % are changes against the baseline (against the recording when one is open).")
	}
	if roomy {
		cues += "\n" + s.Dim.Render(recordingCues)
	}
	cues += "\n" + s.Dim.Render(fitCue)
	body := title + gap + keys + "\n\n" + cues + gap + s.Error.Render(Caution)
	if lipgloss.Height(body)+2 > m.h-3 { // too tall for the window: the cues go first
		body = title + gap + keys + gap + s.Error.Render(Caution)
	}
	return s.Box.Render(body)
}

// pad leaves three cells after a help column.
func pad(st *Styles, s string) string { return st.Renderer().NewStyle().PaddingRight(3).Render(s) }
