package ui

import (
	"fmt"
	"strconv"
	"strings"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"
	"github.com/muesli/termenv"

	"pvcouple/internal/safetext"
	"pvcouple/model"
	"pvcouple/presets"
)

// playView plays a protocol back beat by beat: above, the protocol, the
// beat, its step and time, and the levers the protocol moves; below, the
// pressure–volume plane with the loops so far as a family (the beat on
// screen solid, those before it dotted), their end-systolic points, the
// model's ESPVR of the beat (dotted) and the ESPVR fitted to the points
// (solid). The readout panel beside it shows the beat against the run's
// starting steady beat, and the fit against the model's Ees and V0.
//
// The run and the controls live here; the root drives them (see play.go).
// The axes fit the starting loop and grow only outward as beats arrive, so
// the picture holds still through a run.
type playView struct {
	s    *Styles
	plot *plot
	w, h int
	f    frame
	// fixed is set while f holds for the run; fitted is the run it was
	// fitted for.
	fixed  bool
	fitted *playRun

	run     *playRun // nil before a protocol is picked and after a stop
	cur     int      // index of the beat on screen
	playing bool
	speed   int               // index in playSpeeds
	seq     int               // tick chain: a tick of an older chain is stale
	last    *presets.Protocol // the protocol last stopped, for Space

	// The plot of the last render, reused while run, beat and axes stay.
	cacheRun *playRun
	cacheCur int
	cacheF   frame
	cache    string
	intro    string // the text shown without a run, for this size
	// introCirc is the circulation the intro counts beats for.
	introCirc model.Circulation

	// The loops before the beat on screen, drawn once: playing on adds one
	// loop a beat rather than drawing them all again.
	family    layer
	familyRun *playRun
}

func newPlayView(s *Styles) *playView {
	return &playView{s: s, plot: newPlot(s, "V mL", "P mmHg"), speed: defaultSpeed}
}

// playSpeed is a playback speed: a factor of real time (each beat shows for
// its own period divided by it), or 0 for as fast as beats compute.
type playSpeed struct {
	name, short string
	factor      float64
}

// playSpeeds are the speeds + and - step through.
var playSpeeds = []playSpeed{
	{"¼× real time", "¼×", 0.25},
	{"½× real time", "½×", 0.5},
	{"real time", "1×", 1},
	{"2× real time", "2×", 2},
	{"5× real time", "5×", 5},
	{"as fast as it computes", "max", 0},
}

// defaultSpeed is real time.
const defaultSpeed = 2

// Name implements view.
func (v *playView) Name() string { return "Protocol" }

// SetSize implements view.
func (v *playView) SetSize(w, h int) {
	if w == v.w && h == v.h {
		return
	}
	v.w, v.h = w, h
	v.plot.SetSize(w, h-headerLines)
	earlier := "━ earlier"
	if v.s.Renderer().ColorProfile() == termenv.Ascii {
		earlier = "┄ earlier" // drawn dotted without colour
	}
	legend := v.s.Loop.Render("━ this beat") + "  " + v.s.Baseline.Render(earlier) + "  " +
		v.s.Fit.Render("o end-systole  ━ fit") + "  " + v.s.ESPVR.Render("┄ model ESPVR")
	if w < 66 {
		legend = v.s.Loop.Render("━ beat") + " " + v.s.Baseline.Render(earlier) + " " + v.s.Fit.Render("o ES ━ fit")
	}
	v.plot.legend = legend
	v.fixed, v.cache, v.intro = false, "", ""
}

// headerLines is the height of the text above the plot.
const headerLines = 3

// Update implements view: the root handles the view's messages itself.
func (v *playView) Update(tea.Msg, *state) tea.Cmd { return nil }

// Refit implements view.
func (v *playView) Refit() { v.fixed, v.cache = false, "" }

// setRun puts a new run on screen at its first beat, playing.
func (v *playView) setRun(r *playRun) {
	v.run, v.cur, v.playing = r, 0, true
	v.seq++
	v.fixed, v.cache = false, ""
}

// pause stops the tick chain; a tick already on its way finds it stale.
func (v *playView) pause() {
	v.playing = false
	v.seq++
}

// atEnd reports whether the beat on screen is the run's last.
func (v *playView) atEnd() bool {
	return v.run != nil && v.run.done() && v.cur == len(v.run.beats)-1
}

// beat is the beat on screen.
func (v *playView) beat() *model.RunBeat { return v.run.beats[v.cur] }

