package ui

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"

	"pvcouple/model"
	"pvcouple/model/sweep"
)

// The heat map's glyphs: five bands from the least to the largest value on
// the map, in density order so the map reads without colour; colour repeats
// the band.
const mapLevels = 5

var mapGlyphs = [mapLevels]string{"·", "░", "▒", "▓", "█"}

// Glyphs of the map's marks.
const (
	mapMarker  = "◆" // the levers' setting
	mapBest    = "*" // the largest value on the map
	mapNone    = "×" // a point with no steady beat
	mapPending = " " // a point not solved yet
)

// The map's layout: y tick labels, then two cells per grid point (about
// square on a terminal), the axis and its labels below, four lines of text.
const (
	mapLabelW    = 5
	mapTextLines = 4
	mapMinN      = 4  // fewest points per axis
	mapMaxX      = 48 // most points per axis, so a large window stays quick
	mapMaxY      = 32
)

// mapStyles are the heat map's styles, built on the explorer's renderer.
type mapStyles struct {
	Levels       [mapLevels]lipgloss.Style
	Marker, Best lipgloss.Style
	None         lipgloss.Style
}

func newMapStyles(s *Styles) mapStyles {
	n := s.Renderer().NewStyle
	return mapStyles{
		Levels: [mapLevels]lipgloss.Style{
			n().Foreground(colour("60", "4")),
			n().Foreground(colour("67", "6")),
			n().Foreground(colour("72", "2")),
			n().Foreground(colour("179", "3")),
			n().Foreground(colour("209", "1")),
		},
		Marker: n().Bold(true).Foreground(colour("201", "13")),
		Best:   n().Bold(true).Foreground(colour("201", "13")),
		None:   s.Dim,
	}
}

// dims is the size of the grid that fills the view: nx columns, ny rows.
func (v *mapView) dims() (nx, ny int) {
	return min((v.w-mapLabelW-1)/2, mapMaxX), min(v.h-3-mapTextLines, mapMaxY)
}

// Render implements view.
func (v *mapView) Render(st *state) string {
	if v.w <= 0 || v.h <= 0 {
		return ""
	}
	nx, ny := v.dims()
	switch {
	case nx < mapMinN || ny < mapMinN:
		return v.message("The map needs a larger window.")
	case v.job == nil && v.err != nil:
		return v.message("No map here: " + v.err.Error())
	case v.job == nil:
		return v.message("Solving the map…")
	}
	g := v.grid
	ay, ax := g.Axes[0], g.Axes[1]
	nx, ny = ax.N, ay.N
	lx, ly := model.Levers[v.kx], model.Levers[v.ky]
	spec, _ := model.MetricByKey(sweep.MapMetrics[v.metric])
	pal := newPalette()
	axis := pal.index(v.s.Axis)
	var lvl [mapLevels]uint8
	for i, s := range v.ms.Levels {
		lvl[i] = pal.index(s)
	}
	marker, best, none := pal.index(v.ms.Marker), pal.index(v.ms.Best), pal.index(v.ms.None)

	iMin, iMax := sweep.Extremes(v.vals)
	lo, hi := math.NaN(), math.NaN()
	if iMin >= 0 {
		lo, hi = v.vals[iMin], v.vals[iMax]
	}
	level := func(x float64) int {
		if !(hi > lo) {
			return mapLevels / 2
		}
		return min(int((x-lo)/(hi-lo)*mapLevels), mapLevels-1)
	}
	// Where the setting and the largest value fall, in cells of the map.
	mx := cellCol(ax.Position(lx.Spec().Get(st.target)))
	my := ny - 1 - int(math.Round(ay.Position(ly.Spec().Get(st.target))))
	bx, by := -1, -1
	if iMax >= 0 {
		bx, by = 2*(iMax%nx), ny-1-iMax/nx
	}

	var b strings.Builder
	w := sgrWriter{b: &b, pal: pal}
	// Row 0: the y axis title and the metric.
	yTitle := v.s.Axis.Render(ly.Short + " " + ly.Spec().Unit)
	right := spec.Label + ": " + spec.Meaning
	if ansi.StringWidth(yTitle)+2+len([]rune(right)) > v.w {
		right = spec.Label + " " + spec.Unit
	}
	b.WriteString(padRight(yTitle+strings.Repeat(" ", max(2, v.w-ansi.StringWidth(yTitle)-ansi.StringWidth(right)))+v.s.Heading.Render(right), v.w))
	// The map, top row at the largest y.
	yTicks := mapTicks(ay, max(4, ny/3))
	anyNone := false
	for r := 0; r < ny; r++ {
		b.WriteByte('\n')
		iy := ny - 1 - r
		lbl, glyph := "", "│"
		if t, ok := yTicks[iy]; ok {
			lbl, glyph = t, "┤"
		}
		w.write(strings.Repeat(" ", max(0, mapLabelW-len(lbl)))+lbl+glyph, axis)
		for ix := 0; ix < nx; ix++ {
			i := iy*nx + ix
			var g string
			var k uint8
			switch {
			case !math.IsNaN(v.vals[i]):
				g, k = mapGlyphs[level(v.vals[i])], lvl[level(v.vals[i])]
			case i < len(v.stat) && v.stat[i] != sweep.NotRun && v.stat[i] != sweep.OK:
				g, k = mapNone, none
				anyNone = true
			default:
				g, k = mapPending, 0
			}
			for c := 2 * ix; c < 2*ix+2; c++ {
				switch {
				case r == my && c == mx:
					w.write(mapMarker, marker)
				case r == by && c == bx:
					w.write(mapBest, best)
				default:
					w.write(g, k)
				}
			}
		}
		w.end()
	}
	// The x axis and its labels.
	// The axis title goes at the right end of the label row; tick labels
	// fill the rest where they fit.
	cw := 2 * nx
	line := []rune(strings.Repeat("─", cw))
	xTitle := lx.Short + " " + lx.Spec().Unit
	lblW := v.w - mapLabelW
	room := lblW - ansi.StringWidth(xTitle) - 2
	lblRow := []byte(strings.Repeat(" ", max(room, 0)))
	xTicks := mapTicks(ax, max(4, cw/8))
	for ix := 0; ix < nx; ix++ {
		s, ok := xTicks[ix]
		if !ok {
			continue
		}
		col := 2 * ix
		line[col] = '┬'
		at := max(col+1-len(s)/2, 0)
		if at+len(s) <= len(lblRow) && (at == 0 || lblRow[at-1] == ' ') && strings.TrimSpace(string(lblRow[at:at+len(s)])) == "" {
			copy(lblRow[at:], s)
		}
	}
	b.WriteString("\n" + v.s.Axis.Render(strings.Repeat(" ", mapLabelW)+"└"+string(line)))
	row := string(lblRow)
	if room > 0 {
		row += strings.Repeat(" ", lblW-len(row)-ansi.StringWidth(xTitle)) + xTitle
	}
	b.WriteString("\n" + v.s.Axis.Render(padRight(strings.Repeat(" ", mapLabelW)+row, v.w)))
	// The text: legend, the setting, the largest value, progress.
	b.WriteString("\n" + v.legend(spec, lo, hi, anyNone))
	b.WriteString("\n" + v.nowLine(st, spec))
	b.WriteString("\n" + v.bestLine(spec, iMax))
	b.WriteString("\n" + v.progressLine())
	out := strings.Split(b.String(), "\n")
	for i := range out {
		out[i] = padRight(out[i], v.w)
	}
	for len(out) < v.h {
		out = append(out, strings.Repeat(" ", v.w))
	}
	return strings.Join(out[:v.h], "\n")
}

