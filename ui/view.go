package ui

import tea "github.com/charmbracelet/bubbletea"

// view is one screen of the explorer's main area, left of the readout and
// lever panels. The root passes it the messages it does not handle itself,
// so a view may run its own timers (say, playing a protocol back beat by
// beat). To add a view, implement this interface in a file of its own and
// append it in newViews; the top bar, the v key and the number keys pick it
// up from there.
type view interface {
	// Name is the view's name in the top bar.
	Name() string
	// SetSize sets the size of the area the view draws in.
	SetSize(w, h int)
	// Update handles a message the root did not; it may return a command.
	Update(msg tea.Msg, st *state) tea.Cmd
	// Render draws the view: exactly h lines of exactly w cells.
	Render(st *state) string
	// Refit forgets held axis ranges, so the next Render fits them anew.
	Refit()
}

// newViews returns the views in the order of the top bar.
func newViews(s *Styles) []view {
	return []view{newPVView(s), newTraceView(s), newPlayView(s), newMapView(s)}
}

// readoutView is a view whose readouts are its own, such as a protocol
// beat's against the run's start, rather than the steady loop's against the
// baseline.
type readoutView interface {
	// readouts returns what the readout panel shows; ok is false to show
	// the usual readouts.
	readouts(st *state) (src readoutSource, ok bool)
}
