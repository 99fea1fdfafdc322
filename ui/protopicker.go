package ui

import (
	"fmt"

	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/presets"
)

// protocolFileItem is the last entry of the protocol picker: a file of
// one's own, asked for in the path prompt.
const protocolFileItem = "a file…"

// openProtocols shows the built-in protocols and a last entry for a file,
// with the protocol on screen (or last played) selected.
func (m *Model) openProtocols() {
	m.picker = picker{}
	cur := ""
	if v := m.play; v.run != nil {
		cur = v.run.pr.Name
	} else if v.last != nil {
		cur = v.last.Name
	}
	for i, n := range presets.ProtocolNames() {
		d := ""
		if pr, err := presets.GetProtocol(n); err == nil {
			d = fmt.Sprintf("%3d beats  %s", pr.TotalBeats(m.st.target.Circulation), pr.Description)
		}
		m.picker.names = append(m.picker.names, n)
		m.picker.descs = append(m.picker.descs, d)
		if n == cur {
			m.picker.sel = i
		}
	}
	m.picker.names = append(m.picker.names, protocolFileItem)
	m.picker.descs = append(m.picker.descs, "a protocol file of your own (see `pvcouple protocol --help`)")
	m.mode = modeProtocols
}

// protocolsKey moves in the list, plays the chosen protocol on Enter (or
// asks for the file), closes on Esc.
func (m *Model) protocolsKey(msg tea.KeyMsg) tea.Cmd {
	if cmd, chosen := m.listKey(msg, m.keys.Protocol, "No protocol picked."); !chosen {
		return cmd
	}
	name := m.picker.names[m.picker.sel]
	if name == protocolFileItem {
		return m.openPrompt(promptProtocol)
	}
	pr, err := presets.GetProtocol(name)
	if err != nil {
		m.setError(err.Error())
		return nil
	}
	return m.startProtocol(pr)
}

// renderProtocols draws the protocol list as a framed box, the file entry
// set apart.
func (m *Model) renderProtocols() string {
	width := 20 // room for the names, the longest whole
	for _, n := range m.picker.names {
		width = max(width, len([]rune(n))+2)
	}
	return m.picker.render(m.styles, "Play a protocol", "(invented, labelled so; from the levers now)", width, m.w,
		len(m.picker.names)-1, "play")
}
