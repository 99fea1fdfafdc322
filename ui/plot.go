package ui

import (
	"math"
	"strings"

	"github.com/NimbleMarkets/ntcharts/canvas"
	"github.com/NimbleMarkets/ntcharts/canvas/graph"
	"github.com/NimbleMarkets/ntcharts/canvas/runes"
	"github.com/charmbracelet/lipgloss"
)

// series is one line of a plot, drawn as one braille grid.
type series struct {
	X, Y   []float64
	Closed bool // join the last point to the first (a loop)
	Dotted bool // draw one dot in three, so the line reads as dotted without colour
	Style  lipgloss.Style
	// Mark, when not 0, draws the line as this rune in every cell it passes
	// instead of braille dots: coarser, but it reads apart from the braille
	// lines without colour (a recording overlaid on the model's loop). With
	// Dotted, every other cell passed is marked.
	Mark rune
}

// label is ASCII text placed on a plot at a data point.
type label struct {
	X, Y  float64
	Text  string
	Style lipgloss.Style
	// At lists places for the text's first cell relative to the point's
	// cell, in cells (y down): the first whose cells are all empty is used,
	// else the first. None means at the point itself.
	At []offset
}

// offset is a shift in cells, y down.
type offset struct{ X, Y int }

// plot draws series as braille dots with ASCII axes: the y axis title (and
// a legend) in the top row, tick labels left of the drawing area, the x axis
// and its labels below. Each series is drawn as one braille layer with
// ntcharts' line stepping and combined into the cells; the cells keep one
// byte of style each. (ntcharts' canvas keeps a 560-byte lipgloss.Style per
// cell, 1.4 MB to clear per frame at 120×40, and renders each cell with its
// own escape sequences.) Rows are written with one escape sequence per
// change of style, so a row that did not change is byte-identical to the
// last frame's and a changed row stays short.
type plot struct {
	styles         *Styles
	w, h           int
	xTitle, yTitle string
	legend         string // styled text right of the y title, if it fits

	cw, ch int      // drawing area in cells
	lw     int      // width of the y tick labels
	cells  []rune   // cw·ch; 0 is empty
	sty    []uint8  // palette index of each cell
	dots   []uint8  // braille dot bits of the series being drawn
	pal    *palette // styles of this plot's cells
}

// newPlot returns a plot with the given ASCII axis titles.
func newPlot(st *Styles, xTitle, yTitle string) *plot {
	return &plot{styles: st, xTitle: xTitle, yTitle: yTitle, pal: newPalette()}
}

// SetSize sets the plot's outer size in cells.
func (p *plot) SetSize(w, h int) {
	p.w, p.h = w, h
}

// minPlotSize is the least outer size a plot draws in.
const (
	minPlotW = 20
	minPlotH = 6
)

// Render draws the series (first drawn first, so later ones lie on top) and
// labels in frame f, and returns exactly h lines of width w.
func (p *plot) Render(f frame, ss []series, labels []label) string {
	return p.RenderOn(nil, f, ss, labels)
}

// layer is drawn cells kept between renders, so that series that do not
// change (a family of loops that only grows) are drawn once. It belongs to
// one plot, one frame and one size.
type layer struct {
	cells []rune
	sty   []uint8
	f     frame
	w, h  int // the plot's outer size it was drawn for
	n     int // series drawn on it so far; the owner's count
}

// fits reports whether l was drawn for this plot's size and frame f.
func (p *plot) fits(l *layer, f frame) bool {
	return l.cells != nil && l.f == f && l.w == p.w && l.h == p.h
}

// drawLayer draws ss on l, over what it holds if it fits frame f and the
// plot's size, else on a cleared layer (with n reset to 0).
func (p *plot) drawLayer(l *layer, f frame, ss []series) {
	if !p.prepare(f) {
		return
	}
	if !p.fits(l, f) || len(l.cells) != len(p.cells) {
		l.cells, l.sty = make([]rune, len(p.cells)), make([]uint8, len(p.cells))
		l.f, l.w, l.h, l.n = f, p.w, p.h, 0
	}
	cells, sty := p.cells, p.sty
	p.cells, p.sty = l.cells, l.sty
	for _, s := range ss {
		p.draw(f, s)
	}
	p.cells, p.sty = cells, sty
}

