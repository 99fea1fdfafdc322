package figure

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"pvcouple/model"
)

// DefaultCaption is the line under every figure unless one is given.
const DefaultCaption = "Model result (time-varying elastance ventricle with a three-element Windkessel, pvcouple) " +
	"for research and education planning; not for patient care."

// Figure is a what-if drawn against its baseline.
type Figure struct {
	// Title is the heading; it may hold a second line after "\n".
	Title string
	// WhatIf is the steady beat of the what-if; required.
	WhatIf *model.Beat
	// Baseline is the steady beat of the baseline; nil draws the what-if
	// alone with its readouts.
	Baseline *model.Beat
	// Caption is the line under the figure; empty means DefaultCaption.
	Caption string
}

// Formats are the file formats Render writes.
var Formats = []string{"svg", "png"}

// Render draws the figure at size s and writes it to w as format "svg" or "png".
func (f *Figure) Render(w io.Writer, format string, s Size) (err error) {
	// The drawing library panics on some inputs it cannot draw; report
	// those as errors rather than end the program.
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("figure: cannot draw: %v", r)
		}
	}()
	if f.WhatIf == nil {
		return errors.New("figure: no what-if beat to draw")
	}
	c, err := newCanvas(format, s)
	if err != nil {
		return err
	}
	if err := f.draw(draw.New(c)); err != nil {
		return err
	}
	var out io.WriterTo = c
	if format == "svg" {
		var buf bytes.Buffer
		if _, err := c.WriteTo(&buf); err != nil {
			return fmt.Errorf("figure: cannot write svg: %w", err)
		}
		out = svgFixed(buf.Bytes(), s)
	}
	if _, err := out.WriteTo(w); err != nil {
		return fmt.Errorf("figure: cannot write %s: %w", format, err)
	}
	return nil
}

// margin is the white border of the figure.
var margin = vg.Points(8)

// draw lays the figure out on dc: caption at the bottom, the plot, and the
// legend with the readout table beside the plot on a wide figure or under it
// on a tall one.
func (f *Figure) draw(dc draw.Canvas) error {
	dc.FillPolygon(colorWhite, []vg.Point{dc.Min, {X: dc.Max.X, Y: dc.Min.Y}, dc.Max, {X: dc.Min.X, Y: dc.Max.Y}})
	dc = draw.Crop(dc, margin, -margin, margin, -margin)

	caption := f.Caption
	if caption == "" {
		caption = DefaultCaption
	}
	capStyle := textStyle(captionSize, false)
	capStyle.Color = colFaint
	capLines := wrap(capStyle, caption, dc.Max.X-dc.Min.X)
	lineH := capStyle.Height("Xg")
	for i, l := range capLines {
		y := dc.Min.Y + vg.Length(len(capLines)-1-i)*lineH
		dc.FillText(capStyle, vg.Point{X: dc.Min.X, Y: y}, l)
	}
	dc = draw.Crop(dc, 0, 0, vg.Length(len(capLines))*lineH+vg.Points(6), 0)

	if f.Title != "" {
		ts := textStyle(titleSize, true)
		th := ts.Height("Xg")
		y := dc.Max.Y - th
		for _, para := range strings.Split(f.Title, "\n") {
			for _, l := range wrap(ts, para, dc.Max.X-dc.Min.X) {
				dc.FillText(ts, vg.Point{X: dc.Min.X, Y: y}, l)
				y -= th
			}
			ts = textStyle(titleSize, false) // paragraphs after the first are plain
		}
		dc = draw.Crop(dc, 0, 0, 0, -(dc.Max.Y - y - th + vg.Points(6)))
	}

	p, leg, err := f.plot()
	if err != nil {
		return err
	}
	tab := f.table()
	width, height := dc.Max.X-dc.Min.X, dc.Max.Y-dc.Min.Y
	lw, lh := legendBox(leg)
	gap := vg.Points(10)
	if width >= 1.25*height {
		// Side panel: legend on top, table under it.
		side := min(max(tab.width(), lw), 0.45*width)
		p.Draw(draw.Crop(dc, 0, -(side + gap), 0, 0))
		panel := draw.Crop(dc, width-side, 0, 0, 0)
		leg.Top, leg.Left = true, true
		leg.Draw(panel)
		tab.fit(side, height-lh-gap)
		tab.draw(draw.Crop(panel, 0, 0, 0, -(lh + gap)))
		return nil
	}
	// Below the plot: the table, and the legend beside it when there is room.
	below := min(max(tab.height(), lh), 0.45*height)
	legBeside := tab.width()+gap+lw <= width
	tabWidth := width
	if legBeside {
		tabWidth = width - lw - gap
	} else {
		p.Legend = leg
		p.Legend.Top = true
	}
	tab.fit(tabWidth, below)
	p.Draw(draw.Crop(dc, 0, 0, below+gap, 0))
	area := draw.Crop(dc, 0, 0, 0, -(height - below))
	tab.draw(area)
	if legBeside {
		leg.Top, leg.Left = true, false
		leg.Draw(area)
	}
	return nil
}

