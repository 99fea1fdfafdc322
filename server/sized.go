package server

import (
	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/ui"
)

// Window size assumed when a client gives none.
const (
	fallbackWidth  = 80
	fallbackHeight = 24
)

// sizedModel is a session's explorer, given 80×24 when the client reports a
// window of no size (OpenSSH's client does when its own input is not a
// terminal), so that something is drawn.
type sizedModel struct{ *ui.Model }

// Update implements tea.Model.
func (s sizedModel) Update(msg tea.Msg) (tea.Model, tea.Cmd) {
	if ws, ok := msg.(tea.WindowSizeMsg); ok && (ws.Width <= 0 || ws.Height <= 0) {
		msg = tea.WindowSizeMsg{Width: fallbackWidth, Height: fallbackHeight}
	}
	_, cmd := s.Model.Update(msg)
	return s, cmd
}