// prepare sizes the drawing area for frame f (the y tick labels' width
// sets it); false when the plot is too small to draw.
func (p *plot) prepare(f frame) bool {
	if p.w < minPlotW || p.h < minPlotH {
		return false
	}
	p.lw = 3
	for _, v := range f.Y.ticks() {
		p.lw = max(p.lw, len(tickLabel(v, f.Y.Step)))
	}
	p.cw, p.ch = p.w-p.lw-1, p.h-3
	n := p.cw * p.ch
	if cap(p.cells) < n {
		p.cells, p.sty, p.dots = make([]rune, n), make([]uint8, n), make([]uint8, n)
	}
	p.cells, p.sty, p.dots = p.cells[:n], p.sty[:n], p.dots[:n]
	return true
}

// RenderOn is Render over the cells of layer base (nil for none), which
// must fit frame f and the plot's size.
func (p *plot) RenderOn(base *layer, f frame, ss []series, labels []label) string {
	if !p.prepare(f) {
		return blankBlock(p.w, p.h)
	}
	yt := f.Y.ticks()
	ylabels := make([]string, len(yt))
	for i, v := range yt {
		ylabels[i] = tickLabel(v, f.Y.Step)
	}
	if base != nil && p.fits(base, f) && len(base.cells) == len(p.cells) {
		copy(p.cells, base.cells)
		copy(p.sty, base.sty)
	} else {
		clear(p.cells)
		clear(p.sty)
	}
	for _, s := range ss {
		p.draw(f, s)
	}
	for _, l := range labels {
		p.place(f, l)
	}

	st := p.styles
	axis := p.pal.index(st.Axis)
	var b strings.Builder
	b.Grow(p.w * p.h * 2)
	w := sgrWriter{b: &b, pal: p.pal}
	// Row 0: the y axis title and the legend.
	top := st.Axis.Render(p.yTitle)
	if lw := lipgloss.Width(p.legend); lw > 0 && len(p.yTitle)+2+lw <= p.w {
		top += strings.Repeat(" ", p.w-len(p.yTitle)-lw) + p.legend
	}
	b.WriteString(padRight(top, p.w))
	// The drawing rows, with tick labels at the rows of the ticks.
	tickAt := make(map[int]string, len(yt))
	for i, v := range yt {
		_, row := p.cell(f, f.X.Lo, v)
		if _, taken := tickAt[row]; !taken {
			tickAt[row] = ylabels[i]
		}
	}
	var run []rune
	for row := 0; row < p.ch; row++ {
		b.WriteByte('\n')
		lbl, ok := tickAt[row]
		glyph := "│"
		if ok {
			glyph = "┤"
		}
		w.write(strings.Repeat(" ", p.lw-len(lbl))+lbl+glyph, axis)
		// Runs of equal style, spaces joining any run.
		run = run[:0]
		var runSty uint8
		for x := 0; x < p.cw; x++ {
			i := row*p.cw + x
			r, k := p.cells[i], p.sty[i]
			if r == 0 {
				r = ' '
			}
			if r != ' ' && k != runSty {
				w.write(string(run), runSty)
				run, runSty = run[:0], k
			}
			run = append(run, r)
		}
		w.write(string(run), runSty)
		w.end()
	}
	// The x axis and its tick labels.
	xt := f.X.ticks()
	line := []rune(strings.Repeat("─", p.cw))
	lblRow := []byte(strings.Repeat(" ", p.cw+1))
	for _, v := range xt {
		col, _ := p.cell(f, v, f.Y.Lo)
		if col < 0 || col >= p.cw {
			continue
		}
		line[col] = '┬'
		s := tickLabel(v, f.X.Step)
		at := max(col+1-len(s)/2, 0)
		if at+len(s) <= len(lblRow) && (at == 0 || lblRow[at-1] == ' ') && strings.TrimSpace(string(lblRow[at:at+len(s)])) == "" {
			copy(lblRow[at:], s)
		}
	}
	b.WriteByte('\n')
	b.WriteString(st.Axis.Render(strings.Repeat(" ", p.lw) + "└" + string(line)))
	b.WriteByte('\n')
	row := strings.TrimRight(string(lblRow), " ")
	title := p.xTitle
	if len(row)+2+len(title) > p.cw+1 {
		row = row[:max(0, p.cw+1-len(title)-2)]
	}
	row += strings.Repeat(" ", p.cw+1-len(row)-len(title)) + title
	b.WriteString(st.Axis.Render(strings.Repeat(" ", p.lw) + row))
	return b.String()
}

