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
	closed   bool        // shown only for a closed circulation's beats
	group    deviceGroup // shown only for beats with these lesions or devices; 0 always
	spec     model.MetricSpec
	normal   model.NormalRange
	hasRange bool
}

// readoutKeys are the metrics of the panel, in groups: coupling, volumes,
// pressures and flow, the valve lesions and support devices on screen (only
// while there are some), energetics, and the rest of a closed circulation
// (last, so a small window cuts them first).
var readoutKeys = []struct {
	key      string
	decimals int
	closed   bool
	group    deviceGroup
}{
	{"ea_mmhg_per_ml", 2, false, 0}, {"ees_mmhg_per_ml", 2, false, 0}, {"ea_ees_ratio", 2, false, 0},
	{"sv_ml", 1, false, 0}, {"ef_pct", 1, false, 0}, {"edv_ml", 1, false, 0}, {"esv_ml", 1, false, 0},
	{"esp_mmhg", 1, false, 0}, {"edp_mmhg", 1, false, 0}, {"map_mmhg", 1, false, 0}, {"co_l_per_min", 2, false, 0},
	{"av_mean_gradient_mmhg", 1, false, groupLesion}, {"mv_mean_gradient_mmhg", 1, false, groupLesion},
	{"regurgitant_fraction_pct", 1, false, groupLesion}, {"forward_sv_ml", 1, false, groupLesion},
	{"pump_co_l_per_min", 2, false, groupPump}, {"total_co_l_per_min", 2, false, groupPump | groupLesion},
	{"av_open_ms", 0, false, groupPump},
	{"diastolic_augmentation_mmhg", 1, false, groupBalloon}, {"aortic_edp_mmhg", 1, false, groupBalloon},
	{"sw_mmhg_ml", 0, false, 0}, {"pva_mmhg_ml", 0, false, 0}, {"efficiency", 2, false, 0},
	{"lap_mean_mmhg", 1, true, 0}, {"cvp_mmhg", 1, true, 0}, {"pap_mean_mmhg", 1, true, 0},
}

// baseReadouts is the number of readouts shown whatever the devices.
func baseReadouts() int {
	n := 0
	for _, k := range readoutKeys {
		if k.group == 0 {
			n++
		}
	}
	return n
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
		rs = append(rs, readout{key: k.key, decimals: k.decimals, closed: k.closed, group: k.group, spec: spec, normal: nr, hasRange: has})
	}
	return rs
}

// readoutPanel shows every readout now, against its reference (the
// baseline, a recording or a run's start), and the change. Wide, it has
// columns now, unit, reference, Δ and %; narrow, it drops the reference
// column, except for a recording, where it drops % instead.
// Below the readouts it may carry an ESPVR fit section (see fitReadout).
type readoutPanel struct {
	s    *Styles
	rows []readout
	w, h int
	room int // lines the fit section may take below h
	wide bool

	cacheSrc readoutSource
	cache    string
}

// readoutSource is what the panel shows: one beat's metrics against a
// reference, with the headings of their columns, and maybe an ESPVR fit.
type readoutSource struct {
	now, base         *model.Metrics
	nowHead, baseHead string // "now" and "base", "beat" and "start", or "now" and "rec"
	// rec is the recording base comes from, nil when base is not a
	// recording's: narrow, the panel then shows the reference column (rec)
	// and Δ in place of Δ and %. It keeps the cache apart for every
	// recording opened.
	rec *recording
	fit fitReadout
	// groups are the lesion and device readouts to show (devices.go).
	groups deviceGroup
}

// deviceRows is the number of lesion and device readouts src shows.
func (p *readoutPanel) deviceRows(src readoutSource) int {
	n := 0
	for _, r := range p.rows {
		if r.group != 0 && r.group&src.groups != 0 {
			n++
		}
	}
	return n
}

// closed reports whether either beat of src is of a closed circulation
// (which has a central venous pressure), when the panel shows its rows.
func (src readoutSource) closed() bool {
	return src.now != nil && !math.IsNaN(src.now.CVP) || src.base != nil && !math.IsNaN(src.base.CVP)
}

// steadySource is the panel's usual source: the loop on screen against the
// recording's steady beat when a recording is overlaid (see reference),
// else against the baseline.
func steadySource(st *state) readoutSource {
	src := readoutSource{nowHead: "now", baseHead: refName(st), rec: st.rec, base: reference(st)}
	if st.shown != nil {
		src.now = &st.shown.Metrics
		src.groups = deviceGroups(&st.shown.Params)
	}
	if st.base != nil && st.rec == nil {
		src.groups |= deviceGroups(&st.base.Params)
	}
	return src
}

func newReadoutPanel(s *Styles) *readoutPanel {
	return &readoutPanel{s: s, rows: readouts()}
}

// readoutWideW is the width at which the panel shows the reference column.
const readoutWideW = 50