// message is the view with one line of text at its top left.
func (v *mapView) message(s string) string {
	lines := strings.Split(blankBlock(v.w, v.h), "\n")
	lines[0] = padRight(" "+ansi.Truncate(s, v.w-1, "…"), v.w)
	return strings.Join(lines, "\n")
}

// cellCol is the map's cell column of a fractional grid position: the left
// cell of a point's two at the point, the right one half-way to the next.
func cellCol(pos float64) int { return int(math.Floor(2*pos + 0.5)) }

// mapTicks returns tick labels of about n nice values on axis a, keyed by
// the grid index nearest each.
func mapTicks(a sweep.Axis, n int) map[int]string {
	lo, hi := math.Min(a.From, a.To), math.Max(a.From, a.To)
	step := niceStep(hi-lo, n)
	ticks := map[int]string{}
	for k := math.Ceil(lo/step - 1e-9); k*step <= hi+1e-9*step; k++ {
		t := k * step
		i := int(math.Round(a.Position(t)))
		if i >= 0 && i < a.N {
			ticks[i] = tickLabel(t, step)
		}
	}
	return ticks
}

// legend maps the glyphs to their bands of the metric, in its unit: each
// glyph with the lower end of its band, or, when that does not fit, the
// glyphs between the least and largest value.
func (v *mapView) legend(spec model.MetricSpec, lo, hi float64, anyNone bool) string {
	if math.IsNaN(lo) {
		return " " + spec.Label + " " + spec.Unit + ": no value yet"
	}
	d := (hi - lo) / mapLevels
	dec := 0
	if d > 0 {
		dec = max(0, int(math.Ceil(-math.Log10(d))))
	} else {
		dec = metricDecimals(spec.Key)
	}
	num := func(x float64) string { return strconv.FormatFloat(x, 'f', dec, 64) }
	unit := ""
	if spec.Unit != "" {
		unit = " " + spec.Unit
	}
	tail := ""
	if anyNone {
		tail = "  " + v.ms.None.Render(mapNone+" none")
	}
	var full, bar strings.Builder
	full.WriteString(" " + spec.Label)
	bar.WriteString(" " + spec.Label + " " + num(lo) + " ")
	for k := range mapLevels {
		g := v.ms.Levels[k].Render(mapGlyphs[k])
		full.WriteString(" " + g + num(lo+float64(k)*d))
		bar.WriteString(g)
	}
	full.WriteString("–" + num(hi) + unit + tail)
	bar.WriteString(" " + num(hi) + unit + tail)
	if ansi.StringWidth(full.String()) <= v.w {
		return full.String()
	}
	return bar.String()
}