// cell is the canvas cell of a data point (it may lie outside the canvas).
func (p *plot) cell(f frame, x, y float64) (col, row int) {
	gx, gy := p.dot(f, x, y)
	return floorDiv(gx, 2), floorDiv(gy, 4)
}

// dot is the braille dot of a data point, (0, 0) at the top left, computed
// as ntcharts' graph.BrailleGrid.GridPoint does.
func (p *plot) dot(f frame, x, y float64) (int, int) {
	gw, gh := 2*p.cw, 4*p.ch
	sx := (x - f.X.Lo) * float64(gw-1) / (f.X.Hi - f.X.Lo)
	sy := (y - f.Y.Lo) * float64(gh-1) / (f.Y.Hi - f.Y.Lo)
	return int(math.Round(sx)), gh - 1 - int(math.Round(sy))
}

func floorDiv(a, b int) int {
	q := a / b
	if a%b != 0 && a < 0 {
		q--
	}
	return q
}

// brailleBit is the bit of the braille dot at column x (0–1) and row y
// (0–3) of a cell, from ntcharts' dot numbering.
var brailleBit = func() (b [2][4]uint8) {
	// Dots 1, 2, 3, 7 run down the left column, 4, 5, 6, 8 the right.
	order := [2][4]int{{0, 1, 2, 6}, {3, 4, 5, 7}}
	for x := range order {
		for y, d := range order[x] {
			var pd runes.PatternDots
			pd[d] = true
			b[x][y] = uint8(runes.BraillePatternFromPatternDots(pd) - runes.BrailleBlockOffset)
		}
	}
	return b
}()

// draw puts one series on the cells as one braille layer. Segments are
// clipped to the frame and points that are not finite are dropped, so a bad
// sample cannot make the line stepper walk a huge distance.
func (p *plot) draw(f frame, s series) {
	n := min(len(s.X), len(s.Y))
	if n == 0 {
		return
	}
	clear(p.dots)
	gw, gh := 2*p.cw, 4*p.ch
	var last canvas.Point
	have := false
	count := 0
	lastCell := canvas.Point{X: -1, Y: -1}
	put := func(q canvas.Point) {
		if have && q == last {
			return
		}
		last, have = q, true
		if s.Mark != 0 && s.Dotted { // dotted marks: every other cell passed
			if c := (canvas.Point{X: floorDiv(q.X, 2), Y: floorDiv(q.Y, 4)}); c != lastCell {
				lastCell = c
				count++
			}
			if count%2 == 0 && q.X >= 0 && q.X < gw && q.Y >= 0 && q.Y < gh {
				p.dots[(q.Y/4)*p.cw+q.X/2] |= brailleBit[q.X%2][q.Y%4]
			}
			return
		}
		if (!s.Dotted || count%3 == 0) && q.X >= 0 && q.X < gw && q.Y >= 0 && q.Y < gh {
			p.dots[(q.Y/4)*p.cw+q.X/2] |= brailleBit[q.X%2][q.Y%4]
		}
		count++
	}
	segs := n - 1
	if s.Closed {
		segs = n
	}
	if n == 1 {
		if x, y, ok := finite(s.X[0], s.Y[0]); ok && f.X.contains(x, x) && f.Y.contains(y, y) {
			gx, gy := p.dot(f, x, y)
			put(canvas.Point{X: gx, Y: gy})
		}
	}
	for i := 0; i < segs; i++ {
		j := (i + 1) % n
		x0, y0, ok0 := finite(s.X[i], s.Y[i])
		x1, y1, ok1 := finite(s.X[j], s.Y[j])
		if !ok0 || !ok1 {
			have = false
			continue
		}
		var in bool
		if x0, y0, x1, y1, in = clip(f, x0, y0, x1, y1); !in {
			have = false
			continue
		}
		ax, ay := p.dot(f, x0, y0)
		cx, cy := p.dot(f, x1, y1)
		a, c := canvas.Point{X: ax, Y: ay}, canvas.Point{X: cx, Y: cy}
		if a == c {
			put(a)
			continue
		}
		pts := graph.GetLinePoints(a, c)
		if len(pts) > 0 && pts[0] != a { // GetLinePoints may return the line from its other end
			for l, r := 0, len(pts)-1; l < r; l, r = l+1, r-1 {
				pts[l], pts[r] = pts[r], pts[l]
			}
		}
		for _, q := range pts {
			put(q)
		}
	}
	idx := p.pal.index(s.Style)
	for i, d := range p.dots {
		switch {
		case d == 0:
			continue
		case s.Mark != 0:
			p.cells[i] = s.Mark
		default:
			p.cells[i] = runes.CombineBraillePatterns(p.cells[i], runes.BrailleBlockOffset|rune(d))
		}
		p.sty[i] = idx
	}
}