// plot builds the pressure–volume plot and its legend.
func (f *Figure) plot() (*plot.Plot, plot.Legend, error) {
	p := plot.New()
	styled(p)
	p.X.Label.Text = "Volume (mL)"
	p.Y.Label.Text = "Pressure (mmHg)"
	leg := plot.NewLegend()
	leg.TextStyle = p.Legend.TextStyle
	leg.ThumbnailWidth = vg.Points(22)
	leg.Padding = vg.Points(2.5)
	p.X.Tick.Marker = niceTicks{}
	p.Y.Tick.Marker = niceTicks{}

	beats := []*model.Beat{f.WhatIf}
	if f.Baseline != nil {
		beats = append(beats, f.Baseline)
	}
	xmin, xmax, ymin, ymax := viewRange(beats)
	var errs []error
	newLine := func(xy plotter.XYs, s draw.LineStyle) *plotter.Line {
		l, err := finiteLine(xy, s)
		errs = append(errs, err)
		return l
	}

	// Relations first, loops over them; the baseline under the what-if.
	var thumbs [5]plot.Thumbnailer
	for i := len(beats) - 1; i >= 0; i-- {
		b, base := beats[i], i == 1
		pp := b.Params
		espvr := newLine(plotter.XYs{{X: pp.V0, Y: 0}, {X: math.Min(xmax, pp.V0+ymax/pp.Ees), Y: pp.ESPVR(math.Min(xmax, pp.V0+ymax/pp.Ees))}},
			line(colESPVR, lineWidth, base))
		edpvr := newLine(curve(pp.EDPVR, math.Max(pp.V0, xmin), xmax, ymax), line(colEDPVR, lineWidth, base))
		m := b.Metrics
		ea := newLine(plotter.XYs{{X: m.EDV, Y: 0}, {X: m.ESV, Y: m.ESP}}, line(colEa, lineWidth, base))
		add(p, edpvr, espvr, ea)
		if !base {
			thumbs[2], thumbs[3], thumbs[4] = espvr, edpvr, ea
		}
	}
	for i := len(beats) - 1; i >= 0; i-- {
		b, base := beats[i], i == 1
		xy := make(plotter.XYs, len(b.VLV))
		for k := range b.VLV {
			xy[k] = plotter.XY{X: b.VLV[k], Y: b.PLV[k]}
		}
		col := colLoop
		if base {
			col = colBase
		}
		loop := newLine(xy, line(col, loopWidth, base))
		es, _ := plotter.NewScatter(plotter.XYs{{X: b.Metrics.ESV, Y: b.Metrics.ESP}})
		es.GlyphStyle = draw.GlyphStyle{Color: col, Radius: vg.Points(2.2), Shape: draw.CircleGlyph{}}
		add(p, loop)
		p.Add(es)
		thumbs[i] = loop
	}
	if f.Baseline != nil {
		leg.Add("What-if loop", thumbs[0])
		leg.Add("Baseline (dashed)", thumbs[1])
	} else {
		leg.Add("Loop", thumbs[0])
	}
	leg.Add("ESPVR (slope Ees)", thumbs[2])
	leg.Add("EDPVR", thumbs[3])
	leg.Add("Ea line", thumbs[4])

	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = xmin, xmax, ymin, ymax
	p.Add(plotter.NewGrid())
	if err := errors.Join(errs...); err != nil {
		return nil, leg, fmt.Errorf("figure: %w", err)
	}
	return p, leg, nil
}

// add adds the lines that could be made.
func add(p *plot.Plot, ls ...*plotter.Line) {
	for _, l := range ls {
		if l != nil {
			p.Add(l)
		}
	}
}

// viewRange frames the loops, the ESPVR intercepts and some room above.
func viewRange(beats []*model.Beat) (xmin, xmax, ymin, ymax float64) {
	xmin, xmax, ymin, ymax = 0, math.Inf(-1), 0, math.Inf(-1)
	for _, b := range beats {
		xmin = math.Min(xmin, b.Params.V0)
		for k := range b.VLV {
			xmax = math.Max(xmax, b.VLV[k])
			ymax = math.Max(ymax, b.PLV[k])
			ymin = math.Min(ymin, b.PLV[k])
		}
	}
	return xmin, xmax + 0.12*(xmax-xmin), ymin, 1.12 * ymax
}

// curve samples y = fn(x) from x0 to x1, stopping just past ymax.
func curve(fn func(float64) float64, x0, x1, ymax float64) plotter.XYs {
	const n = 120
	var xy plotter.XYs
	for i := 0; i <= n; i++ {
		x := x0 + (x1-x0)*float64(i)/n
		y := fn(x)
		xy = append(xy, plotter.XY{X: x, Y: y})
		if y > ymax {
			break
		}
	}
	return xy
}

// finiteLine makes a plotter.Line of the finite points of xy (a curve may
// run off to infinity beyond the view).
func finiteLine(xy plotter.XYs, s draw.LineStyle) (*plotter.Line, error) {
	keep := xy[:0:0]
	for _, p := range xy {
		if !math.IsNaN(p.X) && !math.IsInf(p.X, 0) && !math.IsNaN(p.Y) && !math.IsInf(p.Y, 0) {
			keep = append(keep, p)
		}
	}
	if len(keep) < 2 {
		return nil, fmt.Errorf("a line has %d finite points; a beat with non-finite samples cannot be drawn", len(keep))
	}
	l, err := plotter.NewLine(keep)
	if err != nil {
		return nil, err
	}
	l.LineStyle = s
	return l, nil
}
