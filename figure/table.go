package figure

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"pvcouple/model"
)

// readoutKeys are the readouts a protocol reader looks for, in the order
// shown: volumes, pressures, coupling, flow, energetics.
var readoutKeys = []string{
	"edv_ml", "esv_ml", "sv_ml", "ef_pct", "edp_mmhg", "esp_mmhg", "ea_mmhg_per_ml", "ees_mmhg_per_ml",
	"ea_ees_ratio", "co_l_per_min", "map_mmhg", "sw_mmhg_ml", "pva_mmhg_ml", "efficiency",
}

// table is the readout table: a title and rows of cells, the first column a
// label and the others numbers aligned right.
type table struct {
	title string
	head  []string
	rows  [][]string
	note  string // under the rows, if any
	style draw.TextStyle
	bold  draw.TextStyle
	size  vg.Length // font size
}

// minTableScale is the smallest fraction of the normal text size a table is
// shrunk to before rows are left out.
const minTableScale = 0.7

// fit shrinks the table's text, and then leaves out its last rows with a
// note, so that it fits a box of width w and height h. The width always fits
// (rows cannot make a table narrower); for the height the text shrinks to
// minTableScale at most before rows go.
func (t *table) fit(w, h vg.Length) {
	widthScale := min(1, float64(w/t.width()))
	heightScale := max(minTableScale, min(1, float64(h/t.height())))
	if scale := min(widthScale, heightScale); scale < 1 {
		t.setSize(vg.Length(scale) * tableSize)
	}
	for len(t.rows) > 0 && t.height() > h {
		hidden := 1
		if t.note != "" && strings.HasPrefix(t.note, "… and ") {
			_, err := fmt.Sscanf(t.note, "… and %d more", &hidden)
			if err == nil {
				hidden++
			}
		}
		t.rows = t.rows[:len(t.rows)-1]
		t.note = fmt.Sprintf("… and %d more", hidden)
	}
}

// setSize sets the font size of the table's text.
func (t *table) setSize(size vg.Length) {
	t.size = size
	t.style = textStyle(size, false)
	t.bold = textStyle(size, true)
}

// table lists the readouts that changed between the baseline and the
// what-if, as the reader will see them: a readout counts as changed when its
// two values differ once printed. Without a baseline it lists the readouts.
func (f *Figure) table() *table {
	t := &table{}
	t.setSize(tableSize)
	if f.Baseline == nil {
		t.title = "Readouts"
		t.head = []string{"", "Value"}
		for _, k := range readoutKeys {
			spec, _ := model.MetricByKey(k)
			t.rows = append(t.rows, []string{label(spec), fmtValue(spec.Get(&f.WhatIf.Metrics))})
		}
		return t
	}
	t.title = "Changed readouts"
	t.head = []string{"", "Baseline → what-if", "Δ", "Δ %"}
	changes := model.CompareMetrics(&f.Baseline.Metrics, &f.WhatIf.Metrics)
	for _, k := range readoutKeys {
		for _, c := range changes {
			if c.Spec.Key != k {
				continue
			}
			b, w := fmtValue(c.Baseline), fmtValue(c.WhatIf)
			if b == w {
				continue
			}
			t.rows = append(t.rows, []string{label(c.Spec), b + " → " + w, fmtSigned(c.Delta), fmtPercent(c.Percent)})
		}
	}
	if len(t.rows) == 0 {
		t.note = "No readout changed."
	}
	return t
}

// label is a readout's short label with its unit.
func label(s model.MetricSpec) string {
	switch s.Unit {
	case "", "%":
		return s.Label + unitSuffix(s.Unit)
	}
	return s.Label + " (" + s.Unit + ")"
}

func unitSuffix(u string) string {
	if u == "%" {
		return " (%)"
	}
	return ""
}

// Cell padding and row spacing.
var (
	colGap  = 1.0  // gap between columns as a multiple of the font size
	rowLead = 1.35 // line height as a multiple of the font size
)

func (t *table) gap() vg.Length { return t.size * vg.Length(colGap) }

func (t *table) lineHeight() vg.Length { return t.size * vg.Length(rowLead) }

// colWidths returns the width of each column.
func (t *table) colWidths() []vg.Length {
	w := make([]vg.Length, len(t.head))
	for i, h := range t.head {
		w[i] = t.bold.Width(h)
	}
	for _, r := range t.rows {
		for i, c := range r {
			w[i] = max(w[i], t.style.Width(c))
		}
	}
	return w
}

// width is the table's natural width.
func (t *table) width() vg.Length {
	var sum vg.Length
	for _, w := range t.colWidths() {
		sum += w
	}
	sum += t.gap() * vg.Length(len(t.head)-1)
	return max(sum, t.bold.Width(t.title), t.style.Width(t.note))
}

// height is the table's natural height.
func (t *table) height() vg.Length {
	n := 2 + len(t.rows) // title, head, rows
	if t.note != "" {
		n++
	}
	return t.lineHeight() * vg.Length(n)
}

// draw writes the table from the top left of c, scaling it down if it is
// wider than c.
func (t *table) draw(c draw.Canvas) {
	widths := t.colWidths()
	lh := t.lineHeight()
	y := c.Max.Y - lh
	left := c.Min.X
	title := t.bold
	c.FillText(title, vg.Point{X: left, Y: y}, t.title)
	y -= lh
	row := func(cells []string, sty draw.TextStyle) {
		x := left
		for i, cell := range cells {
			s := sty
			px := x
			if i > 0 {
				s.XAlign = text.XRight
				px = x + widths[i]
			}
			c.FillText(s, vg.Point{X: px, Y: y}, cell)
			x += widths[i] + t.gap()
		}
		y -= lh
	}
	row(t.head, t.bold)
	rule := draw.LineStyle{Color: colRule, Width: vg.Points(0.5)}
	c.StrokeLine2(rule, left, y+lh*0.8, left+t.width(), y+lh*0.8)
	for _, r := range t.rows {
		row(r, t.style)
	}
	if t.note != "" {
		c.FillText(t.style, vg.Point{X: left, Y: y}, t.note)
	}
}

// fmtValue prints a number with about four significant digits, "—" for NaN.
func fmtValue(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	a := math.Abs(v)
	var s string
	switch {
	case a >= 1000:
		s = strconv.FormatFloat(v, 'f', 0, 64)
	case a >= 100:
		s = strconv.FormatFloat(v, 'f', 1, 64)
	case a >= 10:
		s = strconv.FormatFloat(v, 'f', 2, 64)
	case a >= 0.01 || a == 0:
		s = strconv.FormatFloat(v, 'f', 3, 64)
	default:
		s = strconv.FormatFloat(v, 'g', 3, 64)
	}
	return strings.Replace(s, "-", "−", 1)
}

// fmtSigned prints a change with its sign.
func fmtSigned(v float64) string {
	s := fmtValue(v)
	if v > 0 {
		return "+" + s
	}
	return s
}

// fmtPercent prints a percentage change with one decimal and its sign.
func fmtPercent(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	s := strconv.FormatFloat(v, 'f', 1, 64)
	if v > 0 {
		s = "+" + s
	}
	return strings.Replace(s, "-", "−", 1)
}