// place writes a label at the first of its places where it covers nothing
// already drawn (else at the first), kept inside the drawing area.
func (p *plot) place(f frame, l label) {
	if _, _, ok := finite(l.X, l.Y); !ok || l.Text == "" || len(l.Text) > p.cw {
		return
	}
	col, row := p.cell(f, l.X, l.Y)
	at := l.At
	if len(at) == 0 {
		at = []offset{{}}
	}
	pos := func(o offset) (int, int) {
		return min(max(col+o.X, 0), p.cw-len(l.Text)), min(max(row+o.Y, 0), p.ch-1)
	}
	c, r := pos(at[0])
	for _, o := range at {
		cc, rr := pos(o)
		free := true
		for k := range len(l.Text) {
			if p.cells[rr*p.cw+cc+k] != 0 {
				free = false
				break
			}
		}
		if free {
			c, r = cc, rr
			break
		}
	}
	idx := p.pal.index(l.Style)
	for k, ch := range l.Text {
		p.cells[r*p.cw+c+k] = ch
		p.sty[r*p.cw+c+k] = idx
	}
}

// finite returns x, y and whether both are finite.
func finite(x, y float64) (float64, float64, bool) {
	return x, y, !(math.IsNaN(x) || math.IsNaN(y) || math.IsInf(x, 0) || math.IsInf(y, 0))
}

// clip cuts the segment (x0, y0)–(x1, y1) to the frame (Liang–Barsky); in is
// false when no part of it lies inside.
func clip(f frame, x0, y0, x1, y1 float64) (cx0, cy0, cx1, cy1 float64, in bool) {
	t0, t1 := 0.0, 1.0
	dx, dy := x1-x0, y1-y0
	edges := [4][2]float64{{-dx, x0 - f.X.Lo}, {dx, f.X.Hi - x0}, {-dy, y0 - f.Y.Lo}, {dy, f.Y.Hi - y0}}
	for _, e := range edges {
		pp, q := e[0], e[1]
		if pp == 0 {
			if q < 0 {
				return 0, 0, 0, 0, false
			}
			continue
		}
		r := q / pp
		if pp < 0 {
			if r > t1 {
				return 0, 0, 0, 0, false
			}
			t0 = math.Max(t0, r)
		} else {
			if r < t0 {
				return 0, 0, 0, 0, false
			}
			t1 = math.Min(t1, r)
		}
	}
	return x0 + t0*dx, y0 + t0*dy, x0 + t1*dx, y0 + t1*dy, true
}