// readouts gives the readout panel the beat on screen against the run's
// starting steady beat, with the ESPVR fit so far.
func (v *playView) readouts(*state) (readoutSource, bool) {
	if v.run == nil {
		return readoutSource{}, false
	}
	return readoutSource{now: &v.beat().Metrics, base: &v.run.start.Metrics, nowHead: "beat", baseHead: "start",
		fit: v.run.fitReadout(v.cur), groups: v.run.groups}, true
}

// Render implements view.
func (v *playView) Render(st *state) string {
	if v.run == nil {
		if v.intro == "" || v.introCirc != st.target.Circulation {
			v.intro, v.introCirc = v.renderIntro(st.target.Circulation), st.target.Circulation
		}
		return v.intro
	}
	v.fitAxes()
	head := v.header()
	if v.cache == "" || v.cacheRun != v.run || v.cacheCur != v.cur || v.cacheF != v.f {
		v.cache = v.renderPlot()
		v.cacheRun, v.cacheCur, v.cacheF = v.run, v.cur, v.f
	}
	return strings.Join(head, "\n") + "\n" + v.cache
}

// fitAxes fits the axes to the run's loops so far, and after that grows
// them only outward, when a beat leaves them.
func (v *playView) fitAxes() {
	r := v.run
	b := r.box
	if v.fixed && v.fitted == r && v.f.holds(b) {
		return
	}
	if v.fixed && v.fitted == r {
		b.addPoint(v.f.X.Lo, v.f.Y.Lo) // grow only outward
		b.addPoint(v.f.X.Hi, v.f.Y.Hi)
	}
	nx, ny := tickCounts(v.plot.w, v.plot.h)
	v.f = fitFrame(b, nx, ny, pvHeadroom)
	v.fixed, v.fitted = true, r
}

// header is the text above the plot: the protocol and whether it plays;
// the beat, its step and time; the levers the protocol moves at this beat.
func (v *playView) header() []string {
	r, b := v.run, v.beat()
	lines := []string{
		spread(v.s, safetext.Line(r.pr.Name), v.stateText(v.w >= 60), v.w),
		fmt.Sprintf("beat %d of %d · %s · t %s s", b.Index+1, r.total(), safetext.Line(r.plan.Label(b.Index)), fmtNum(b.TStart, 2)),
		"",
	}
	// The levers as fully as they fit: full names, short names, no units,
	// values only.
	for level := range 4 {
		if lines[2] = v.leverText(level); lipgloss.Width(lines[2]) <= v.w {
			break
		}
	}
	for i, l := range lines {
		lines[i] = padRight(ansi.Truncate(l, v.w, "…"), v.w)
	}
	return lines
}

// spread puts left at the left of a line of width w and the styled right at
// its right, cutting left short if need be.
func spread(s *Styles, left, right string, w int) string {
	rw := lipgloss.Width(right)
	left = ansi.Truncate(s.Heading.Render(left), max(w-rw-2, 0), "…")
	return left + strings.Repeat(" ", max(w-lipgloss.Width(left)-rw, 1)) + right
}

// stateText says whether the run plays, and how fast.
func (v *playView) stateText(long bool) string {
	sp := playSpeeds[v.speed]
	switch {
	case v.playing && long:
		return v.s.Selected.Render("▶ playing, " + sp.name)
	case v.playing:
		return v.s.Selected.Render("▶ " + sp.short)
	case v.atEnd() && v.run.err != nil:
		return v.s.Error.Render("stopped: a beat failed")
	case v.atEnd():
		return v.s.Dim.Render("end of run")
	case long:
		return v.s.Dim.Render("paused · " + sp.name)
	}
	return v.s.Dim.Render("paused")
}

// leverText lists the levers the protocol moves, at this beat and at the
// start of the run, in one of four levels of detail: 0 with the levers'
// full names and units, 1 with short names, 2 without units, 3 without the
// start. A protocol that moves none is described instead.
func (v *playView) leverText(level int) string {
	r := v.run
	keys := r.pr.Levers(r.plan.Initial.Circulation)
	if len(keys) == 0 {
		return v.s.Dim.Render(r.pr.Description)
	}
	p, p0 := r.plan.Params[v.cur], r.plan.Initial
	var parts []string
	for _, k := range keys {
		spec, _ := model.SpecByKey(k)
		name, dec := spec.Name, -1
		for _, l := range model.Levers {
			if l.Key == k {
				name, dec = l.Short, l.Decimals+1
				if level == 0 {
					name = l.Name
				}
			}
		}
		now, start := fmtLever(spec.Get(p), dec), fmtLever(spec.Get(p0), dec)
		switch level {
		case 0, 1:
			parts = append(parts, name+" "+now+" "+spec.Unit+v.s.Dim.Render(" (from "+start+")"))
		case 2:
			parts = append(parts, name+" "+now+v.s.Dim.Render(" ("+start+")"))
		default:
			parts = append(parts, name+" "+now)
		}
	}
	return strings.Join(parts, v.s.Dim.Render(" · "))
}

