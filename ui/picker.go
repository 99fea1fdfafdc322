package ui

import (
	"fmt"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"pvcouple/presets"
)

// picker is the list of built-in presets.
type picker struct {
	names []string
	descs []string
	sel   int
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

// pickerKey moves in the list, loads the chosen preset on Enter, closes on Esc.
func (m *Model) pickerKey(msg tea.KeyMsg) tea.Cmd {
	k := m.keys
	n := len(m.picker.names)
	switch {
	case msg.String() == "ctrl+c":
		return tea.Quit
	case key.Matches(msg, k.Up, k.Prev):
		m.picker.sel = (m.picker.sel - 1 + n) % n
	case key.Matches(msg, k.Down, k.Next):
		m.picker.sel = (m.picker.sel + 1) % n
	case key.Matches(msg, k.Cancel, k.Preset, k.Quit):
		m.mode = modeMain
		m.setStatus("No preset picked.")
	case key.Matches(msg, k.Confirm):
		m.mode = modeMain
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
	}
	return nil
}

// renderPicker draws the preset list as a framed box.
func (m *Model) renderPicker() string {
	s := m.styles
	var b strings.Builder
	b.WriteString(s.Heading.Render("Pick a preset") + s.Dim.Render("  (invented cases, labelled so)") + "\n\n")
	for i, n := range m.picker.names {
		mark, name := "  ", fmt.Sprintf("%-14s", n)
		if i == m.picker.sel {
			mark, name = s.Selected.Render("▸ "), s.Selected.Render(name)
		}
		desc := ansi.Truncate(m.picker.descs[i], max(m.w-24, 10), "…")
		b.WriteString(mark + name + s.Dim.Render(desc) + "\n")
	}
	b.WriteString("\n" + s.Dim.Render("↑/↓ choose · Enter load · Esc cancel"))
	return s.Box.Render(b.String())
}
