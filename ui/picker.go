package ui

import (
	"fmt"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"pvcouple/presets"
)

// picker is a list to choose from: the built-in presets, the protocols, a
// lab server's files.
type picker struct {
	names []string
	descs []string
	sel   int
	rows  int // entries shown at most, around the selected one; 0 shows all
}

// openPicker shows the preset list with the current scenario selected.
func (m *Model) openPicker() {
	m.picker = picker{}
	for i, n := range presets.Names() {
		d := ""
		if sc, err := presets.Get(n); err == nil {
			d = sc.Description
		}
		m.picker.names = append(m.picker.names, n)
		m.picker.descs = append(m.picker.descs, d)
		if n == m.st.name {
			m.picker.sel = i
		}
	}
	m.mode = modePicker
}

// navigate moves the selection on the list keys (↑/↓, ←/→) and reports
// whether msg was one of them.
func (p *picker) navigate(msg tea.KeyMsg, k KeyMap) bool {
	n := len(p.names)
	switch {
	case key.Matches(msg, k.Up, k.Prev):
		p.sel = (p.sel - 1 + n) % n
	case key.Matches(msg, k.Down, k.Next):
		p.sel = (p.sel + 1) % n
	default:
		return false
	}
	return true
}

// render draws the list as a framed box: a heading with a note, one row per
// entry (the selected one marked), names padded to nameWidth, descriptions
// cut to fit width w, a blank line before entry gapBefore (−1 for none), and
// the hint for Enter.
func (p *picker) render(s *Styles, heading, note string, nameWidth, w, gapBefore int, enter string) string {
	var b strings.Builder
	b.WriteString(s.Heading.Render(heading) + s.Dim.Render("  "+note) + "\n\n")
	from, to := p.window()
	if from > 0 {
		b.WriteString(s.Dim.Render(fmt.Sprintf("  ↑ %d more", from)) + "\n")
	}
	for i := from; i < to; i++ {
		n := p.names[i]
		mark, name := "  ", fmt.Sprintf("%-*s", nameWidth, ansi.Truncate(n, nameWidth-1, "…"))
		if i == p.sel {
			mark, name = s.Selected.Render("▸ "), s.Selected.Render(name)
		}
		desc := ansi.Truncate(p.descs[i], max(w-nameWidth-10, 10), "…")
		if i == gapBefore {
			b.WriteString("\n")
		}
		b.WriteString(mark + name + s.Dim.Render(desc) + "\n")
	}
	if to < len(p.names) {
		b.WriteString(s.Dim.Render(fmt.Sprintf("  ↓ %d more", len(p.names)-to)) + "\n")
	}
	b.WriteString("\n" + s.Dim.Render("↑/↓ choose · Enter "+enter+" · Esc cancel"))
	return s.Box.Render(b.String())
}

// window is the range of entries shown: all of them, or rows of them with
// the selected one inside.
func (p *picker) window() (from, to int) {
	n := len(p.names)
	if p.rows <= 0 || n <= p.rows {
		return 0, n
	}
	from = min(max(p.sel-p.rows/2, 0), n-p.rows)
	return from, from + p.rows
}

// listKey handles the keys every list shares: ctrl+c quits, the arrows
// move, Esc, q or closer close the list saying cancelled. It reports whether
// Enter chose the selected row, the list then closed.
func (m *Model) listKey(msg tea.KeyMsg, closer key.Binding, cancelled string) (cmd tea.Cmd, chosen bool) {
	k := m.keys
	switch {
	case msg.String() == "ctrl+c":
		return tea.Quit, false
	case m.picker.navigate(msg, k):
	case key.Matches(msg, k.Cancel, closer, k.Quit):
		m.mode = modeMain
		m.setStatus(cancelled)
	case key.Matches(msg, k.Confirm):
		m.mode = modeMain
		return nil, true
	}
	return nil, false
}

// pickerKey moves in the list, loads the chosen preset on Enter, closes on Esc.
func (m *Model) pickerKey(msg tea.KeyMsg) tea.Cmd {
	if cmd, chosen := m.listKey(msg, m.keys.Preset, "No preset picked."); !chosen {
		return cmd
	}
	name := m.picker.names[m.picker.sel]
	sc, err := presets.Get(name)
	if err == nil {
		err = m.load(sc, "preset "+name)
	}
	if err != nil {
		m.setError(err.Error())
		return nil
	}
	m.setStatus(fmt.Sprintf("Loaded preset %s (%s); it is the baseline too. u undoes.", name, sc.Description))
	return nil
}

// renderPicker draws the preset list as a framed box.
func (m *Model) renderPicker() string {
	return m.picker.render(m.styles, "Pick a preset", "(invented cases, labelled so)", 14, m.w, -1, "load")
}
