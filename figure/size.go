package figure

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot/vg"
)

// DefaultSize fits the text width of an A4 or letter page with its margins.
const DefaultSize = "16x11cm"

// DefaultDPI is the resolution of PNG figures given in physical units, and
// the scale of text in figures given in pixels: print quality.
const DefaultDPI = 300

// Size is the size of a figure.
type Size struct {
	Width, Height vg.Length // physical size
	DPI           int       // pixels per inch of a PNG
	Unit          string    // unit the size was given in: cm, mm, in or px
	W, H          float64   // the size in Unit, as given
}

// Size limits: large enough for the readout table, small enough to keep a
// PNG within about 250 MB of memory.
const (
	minCM     = 5
	maxCM     = 100
	minPixels = 400
	maxPixels = 8000
	minDPI    = 50
	maxDPI    = 1200
)

var unitLength = map[string]vg.Length{"cm": vg.Centimeter, "mm": vg.Millimeter, "in": vg.Inch}

// ParseSize reads a size WxH followed by a unit, cm, mm, in or px (e.g.
// "16x11cm", "1800x1200px"), at dpi pixels per inch. A size in pixels is
// exact for PNG; its physical size (for the text) is pixels/dpi inches.
func ParseSize(s string, dpi int) (Size, error) {
	if dpi < minDPI || dpi > maxDPI {
		return Size{}, fmt.Errorf("dpi %d is out of range; allowed %d to %d", dpi, minDPI, maxDPI)
	}
	txt := strings.ToLower(strings.TrimSpace(s))
	var unit string
	for _, u := range []string{"cm", "mm", "in", "px"} {
		if strings.HasSuffix(txt, u) {
			unit, txt = u, strings.TrimSuffix(txt, u)
			break
		}
	}
	if unit == "" {
		return Size{}, fmt.Errorf("size %q has no unit; give WxH with cm, mm, in or px, e.g. %s", s, DefaultSize)
	}
	ws, hs, ok := strings.Cut(txt, "x")
	w, errW := strconv.ParseFloat(strings.TrimSpace(ws), 64)
	h, errH := strconv.ParseFloat(strings.TrimSpace(hs), 64)
	if !ok || errW != nil || errH != nil || math.IsNaN(w) || math.IsNaN(h) {
		return Size{}, fmt.Errorf("size %q is not WxH with numbers, e.g. %s", s, DefaultSize)
	}
	sz := Size{DPI: dpi, Unit: unit, W: w, H: h}
	if unit == "px" {
		for _, v := range []float64{w, h} {
			if v != math.Trunc(v) || v < minPixels || v > maxPixels {
				return Size{}, fmt.Errorf("size %q: %g px is out of range; allowed whole numbers %d to %d px", s, v, minPixels, maxPixels)
			}
		}
		sz.Width = vg.Length(w/float64(dpi)) * vg.Inch
		sz.Height = vg.Length(h/float64(dpi)) * vg.Inch
	} else {
		sz.Width, sz.Height = vg.Length(w)*unitLength[unit], vg.Length(h)*unitLength[unit]
	}
	for _, l := range []vg.Length{sz.Width, sz.Height} {
		if cm := float64(l / vg.Centimeter); !(cm >= minCM-1e-9 && cm <= maxCM+1e-9) {
			msg := fmt.Sprintf("size %q: a side of %.3g cm is out of range; allowed %d to %d cm", s, cm, minCM, maxCM)
			if unit == "px" {
				msg += fmt.Sprintf(" (pixels / %d dpi; change the size or --dpi)", dpi)
			}
			return Size{}, errors.New(msg)
		}
	}
	if px := math.Max(float64(sz.Width/vg.Inch), float64(sz.Height/vg.Inch)) * float64(dpi); px > maxPixels {
		return Size{}, fmt.Errorf("size %q at %d dpi makes a %.0f-pixel side; at most %d: lower --dpi", s, dpi, px, maxPixels)
	}
	return sz, nil
}

// Pixels returns the pixel size of a PNG of this size.
func (s Size) Pixels() (w, h int) {
	return int(float64(s.Width/vg.Inch)*float64(s.DPI) + 0.5), int(float64(s.Height/vg.Inch)*float64(s.DPI) + 0.5)
}

// String writes the size as given, e.g. 16x11cm.
func (s Size) String() string {
	return strconv.FormatFloat(s.W, 'g', -1, 64) + "x" + strconv.FormatFloat(s.H, 'g', -1, 64) + s.Unit
}