// nowLine gives the metric at the levers' setting (the loop on screen, once
// it is solved) and the setting of the map's two levers.
func (v *mapView) nowLine(st *state, spec model.MetricSpec) string {
	val := "…"
	if st.settled() {
		val = fmtNum(spec.Get(&st.shown.Metrics), metricDecimals(spec.Key))
	}
	lx, ly := model.Levers[v.kx], model.Levers[v.ky]
	x, y := lx.Spec().Get(st.target), ly.Spec().Get(st.target)
	return v.fitLine(v.ms.Marker.Render(mapMarker), "now", val, spec.Unit,
		lx.Format(x), ly.Format(y))
}

// bestLine gives the largest value on the map and the levers there.
func (v *mapView) bestLine(spec model.MetricSpec, iMax int) string {
	if iMax < 0 {
		return " " + mapBest + " max: none yet"
	}
	nx := v.grid.Axes[1].N
	lx, ly := model.Levers[v.kx], model.Levers[v.ky]
	x, y := v.grid.Axes[1].Value(iMax%nx), v.grid.Axes[0].Value(iMax/nx)
	return v.fitLine(v.ms.Best.Render(mapBest), "max", fmtNum(v.vals[iMax], metricDecimals(spec.Key)), spec.Unit,
		gridValue(lx, v.grid.Axes[1], x), gridValue(ly, v.grid.Axes[0], y))
}

// fitLine writes "glyph word value unit at X x, Y y": the longest form that
// fits the view (lever units, the metric's unit and the word go in turn),
// cut with … only when even the shortest does not fit.
func (v *mapView) fitLine(glyph, word, val, unit, x, y string) string {
	lx, ly := model.Levers[v.kx], model.Levers[v.ky]
	u := ""
	if unit != "" {
		u = " " + unit
	}
	for _, c := range []string{
		fmt.Sprintf(" %s %s %s%s at %s %s %s, %s %s %s", glyph, word, val, u, lx.Short, x, lx.Spec().Unit, ly.Short, y, ly.Spec().Unit),
		fmt.Sprintf(" %s %s %s%s at %s %s, %s %s", glyph, word, val, u, lx.Short, x, ly.Short, y),
		fmt.Sprintf(" %s %s %s at %s %s, %s %s", glyph, word, val, lx.Short, x, ly.Short, y),
		fmt.Sprintf(" %s %s at %s %s, %s %s", glyph, val, lx.Short, x, ly.Short, y),
	} {
		if ansi.StringWidth(c) <= v.w {
			return c
		}
	}
	return ansi.Truncate(fmt.Sprintf(" %s %s %s %s, %s %s", glyph, val, lx.Short, x, ly.Short, y), v.w, "…")
}

// progressLine says how far the map has come, or how long it took, and the
// map's keys when they fit.
func (v *mapView) progressLine() string {
	p := v.prog
	var s string
	if !v.finished {
		s = fmt.Sprintf(" solving %d of %d points", p.Done, p.Total)
		if r := p.Remaining(); r >= 50*time.Millisecond {
			s += fmt.Sprintf(", %.1f s left", r.Seconds())
		}
	} else {
		s = fmt.Sprintf(" %d points in %s s", p.Total, strconv.FormatFloat(p.Elapsed.Seconds(), 'f', 2, 64))
		if p.Failed > 0 {
			s += fmt.Sprintf(", %d without a steady beat", p.Failed)
		}
	}
	if hint := "  · m metric, x/y levers"; ansi.StringWidth(s+hint) <= v.w {
		s += hint
	}
	return v.s.Dim.Render(s)
}

// gridValue writes a lever's value at a point of axis a: with the lever's
// decimals, or more when the grid's spacing needs them.
func gridValue(l model.Lever, a sweep.Axis, x float64) string {
	dec := l.Decimals
	if step := math.Abs(a.To-a.From) / float64(max(a.N-1, 1)); step > 0 {
		dec = max(dec, int(math.Ceil(-math.Log10(step)-1e-9)))
	}
	return strconv.FormatFloat(x, 'f', dec, 64)
}

// metricDecimals is the decimals the readout panel shows a metric with.
func metricDecimals(key string) int {
	for _, r := range readoutKeys {
		if r.key == key {
			return r.decimals
		}
	}
	return 2
}