// fmtLever writes a lever's value with dec decimals (−1: as few as needed),
// without trailing zeros.
func fmtLever(x float64, dec int) string {
	if dec < 0 {
		return strconv.FormatFloat(x, 'g', 4, 64)
	}
	s := fmtNum(x, dec)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	return s
}

// renderPlot draws the family of loops up to the beat on screen.
func (v *playView) renderPlot() string {
	r, s := v.run, v.s
	p := r.plan.Params[v.cur]
	top := v.f.Y.Hi
	model := series{X: []float64{p.V0, p.V0 + top/p.Ees}, Y: []float64{0, top}, Dotted: true, Style: s.ESPVR}
	// Earlier loops are grey; without colour they are dotted, so the beat
	// on screen stands out as the one solid loop. They are kept drawn on a
	// layer that grows a loop a beat; stepping back draws it anew.
	fam := &v.family
	if v.familyRun != r || !v.plot.fits(fam, v.f) || fam.n > v.cur {
		*fam, v.familyRun = layer{}, r
	}
	dotted := s.Renderer().ColorProfile() == termenv.Ascii
	var earlier []series
	for i := fam.n; i < v.cur; i++ {
		b := r.beats[i]
		earlier = append(earlier, series{X: b.VLV, Y: b.PLV, Closed: true, Dotted: dotted, Style: s.Baseline})
	}
	v.plot.drawLayer(fam, v.f, earlier)
	fam.n = v.cur
	b := v.beat()
	ss := []series{model, {X: b.VLV, Y: b.PLV, Closed: true, Style: s.Loop}}
	var ls []label
	fr := r.fitReadout(v.cur)
	if fr.ok {
		fit := series{X: []float64{fr.v0, fr.v0 + top/fr.ees}, Y: []float64{0, top}, Style: s.Fit}
		ss = append(ss, fit)
		// The points the line was fitted to, the beat on screen's last.
		pts := r.fit.Points
		for i, q := range pts {
			st := s.Fit
			if i == len(pts)-1 {
				st = s.Loop
			}
			ls = append(ls, label{X: q.V, Y: q.P, Text: "o", Style: st})
		}
		ls = append(ls, endLabel(v.f, fit, "fit", s.Fit))
	} else {
		for i := 0; i <= v.cur; i++ {
			m := r.beats[i].Metrics
			st := s.Baseline
			if i == v.cur {
				st = s.Loop
			}
			ls = append(ls, label{X: m.ESV, Y: m.ESP, Text: "o", Style: st})
		}
	}
	ls = append(ls, endLabel(v.f, model, "ESPVR", s.ESPVR))
	return v.plot.RenderOn(fam, v.f, ss, ls)
}

// renderIntro is the view before a protocol is picked: what it does, the
// built-in protocols and how to play one.
func (v *playView) renderIntro(circ model.Circulation) string {
	s := v.s
	wrap := func(t string) []string { return strings.Split(ansi.Wrap(t, v.w-2, " "), "\n") }
	hint := "P picks a protocol to play from the levers now (or a file of your own)."
	if v.last != nil {
		hint = "Space plays " + v.last.Name + " again from the levers now; P picks another."
	}
	lines := []string{s.Heading.Render(" Protocol playback")}
	for _, l := range wrap(hint) {
		lines = append(lines, " "+s.Key.Render(l))
	}
	lines = append(lines, "")
	names := presets.ProtocolNames()
	width := 20
	for _, n := range names {
		width = max(width, len(n)+1)
	}
	for _, n := range names {
		pr, err := presets.GetProtocol(n)
		if err != nil {
			continue
		}
		lines = append(lines, fmt.Sprintf("  %-*s", width, n)+s.Dim.Render(fmt.Sprintf("%3d beats", pr.TotalBeats(circ))))
	}
	lines = append(lines, "")
	for _, l := range wrap("A protocol changes the levers beat by beat. Its loops are drawn as a family " +
		"with their end-systolic points and, when the protocol leaves Ees and V0 alone, the ESPVR fitted to them.") {
		lines = append(lines, " "+s.Dim.Render(l))
	}
	for i := range lines {
		lines[i] = padRight(ansi.Truncate(lines[i], v.w, "…"), v.w)
	}
	for len(lines) < v.h {
		lines = append(lines, strings.Repeat(" ", v.w))
	}
	return strings.Join(lines[:v.h], "\n")
}
