package ui

import tea "github.com/charmbracelet/bubbletea"

// follower is a view that keeps background work in step with the state,
// such as a map computed around the levers' setting. After every message the
// root calls Follow on each such view, telling it whether it is on screen;
// the view may start or cancel its work and return a command.
type follower interface {
	Follow(st *state, onScreen bool) tea.Cmd
}

// closer is a view with background work to stop when the program ends.
type closer interface {
	Close()
}

// Update implements tea.Model: it handles the message, then lets the views
// that follow the state catch up with it.
func (m *Model) Update(msg tea.Msg) (tea.Model, tea.Cmd) {
	_, cmd := m.update(msg)
	return m, tea.Batch(cmd, m.follow())
}

// follow calls Follow on the views that follow the state.
func (m *Model) follow() tea.Cmd {
	if m.closed {
		return nil
	}
	var cmds []tea.Cmd
	for i, v := range m.views {
		if f, ok := v.(follower); ok {
			cmds = append(cmds, f.Follow(&m.st, i == m.cur && m.w > 0 && !m.tooSmall()))
		}
	}
	return tea.Batch(cmds...)
}

// Close stops the views' background work (a map being computed) and keeps
// it from starting again. The quit key calls it; a caller that runs the
// program should call it too once the program has ended, since Ctrl-C in a
// prompt quits without the quit key.
func (m *Model) Close() {
	m.closed = true
	m.stopLoad()
	m.tenant.Close()
	for _, v := range m.views {
		if c, ok := v.(closer); ok {
			c.Close()
		}
	}
}
