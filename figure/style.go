package figure

import (
	"image/color"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Colours from the Okabe–Ito palette, told apart with colour-blindness and in
// grey print (the baseline is also dashed).
var (
	colLoop   = color.RGBA{0x00, 0x72, 0xB2, 0xFF} // blue
	colBase   = color.RGBA{0x55, 0x55, 0x55, 0xFF} // grey
	colESPVR  = color.RGBA{0xD5, 0x5E, 0x00, 0xFF} // vermillion
	colEDPVR  = color.RGBA{0x00, 0x9E, 0x73, 0xFF} // bluish green
	colEa     = color.RGBA{0xCC, 0x79, 0xA7, 0xFF} // reddish purple
	colText   = color.Black
	colFaint  = color.RGBA{0x66, 0x66, 0x66, 0xFF}
	colRule   = color.RGBA{0xAA, 0xAA, 0xAA, 0xFF}
	baseDash  = []vg.Length{vg.Points(4), vg.Points(2.5)}
	sansFont  = font.Font{Typeface: "Liberation", Variant: "Sans"}
	boldFont  = font.Font{Typeface: "Liberation", Variant: "Sans", Weight: xfont.WeightBold}
	loopWidth = vg.Points(1.4)
	lineWidth = vg.Points(0.9)
)

// Text sizes, in points: a figure is placed at its size in a document, so
// text keeps document sizes whatever the figure's size.
const (
	titleSize   = 10
	labelSize   = 9
	tickSize    = 8
	legendSize  = 8
	tableSize   = 8
	captionSize = 7
)

// textStyle returns plain text in the sans-serif face at size points.
func textStyle(size vg.Length, bold bool) draw.TextStyle {
	f := sansFont
	if bold {
		f = boldFont
	}
	return draw.TextStyle{Color: colText, Font: font.From(f, size), Handler: plot.DefaultTextHandler}
}

// line returns a line style; dashed for the baseline.
func line(c color.Color, w vg.Length, baseline bool) draw.LineStyle {
	s := draw.LineStyle{Color: c, Width: w}
	if baseline {
		s.Dashes = baseDash
	}
	return s
}

// styled gives a plot the figure's fonts, keeping its alignments.
func styled(p *plot.Plot) {
	p.Title.TextStyle.Font = font.From(boldFont, titleSize)
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = font.From(sansFont, labelSize)
		a.Tick.Label.Font = font.From(sansFont, tickSize)
	}
	p.Legend.TextStyle.Font = font.From(sansFont, legendSize)
}
