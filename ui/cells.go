package ui

import (
	"strings"

	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"
)

// palette numbers the styles drawn on a plot and keeps the escape sequence
// that starts each, so that rows are written with one sequence per change of
// style rather than one per cell. Index 0 is plain text.
type palette struct {
	keys   []styleKey
	prefix []string // the SGR sequence that starts the style; "" for none
	attrs  []bool   // the style sets more than a foreground colour
}

// styleKey identifies a style by what it shows.
type styleKey struct {
	fg          lipgloss.TerminalColor
	bold, faint bool
}

func keyOf(s lipgloss.Style) styleKey {
	return styleKey{fg: s.GetForeground(), bold: s.GetBold(), faint: s.GetFaint()}
}

// sgrReset ends every style.
const sgrReset = "\x1b[0m"

func newPalette() *palette {
	return &palette{keys: []styleKey{{fg: lipgloss.NoColor{}}}, prefix: []string{""}, attrs: []bool{false}}
}

// index returns the palette index of style s, adding it if new.
func (p *palette) index(s lipgloss.Style) uint8 {
	k := keyOf(s)
	for i, have := range p.keys {
		if have == k {
			return uint8(i)
		}
	}
	r := s.Render("x")
	pre := r[:strings.IndexByte(r, 'x')]
	p.keys = append(p.keys, k)
	p.prefix = append(p.prefix, pre)
	p.attrs = append(p.attrs, k.bold || k.faint)
	return uint8(len(p.keys) - 1)
}

// sgrWriter writes text in palette styles with as few escape sequences as
// it can: a style is started only where visible text needs it (spaces show
// no foreground colour, so they never start or end one), ended only before
// plain text or a style with attributes, and once at the end of the line.
type sgrWriter struct {
	b   *strings.Builder
	pal *palette
	cur uint8 // style in force; 0 for none
}

// write writes s in style idx.
func (w *sgrWriter) write(s string, idx uint8) {
	if w.pal.prefix[idx] == "" {
		idx = 0 // a style that renders as nothing (no colour profile)
	}
	if idx != w.cur && strings.Trim(s, " ") != "" {
		if w.cur != 0 && (idx == 0 || w.pal.attrs[w.cur]) {
			w.b.WriteString(sgrReset)
			w.cur = 0
		}
		if idx != 0 {
			w.b.WriteString(w.pal.prefix[idx])
			w.cur = idx
		}
	}
	w.b.WriteString(s)
}

// end ends the style in force.
func (w *sgrWriter) end() {
	if w.cur != 0 {
		w.b.WriteString(sgrReset)
		w.cur = 0
	}
}

// padRight pads a styled string with spaces to width w, or truncates it.
func padRight(s string, w int) string {
	n := ansi.StringWidth(s)
	if n > w {
		return ansi.Truncate(s, w, "")
	}
	return s + strings.Repeat(" ", w-n)
}

// blankBlock is h lines of w spaces.
func blankBlock(w, h int) string {
	if h <= 0 {
		return ""
	}
	line := strings.Repeat(" ", max(w, 0))
	return strings.TrimSuffix(strings.Repeat(line+"\n", h), "\n")
}
