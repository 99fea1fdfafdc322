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

// helpGroups names the groups of KeyMap.FullHelp. The headings of the
// protocol's and the map's keys name their views: x is the protocol's in
// view 3 and the map's elsewhere.
var helpGroups = []string{"Levers", "Baseline and history", "Protocol (view 3)", "Scenario and views", "This screen",
	"Recording; map (view 4)"}

// helpColumns stacks the groups of KeyMap.FullHelp in three columns, so the
// overlay fits 80 cells and 24 lines; packColumns starts a new row of them
// where a window is too narrow.
var helpColumns = [][]int{{0, 1}, {3, 5}, {2, 4}}

// renderHelp is the help overlay: every key, what the screen's cues mean,
// and the caution. A tall window gets room between the parts and the long
// cues; where the cues do not fit, the last go first.
func (m *Model) renderHelp() string {
	s := m.styles
	groups := m.keys.FullHelp()
	var cols []string
	for _, gs := range helpColumns {
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
	cues := []string{"Readouts: ▲ above, ▼ below the resting adult's normal range.", fitCue}
	if roomy {
		cues = []string{"PV plane: ━ the steady loop now, ┄ the baseline; ESPVR, EDPVR, Ea line.\n" +
			"Protocol: ━ the beat on screen; the beats before it grey (dotted without\n" +
			"colour); o end-systolic points; the ESPVR fitted to them (fit), the model's\n" +
			"own dotted (ESPVR).\n" +
			"Readouts: ▲ above, ▼ below the resting adult's normal range; Δ and % are\n" +
			"changes against the baseline (against the recording when one is open; in\n" +
			"a protocol, against its starting beat).",
			circulationCue, recordingCues, fitCue}
	}
	caution := s.Error.Render(Caution)
	for n := len(cues); n > 0; n-- {
		body := title + gap + keys + "\n\n" + s.Dim.Render(strings.Join(cues[:n], "\n")) + gap + caution
		if m.fits(body) {
			return s.Box.Render(body)
		}
	}
	if body := title + gap + keys + "\n\n" + caution; m.fits(body) {
		return s.Box.Render(body)
	}
	return s.Box.Render(title + gap + keys + gap + caution)
}

// fits reports whether the help's body fits the window in its box, below
// the top bar and above the status and key lines.
func (m *Model) fits(body string) bool { return lipgloss.Height(body)+2 <= m.h-3 }

// pad leaves three cells after a help column.
func pad(st *Styles, s string) string { return st.Renderer().NewStyle().PaddingRight(3).Render(s) }
