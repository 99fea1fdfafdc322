package ui

// The least window the explorer draws in.
const (
	minWidth  = 80
	minHeight = 24
)

// layout is where the parts of the screen go. The top bar is the first
// line, the status and key lines the last two; between them the main view
// sits left of the readout panel, and the levers go below the readouts when
// the window is tall enough, else in a strip across the foot.
type layout struct {
	mainW, mainH int // the view's area
	sideW        int // the readout (and lever) column
	readH        int // readout panel lines
	leverH       int // lever panel lines
	strip        bool
}

// Side column widths: wide enough for the readouts' base column, or not.
const (
	sideWide   = readoutWideW
	sideNarrow = 38
)

func computeLayout(w, h int) layout {
	var l layout
	body := h - 3
	l.sideW = sideNarrow
	if w >= 112 {
		l.sideW = sideWide
	}
	l.mainW = w - l.sideW - 1
	l.readH = 1 + baseReadouts() // room for a closed circulation's rows; lesions and devices take the levers' (render.go)
	if w >= 100 && body >= l.readH+1+leverColumnLines() {
		l.leverH = leverColumnLines()
		l.mainH = body
	} else {
		l.strip = true
		l.leverH = leverStripLines()
		l.mainH = body - l.leverH
	}
	return l
}

// resize lays the screen out for a w × h window.
func (m *Model) resize(w, h int) {
	m.w, m.h = w, h
	if m.tooSmall() {
		return
	}
	m.lay = computeLayout(w, h)
	for _, v := range m.views {
		v.SetSize(m.lay.mainW, m.lay.mainH)
	}
	if m.lay.strip {
		m.readouts.SetSize(m.lay.sideW, m.lay.mainH, 0)
		m.levers.SetSize(w, m.lay.leverH, true)
	} else {
		// A fit section goes below the readouts if the levers leave room.
		m.readouts.SetSize(m.lay.sideW, m.lay.readH, max(m.lay.mainH-m.lay.readH-1-m.lay.leverH, 0))
		m.levers.SetSize(m.lay.sideW, m.lay.mainH-m.lay.readH-1, false)
	}
	m.help.Width = w
}

// tooSmall reports whether the window is below the least size (or not known yet).
func (m *Model) tooSmall() bool { return m.w < minWidth || m.h < minHeight }
