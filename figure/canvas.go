package figure

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

var colorWhite = color.White

// newCanvas returns a canvas of size s for format "svg" or "png".
func newCanvas(format string, s Size) (vg.CanvasWriterTo, error) {
	switch format {
	case "svg":
		return vgsvg.New(s.Width, s.Height), nil
	case "png":
		c := vgimg.NewWith(vgimg.UseWH(s.Width, s.Height), vgimg.UseDPI(s.DPI))
		return vgimg.PngCanvas{Canvas: c}, nil
	}
	return nil, fmt.Errorf("figure: format %q is not one of %s", format, strings.Join(Formats, ", "))
}

// legendBox is the width and height the legend needs.
func legendBox(l plot.Legend) (w, h vg.Length) {
	r := l.Rectangle(draw.Canvas{})
	return r.Size().X, r.Size().Y
}

// wrap breaks txt into lines no wider than w.
func wrap(sty draw.TextStyle, txt string, w vg.Length) []string {
	var lines []string
	cur := ""
	for _, word := range strings.Fields(txt) {
		next := word
		if cur != "" {
			next = cur + " " + word
		}
		if cur != "" && sty.Width(next) > w {
			lines = append(lines, cur)
			cur = word
			continue
		}
		cur = next
	}
	if cur != "" {
		lines = append(lines, cur)
	}
	return lines
}

// svgFixed rewrites two things in an SVG written by vgsvg: the width and
// height take the unit the size was given in (16cm rather than 453.54pt; the
// view box keeps the drawing's points), and the font names metric-compatible
// fallbacks (Arial, Helvetica), so the text keeps its width, and the layout
// its fit, where Liberation Sans is not installed.
func svgFixed(svg []byte, s Size) bytesWriter {
	unit := s.Unit
	head := fmt.Sprintf(`<svg width="%s%s" height="%s%s" viewBox=`, fmtLen(s.W), unit, fmtLen(s.H), unit)
	if i := bytes.Index(svg, []byte("<svg width=")); i >= 0 {
		if j := bytes.Index(svg[i:], []byte(" viewBox=")); j >= 0 {
			svg = append(append(append([]byte{}, svg[:i]...), head...), svg[i+j+len(" viewBox="):]...)
		}
	}
	svg = bytes.ReplaceAll(svg, []byte("font-family:Liberation Sans;"),
		[]byte("font-family:'Liberation Sans',Arial,Helvetica,sans-serif;"))
	return bytesWriter(svg)
}

func fmtLen(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// bytesWriter is a finished drawing held in memory.
type bytesWriter []byte

// WriteTo writes the bytes to w.
func (b bytesWriter) WriteTo(w io.Writer) (int64, error) {
	n, err := w.Write(b)
	return int64(n), err
}
