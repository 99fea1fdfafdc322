package ui

import (
	"fmt"
	"strings"

	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"
)

// View implements tea.Model: the whole screen, one line per terminal row.
// Parts that did not change render byte-identical to the last frame, so
// Bubble Tea's renderer skips their lines.
func (m *Model) View() string {
	if m.w == 0 {
		return ""
	}
	if m.tooSmall() {
		msg := fmt.Sprintf("Enlarge the window: pvcouple needs %d×%d, this one is %d×%d.\nq quits.",
			minWidth, minHeight, m.w, m.h)
		return trimLines(m.styles.Renderer().Place(m.w, m.h, lipgloss.Center, lipgloss.Center, msg))
	}
	var body string
	switch m.mode {
	case modeHelp:
		body = m.overlay(m.renderHelp())
	case modePicker:
		body = m.overlay(m.renderPicker())
	case modeProtocols:
		body = m.overlay(m.renderProtocols())
	case modeFiles:
		body = m.overlay(m.renderFiles())
	default:
		body = m.renderBody()
	}
	foot := m.footer()
	if extra := strings.Count(foot, "\n") - 1; extra > 0 {
		// An error too long for two lines takes the body's last line.
		body = body[:nthLastNewline(body, extra)]
	}
	return trimLines(m.topBar() + "\n" + body + "\n" + foot)
}

// nthLastNewline is the index of the n-th newline from the end of s.
func nthLastNewline(s string, n int) int {
	i := len(s)
	for ; n > 0 && i > 0; n-- {
		i = strings.LastIndexByte(s[:i], '\n')
	}
	return max(i, 0)
}

// footer is the status line and the key line. A status too long for one
// line (an error naming a file, a key and a range) takes the key line too,
// and an error too long for two lines a third.
func (m *Model) footer() string {
	if m.mode != modePrompt && ansi.StringWidth(m.status)+3 > m.w {
		st := m.styles.Status
		prefix := " "
		room := 2
		if m.statusErr {
			st, prefix, room = m.styles.Error, " ✗ ", 3
		}
		wrapped := ansi.Wrap(prefix+m.status, m.w-3, " /") // room for the indent of the lines after the first
		lines := strings.Split(wrapped, "\n")
		if len(lines) > room {
			lines = lines[:room]
			lines[room-1] = ansi.Truncate(lines[room-1], m.w-4, "") + "…"
		}
		for len(lines) < 2 {
			lines = append(lines, "")
		}
		for i := range lines {
			if i > 0 {
				lines[i] = "   " + strings.TrimLeft(lines[i], " ")
			}
			lines[i] = st.Render(padRight(lines[i], m.w))
		}
		return strings.Join(lines, "\n")
	}
	return m.statusLine() + "\n" + m.keyLine()
}

// trimLines drops the spaces at the end of every line: Bubble Tea's
// renderer clears the rest of a short line with one escape sequence, which
// is cheaper over a slow link than the spaces.
func trimLines(s string) string {
	lines := strings.Split(s, "\n")
	for i, l := range lines {
		lines[i] = strings.TrimRight(l, " ")
	}
	return strings.Join(lines, "\n")
}

// renderBody is the main view with the readout and lever panels.
func (m *Model) renderBody() string {
	l := m.lay
	v := m.views[m.cur]
	mainLines := strings.Split(v.Render(&m.st), "\n")
	src := steadySource(&m.st)
	if rv, ok := v.(readoutView); ok {
		if s, ok := rv.readouts(&m.st); ok {
			src = s
		}
	}
	levers, sel := m.leverList(), m.selected()
	if !l.strip {
		// Lesion and device readouts take lines from the lever panel.
		k := min(m.readouts.deviceRows(src), max(l.mainH-l.readH-1-leverColumnLines(), 0))
		m.readouts.SetSize(l.sideW, l.readH+k, max(l.mainH-l.readH-k-1-l.leverH, 0))
		m.levers.SetSize(l.sideW, l.mainH-l.readH-k-1, false)
	}
	side := m.readouts.Render(src)
	if !l.strip {
		side += "\n" + strings.Repeat(" ", l.sideW) + "\n" + m.levers.Render(&m.st, levers, sel)
	}
	sideLines := strings.Split(side, "\n")
	var b strings.Builder
	for i := 0; i < l.mainH; i++ {
		if i > 0 {
			b.WriteByte('\n')
		}
		b.WriteString(lineAt(mainLines, i, l.mainW))
		b.WriteByte(' ')
		b.WriteString(lineAt(sideLines, i, l.sideW))
	}
	if l.strip {
		b.WriteByte('\n')
		b.WriteString(m.levers.Render(&m.st, levers, sel))
	}
	return b.String()
}

// lineAt is line i of lines, or blank, padded to width w.
func lineAt(lines []string, i, w int) string {
	if i < len(lines) {
		return padRight(lines[i], w)
	}
	return strings.Repeat(" ", w)
}

// overlay centres a box in the body's area.
func (m *Model) overlay(box string) string {
	return m.styles.Renderer().Place(m.w, m.h-3, lipgloss.Center, lipgloss.Center, box)
}

// topBar names the program, the views (the one on screen highlighted and
// bracketed) and the scenario.
func (m *Model) topBar() string {
	s := m.styles
	left := s.Title.Render(" pvcouple ")
	for i, v := range m.views {
		name := fmt.Sprintf(" %d %s ", i+1, v.Name())
		if i == m.cur {
			left += s.ActiveTab.Render("[" + strings.TrimSpace(name) + "]")
		} else {
			left += s.Tab.Render(name)
		}
	}
	// The circulation and the scenario's name on the right, said as such
	// where there is room.
	circ := m.st.target.Circulation.String()
	for _, right := range []string{
		s.Dim.Render(circ+" circulation · scenario ") + m.st.name + " ",
		s.Dim.Render(circ+" · ") + m.st.name + " ",
		m.st.name + " ",
	} {
		if gap := m.w - lipgloss.Width(left) - lipgloss.Width(right); gap >= 1 {
			return left + strings.Repeat(" ", gap) + right
		}
	}
	return padRight(left, m.w)
}

// statusLine says what just happened, or holds the path prompt.
func (m *Model) statusLine() string {
	s := m.styles
	if m.mode == modePrompt {
		return padRight(" "+m.prompt.View()+s.Dim.Render("   Enter "+promptVerb[m.promptFor]+" · Esc cancels"), m.w)
	}
	if m.statusErr {
		return padRight(s.Error.Render(" ✗ "+m.status), m.w)
	}
	return padRight(s.Status.Render(" "+m.status), m.w)
}

// keyLine is the short help: the levers' keys, or playback's in the
// protocol view.
func (m *Model) keyLine() string {
	keys := m.keys.ShortHelp()
	if m.onPlay() {
		keys = m.keys.PlayHelp()
	}
	return padRight(" "+m.help.ShortHelpView(keys), m.w)
}
