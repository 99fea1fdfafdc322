package ui

import (
	"github.com/charmbracelet/lipgloss"
)

// Styles is every style of the explorer, built from one renderer so that the
// colour profile (TrueColor, 256, 16 colours or none) is the renderer's. The
// colours are mid-tones that read on dark and light backgrounds alike, so the
// terminal's background is never queried. Every meaning carried by a colour
// is also carried by a glyph or a word, so the screen reads with NO_COLOR.
type Styles struct {
	r *lipgloss.Renderer

	Title     lipgloss.Style // program name in the top bar
	Tab       lipgloss.Style // a view's name in the top bar
	ActiveTab lipgloss.Style // the view on screen
	Dim       lipgloss.Style // secondary text: units, baseline values
	Heading   lipgloss.Style // panel headings
	Border    lipgloss.Style // panel frames and rules

	// Plot series.
	Axis     lipgloss.Style
	Loop     lipgloss.Style // the current steady loop or trace
	Baseline lipgloss.Style // the baseline loop or trace (also dotted)
	ESPVR    lipgloss.Style
	EDPVR    lipgloss.Style
	Ea       lipgloss.Style
	Aortic   lipgloss.Style // aortic pressure trace
	Fit      lipgloss.Style // the ESPVR fitted to a protocol's loops, and its points
	Pump     lipgloss.Style // an LV-to-aorta pump's flow trace
	Mitral   lipgloss.Style // mitral flow trace

	Selected lipgloss.Style // the selected lever
	OutHigh  lipgloss.Style // a readout above its normal range (with ▲)
	OutLow   lipgloss.Style // a readout below its normal range (with ▼)

	Status lipgloss.Style // status line after an action
	Error  lipgloss.Style // status line after a failure (with "✗")
	Key    lipgloss.Style // a key in the help
	Desc   lipgloss.Style // a key's description in the help
	Box    lipgloss.Style // frame of overlays
	Prompt lipgloss.Style
}

// colour gives a colour for each profile: an index of the 256-colour
// palette, used on true-colour terminals as well (its escape sequence is
// half as long as a 24-bit one, which counts on a slow link), and one of the
// 16 ANSI colours.
func colour(c256, c16 string) lipgloss.CompleteColor {
	return lipgloss.CompleteColor{TrueColor: c256, ANSI256: c256, ANSI: c16}
}

// NewStyles builds the styles on renderer r.
func NewStyles(r *lipgloss.Renderer) *Styles {
	var (
		grey   = colour("245", "8")
		accent = colour("168", "5")
		loop   = colour("204", "9")
		green  = colour("36", "2")
		blue   = colour("67", "6")
		orange = colour("172", "3")
		teal   = colour("37", "6")
		red    = colour("203", "1")
		cyan   = colour("74", "12")
		purple = colour("134", "5")
	)
	n := r.NewStyle
	return &Styles{
		r:         r,
		Title:     n().Bold(true),
		Tab:       n().Foreground(grey),
		ActiveTab: n().Bold(true).Reverse(true),
		Dim:       n().Foreground(grey),
		Heading:   n().Bold(true),
		Border:    n().Foreground(grey),
		Axis:      n().Foreground(grey),
		Loop:      n().Foreground(loop),
		Baseline:  n().Foreground(grey),
		ESPVR:     n().Foreground(green),
		EDPVR:     n().Foreground(blue),
		Ea:        n().Foreground(orange),
		Aortic:    n().Foreground(teal),
		Fit:       n().Foreground(purple),
		Pump:      n().Foreground(orange),
		Mitral:    n().Foreground(blue),
		Selected:  n().Bold(true).Foreground(accent),
		OutHigh:   n().Bold(true).Foreground(red),
		OutLow:    n().Bold(true).Foreground(cyan),
		Status:    n(),
		Error:     n().Bold(true).Foreground(red),
		Key:       n().Bold(true),
		Desc:      n().Foreground(grey),
		Box:       n().Border(lipgloss.RoundedBorder()).BorderForeground(grey).Padding(0, 1),
		Prompt:    n().Bold(true),
	}
}

// Renderer is the renderer the styles were built on.
func (s *Styles) Renderer() *lipgloss.Renderer { return s.r }
