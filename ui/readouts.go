package ui

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"pvcouple/model"
)

// readout is one row of the readout panel: a metric and the decimals it is
// shown with.
type readout struct {
	key      string
	decimals int
	spec     model.MetricSpec
	normal   model.NormalRange
	hasRange bool
}

// readoutKeys are the metrics of the panel, in groups: coupling, volumes,
// pressures and flow, energetics.
var readoutKeys = []struct {
	key      string
	decimals int
}{
	{"ea_mmhg_per_ml", 2}, {"ees_mmhg_per_ml", 2}, {"ea_ees_ratio", 2},
	{"sv_ml", 1}, {"ef_pct", 1}, {"edv_ml", 1}, {"esv_ml", 1},
	{"esp_mmhg", 1}, {"edp_mmhg", 1}, {"map_mmhg", 1}, {"co_l_per_min", 2},
	{"sw_mmhg_ml", 0}, {"pva_mmhg_ml", 0}, {"efficiency", 2},
}

// readouts returns the panel's rows.
func readouts() []readout {
	rs := make([]readout, 0, len(readoutKeys))
	for _, k := range readoutKeys {
		spec, ok := model.MetricByKey(k.key)
		if !ok {
			panic("ui: readout " + k.key + " names no metric") // a programming error, caught by the tests
		}
		nr, has := model.NormalRangeOf(k.key)
		rs = append(rs, readout{key: k.key, decimals: k.decimals, spec: spec, normal: nr, hasRange: has})
	}
	return rs
}

// readoutPanel shows every readout now, at baseline, and the change. Wide,
// it has columns now, unit, base, Δ and %; narrow, it drops the base column.
type readoutPanel struct {
	s    *Styles
	rows []readout
	w, h int
	wide bool

	cacheShown, cacheBase *model.Steady
	cacheRec              *recording
	cache                 string
}

func newReadoutPanel(s *Styles) *readoutPanel {
	return &readoutPanel{s: s, rows: readouts()}
}

// readoutWideW is the width at which the panel shows the base column.
const readoutWideW = 50

// SetSize sets the panel's size.
func (p *readoutPanel) SetSize(w, h int) {
	if w != p.w || h != p.h {
		p.w, p.h, p.wide = w, h, w >= readoutWideW
		p.cache = ""
	}
}

// columns are the widths of the panel's columns.
type columns struct{ label, val, unit, base, delta, pct int }

// cols returns the column widths: wide with a base column, narrow without;
// with a recording, narrow has a rec column in place of %.
func (p *readoutPanel) cols(rec bool) columns {
	if !p.wide && rec {
		return columns{label: 6, val: 7, unit: 7, base: 7, delta: 6}
	}
	if p.wide {
		return columns{label: 7, val: 8, unit: 8, base: 8, delta: 7, pct: 7}
	}
	return columns{label: 6, val: 7, unit: 7, delta: 6, pct: 7}
}

// Render draws the panel from the loop on screen and the baseline: exactly h
// lines of width w.
func (p *readoutPanel) Render(st *state) string {
	if p.cache != "" && st.shown == p.cacheShown && st.base == p.cacheBase && st.rec == p.cacheRec {
		return p.cache
	}
	s, c := p.s, p.cols(st.rec != nil)
	var lines []string
	title := ""
	if p.wide {
		title = "Readout"
	}
	head := fmt.Sprintf(" %-*s%*s  %-*s", c.label, title, c.val, "now", c.unit, "unit")
	if c.base > 0 {
		head += fmt.Sprintf("%*s", c.base, refName(st))
	}
	head += fmt.Sprintf(" %*s", c.delta, "Δ")
	if c.pct > 0 {
		head += fmt.Sprintf(" %*s", c.pct, "%")
	}
	lines = append(lines, s.Heading.Render(padRight(head, p.w)))
	for _, r := range p.rows {
		lines = append(lines, p.row(r, st, c))
	}
	for len(lines) < p.h {
		lines = append(lines, strings.Repeat(" ", p.w))
	}
	p.cache = strings.Join(lines[:p.h], "\n")
	p.cacheShown, p.cacheBase, p.cacheRec = st.shown, st.base, st.rec
	return p.cache
}

// row renders one readout: value with its out-of-range cue (▲ above, ▼
// below the normal range), unit, baseline and change.
func (p *readoutPanel) row(r readout, st *state, c columns) string {
	s := p.s
	now, base := math.NaN(), math.NaN()
	if st.shown != nil {
		now = r.spec.Get(&st.shown.Metrics)
	}
	if ref := reference(st); ref != nil {
		base = r.spec.Get(ref)
	}
	label := fmt.Sprintf(" %-*s", c.label, r.spec.Label)
	val := fmt.Sprintf("%*s", c.val, fmtNum(now, r.decimals))
	cue := " "
	if r.hasRange {
		switch r.normal.Classify(now) {
		case 1:
			val, cue = s.OutHigh.Render(val), s.OutHigh.Render("▲")
		case -1:
			val, cue = s.OutLow.Render(val), s.OutLow.Render("▼")
		}
	}
	dim := fmt.Sprintf("%-*s", c.unit, r.spec.Unit)
	if c.base > 0 {
		dim += fmt.Sprintf("%*s", c.base, fmtNum(base, r.decimals))
	}
	line := label + val + cue + " " + s.Dim.Render(dim)
	d, pct := model.Change(now, base)
	line += fmt.Sprintf(" %*s", c.delta, fmtDelta(d, r.decimals))
	if c.pct > 0 {
		line += fmt.Sprintf(" %*s", c.pct, fmtPct(pct))
	}
	return padRight(line, p.w)
}

// fmtNum writes v with the given decimals, "—" when it is not a number.
func fmtNum(v float64, decimals int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	s := strconv.FormatFloat(v, 'f', decimals, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-") // no "-0.0"
	}
	return s
}

// fmtDelta writes a change with its sign; no change is "0".
func fmtDelta(d float64, decimals int) string {
	s := fmtNum(d, decimals)
	if s == "—" {
		return s
	}
	if strings.Trim(s, "0.") == "" {
		return "0"
	}
	if d > 0 {
		s = "+" + s
	}
	return s
}

// fmtPct writes a percentage change with its sign and one decimal.
func fmtPct(p float64) string {
	s := fmtDelta(p, 1)
	if s == "—" || s == "0" {
		return s
	}
	return s + "%"
}