// SetSize sets the panel's size: h lines, and room more that a fit section
// may take.
func (p *readoutPanel) SetSize(w, h, room int) {
	if w != p.w || h != p.h || room != p.room {
		p.w, p.h, p.room, p.wide = w, h, room, w >= readoutWideW
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

// height is the number of lines Render returns for src.
func (p *readoutPanel) height(src readoutSource) int {
	if src.fit.shown {
		return p.h + min(p.room, fitLines)
	}
	return p.h
}

// Render draws the panel from src: exactly height(src) lines of width w. A
// fit section that does not fit below the readouts takes the place of the
// last ones (the energetics).
func (p *readoutPanel) Render(src readoutSource) string {
	if p.cache != "" && src == p.cacheSrc {
		return p.cache
	}
	s, c := p.s, p.cols(src.rec != nil)
	var lines []string
	// Narrow, where the top bar has no room for it, the heading names the
	// circulation on screen.
	title := "held"
	if src.closed() {
		title = "closed"
	}
	if p.wide {
		title = "Readout"
	}
	head := fmt.Sprintf(" %-*s%*s  %-*s", c.label, title, c.val, src.nowHead, c.unit, "unit")
	if c.base > 0 {
		head += fmt.Sprintf("%*s", c.base, src.baseHead)
	}
	head += fmt.Sprintf(" %*s", c.delta, "Δ")
	if c.pct > 0 {
		head += fmt.Sprintf(" %*s", c.pct, "%")
	}
	lines = append(lines, s.Heading.Render(padRight(head, p.w)))
	closed := src.closed()
	for _, r := range p.rows {
		if r.closed && !closed || r.group != 0 && r.group&src.groups == 0 {
			continue
		}
		lines = append(lines, p.row(r, src, c))
	}
	n := p.height(src)
	if src.fit.shown {
		fit := p.fitSection(src.fit, c)
		keep := max(min(len(lines), n-len(fit)), 1)
		lines = append(lines[:keep:keep], fit...)
	}
	for len(lines) < n {
		lines = append(lines, strings.Repeat(" ", p.w))
	}
	p.cache = strings.Join(lines[:n], "\n")
	p.cacheSrc = src
	return p.cache
}

// row renders one readout: value with its out-of-range cue (▲ above, ▼
// below the normal range), unit, baseline and change.
func (p *readoutPanel) row(r readout, src readoutSource, c columns) string {
	s := p.s
	now, base := math.NaN(), math.NaN()
	if src.now != nil {
		now = r.spec.Get(src.now)
	}
	if src.base != nil {
		base = r.spec.Get(src.base)
	}
	label := fmt.Sprintf(" %-*s", c.label, r.spec.Label)
	val := fmt.Sprintf("%*s", c.val, fmtNum(now, r.decimals))
	cue := " "
	if r.hasRange {
		// The value and its cue in one styled run: half the escapes.
		switch r.normal.Classify(now) {
		case 1:
			val, cue = s.OutHigh.Render(val+"▲"), ""
		case -1:
			val, cue = s.OutLow.Render(val+"▼"), ""
		}
	}
	dim := fmt.Sprintf("%-*s", c.unit, r.spec.Unit)
	if c.base > 0 {
		dim += fmt.Sprintf("%*s", c.base, fmtNum(base, r.decimals))
	}
	return padRight(label+val+cue+" "+s.Dim.Render(dim)+p.change(now, base, r.decimals, c), p.w)
}

// change is the Δ and % columns of a value against its reference.
func (p *readoutPanel) change(now, base float64, decimals int, c columns) string {
	d, pct := model.Change(now, base)
	ps := fmtPct(pct)
	out := fmt.Sprintf(" %*s", c.delta, fmtDeltaBeside(d, decimals, c.delta, ps != "0"))
	if c.pct > 0 { // narrow with a recording: no % column
		out += fmt.Sprintf(" %*s", c.pct, ps)
	}
	return out
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

// fmtDeltaBeside writes a change in at most width cells beside a
// percentage that is not zero (nonzero): where the display decimals round the
// change to 0, it takes up to two more decimals, as the width allows, so
// that Δ and % agree (Ea 1.330 → 1.326 is "-0.004", not "0", beside
// "-0.3%"); where even those round to 0, it keeps the sign ("-0.00").
func fmtDeltaBeside(d float64, decimals, width int, nonzero bool) string {
	s := fmtDelta(d, decimals)
	if s != "0" || !nonzero || d == 0 || math.IsNaN(d) {
		return s
	}
	for more := decimals + 1; more <= decimals+2; more++ {
		if t := fmtDelta(d, more); t != "0" && len(t) <= width {
			return t
		}
	}
	sign := "+"
	if d < 0 {
		sign = "-"
	}
	return sign + strconv.FormatFloat(0, 'f', decimals, 64)
}

// fmtPct writes a percentage change with its sign and one decimal.
func fmtPct(p float64) string {
	s := fmtDelta(p, 1)
	if s == "—" || s == "0" {
		return s
	}
	return s + "%"
}
