package ui

import (
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/muesli/termenv"

	"pvcouple/presets"
)

// ticker holds the ticks the explorer asks for, so a test hands them over
// one at a time instead of waiting for them.
type ticker struct {
	m       *Model
	pending []playTickMsg
	delays  []time.Duration
}

// withTicker makes m record its ticks.
func withTicker(m *Model) *ticker {
	tk := &ticker{m: m}
	m.after = func(d time.Duration, msg tea.Msg) tea.Cmd {
		tk.pending = append(tk.pending, msg.(playTickMsg))
		tk.delays = append(tk.delays, d)
		return nil
	}
	return tk
}

// last is the tick asked for last.
func (tk *ticker) last(t *testing.T) playTickMsg {
	t.Helper()
	if len(tk.pending) == 0 {
		t.Fatal("no tick was asked for")
	}
	return tk.pending[len(tk.pending)-1]
}

// run hands over the latest tick n times (each asks for the next).
func (tk *ticker) run(t *testing.T, n int) {
	t.Helper()
	for range n {
		press(tk.m, tk.last(t))
	}
}

// playing returns the explorer at w × h without colour, playing the
// built-in protocol name from the preset's levers, with its first beat on
// screen and the ticks recorded.
func playing(t *testing.T, preset, name string, w, h int) (*Model, *ticker) {
	t.Helper()
	m := newTestModel(t, preset, termenv.Ascii)
	tk := withTicker(m)
	press(m, tea.WindowSizeMsg{Width: w, Height: h})
	pickProtocol(t, m, name)
	return m, tk
}

// pickProtocol opens the protocol list and picks name.
func pickProtocol(t *testing.T, m *Model, name string) {
	t.Helper()
	keys(m, "P")
	if m.mode != modeProtocols {
		t.Fatal("P did not open the protocol list")
	}
	for m.picker.names[m.picker.sel] != name {
		keys(m, "down")
	}
	keys(m, "enter")
	if m.play.run == nil || m.play.run.pr.Name != name {
		t.Fatalf("%s is not playing: %q", name, m.status)
	}
}

func TestProtocolPicker(t *testing.T) {
	m := sized(t, "normal")
	withTicker(m)
	keys(m, "P")
	screen := m.View()
	for _, n := range presets.ProtocolNames() {
		if !strings.Contains(screen, n) {
			t.Errorf("the list lacks %s", n)
		}
	}
	if !strings.Contains(screen, protocolFileItem) {
		t.Error("the list lacks the file entry")
	}
	for _, k := range []string{"esc", "P", "q"} {
		if keys(m, k) || m.mode != modeMain || m.play.run != nil || m.status != "No protocol picked." {
			t.Errorf("%s: did not close the list unchanged (%q)", k, m.status)
		}
		keys(m, "P")
	}
	keys(m, "up") // from the first to the file entry
	if m.picker.names[m.picker.sel] != protocolFileItem {
		t.Errorf("up from the top went to %q", m.picker.names[m.picker.sel])
	}
	keys(m, "j", "k", "tab", "shift+tab")
	if m.picker.names[m.picker.sel] != protocolFileItem {
		t.Errorf("moving down and up again went to %q", m.picker.names[m.picker.sel])
	}
	if !keys(m, "ctrl+c") {
		t.Error("ctrl+c did not quit from the list")
	}
}

func TestPlayStartsOnItsView(t *testing.T) {
	m, tk := playing(t, "normal", "preload-reduction", 120, 40)
	v := m.play
	if m.views[m.cur] != view(v) || !v.playing || v.cur != 0 || len(v.run.beats) != 1 {
		t.Fatalf("view %d, playing %v, beat %d of %d computed", m.cur, v.playing, v.cur, len(v.run.beats))
	}
	// Real time: the first beat shows for its period.
	if d := tk.delays[0]; math.Abs(d.Seconds()-v.beat().Period) > 1e-6 {
		t.Errorf("first tick after %v, want the beat period %g s", d, v.beat().Period)
	}
	tk.run(t, 4)
	if v.cur != 4 || len(v.run.beats) != 5 {
		t.Errorf("after 4 ticks: beat %d, %d computed", v.cur+1, len(v.run.beats))
	}
	screen := m.View()
	for _, w := range []string{"preload-reduction", "beat 5 of 25 · baseline · t 3.43 s", "Caval occlusion 0 % (from 0)",
		"▶ playing, real time", "Readout    beat", "start", "ESPVR fit"} {
		if !strings.Contains(screen, w) {
			t.Errorf("screen lacks %q:\n%s", w, screen)
		}
	}
	// Five identical baseline loops: the fit is refused, and says why.
	if !strings.Contains(screen, "Not fitted yet") || !strings.Contains(screen, "preload did not change") {
		t.Errorf("no reason for the missing fit:\n%s", screen)
	}
}

func TestPlayPauseStepSpeed(t *testing.T) {
	m, tk := playing(t, "normal", "preload-reduction", 120, 40)
	v := m.play
	keys(m, " ")
	if v.playing || !strings.Contains(m.status, "Paused at beat 1 of 25") {
		t.Fatalf("space did not pause: %q", m.status)
	}
	stale := tk.last(t)
	press(m, stale)
	if v.cur != 0 {
		t.Error("a tick of the chain before the pause moved the beat")
	}
	keys(m, ".", ".", ".")
	if v.cur != 3 || len(v.run.beats) != 4 || v.playing {
		t.Errorf(". three times: beat %d, %d computed, playing %v", v.cur+1, len(v.run.beats), v.playing)
	}
	keys(m, ",", ",")
	if v.cur != 1 || len(v.run.beats) != 4 || !strings.Contains(m.status, "Beat 2 of 25") {
		t.Errorf(", twice: beat %d, %d computed (%q)", v.cur+1, len(v.run.beats), m.status)
	}
	keys(m, ",", ",")
	if v.cur != 0 || !m.statusErr || !strings.Contains(m.status, "first beat") {
		t.Errorf(", past the first beat: beat %d, %q", v.cur+1, m.status)
	}
	keys(m, ".") // shows beat 2 again, computed before
	if v.cur != 1 || len(v.run.beats) != 4 {
		t.Errorf("stepping over computed beats: beat %d, %d computed", v.cur+1, len(v.run.beats))
	}
	// Speeds: + and = faster, - slower, stopping at the ends.
	keys(m, "+")
	if v.speed != defaultSpeed+1 || m.status != "Speed: 2× real time." {
		t.Errorf("+: speed %d, %q", v.speed, m.status)
	}
	keys(m, "=", "=", "=")
	if v.speed != len(playSpeeds)-1 || !m.statusErr || !strings.Contains(m.status, "highest") {
		t.Errorf("= past the top: speed %d, %q", v.speed, m.status)
	}
	for range len(playSpeeds) + 1 {
		keys(m, "-")
	}
	if v.speed != 0 || !strings.Contains(m.status, "lowest") {
		t.Errorf("- past the bottom: speed %d, %q", v.speed, m.status)
	}
	// Space plays on at ¼ real time: the beat shows for four periods.
	n := len(tk.pending)
	keys(m, " ")
	if !v.playing || len(tk.pending) != n+1 || math.Abs(tk.delays[n].Seconds()-4*v.beat().Period) > 1e-6 {
		t.Fatalf("space did not play on at ¼×: %v", tk.delays[n:])
	}
	tk.run(t, 2)
	if v.cur != 3 {
		t.Errorf("two ticks from beat 2: beat %d", v.cur+1)
	}
	// A change of speed while playing starts a new chain: the old tick is stale.
	old := tk.last(t)
	keys(m, "-")
	keys(m, "+")
	press(m, old)
	if v.cur != 3 {
		t.Errorf("a tick timed for the old speed moved the beat to %d", v.cur+1)
	}
	tk.run(t, 1)
	if v.cur != 4 {
		t.Errorf("the new chain's tick: beat %d, want 5", v.cur+1)
	}
}

func TestPlayRestartStop(t *testing.T) {
	m, tk := playing(t, "normal", "afterload-challenge", 120, 40)
	v := m.play
	tk.run(t, 6)
	first := v.run
	keys(m, "up") // filling pressure 9: R replays from the levers now
	keys(m, "R")
	if v.run == first || v.cur != 0 || !v.playing || v.run.plan.Initial.FillingPressure != 9 {
		t.Fatalf("R: same run %v, beat %d, from %g mmHg", v.run == first, v.cur+1, v.run.plan.Initial.FillingPressure)
	}
	keys(m, "x")
	if v.run != nil || v.playing || !strings.Contains(m.status, "Stopped afterload-challenge at beat 1 of 25") {
		t.Fatalf("x: %q", m.status)
	}
	if !strings.Contains(m.View(), "Space plays afterload-challenge again") {
		t.Error("after a stop the view does not offer to play again")
	}
	keys(m, "x")
	if !m.statusErr || !strings.Contains(m.status, "No protocol is playing") {
		t.Errorf("x with nothing playing: %q", m.status)
	}
	keys(m, ".")
	if v.run != nil || !strings.Contains(m.status, "No protocol is playing") {
		t.Errorf(". with nothing playing: %q", m.status)
	}
	keys(m, " ")
	if v.run == nil || v.run.pr.Name != "afterload-challenge" || !v.playing {
		t.Fatal("space after a stop did not play the protocol again")
	}
	keys(m, "x", "R")
	if v.run == nil || !v.playing {
		t.Fatal("R after a stop did not play the protocol again")
	}
}

func TestPlayToTheEnd(t *testing.T) {
	m, tk := playing(t, "normal", "rate-steps", 120, 40)
	v := m.play
	tk.run(t, 44)
	if v.cur != 44 || v.playing || !v.atEnd() {
		t.Fatalf("after 44 ticks: beat %d, playing %v", v.cur+1, v.playing)
	}
	if !strings.Contains(m.status, "End of rate-steps, 45 beats") || !strings.Contains(m.View(), "end of run") {
		t.Errorf("end not said: %q", m.status)
	}
	n := len(tk.pending)
	keys(m, ".")
	if v.cur != 44 || len(tk.pending) != n || !strings.Contains(m.status, "End of rate-steps") {
		t.Errorf(". at the end: beat %d, %q", v.cur+1, m.status)
	}
	keys(m, " ") // plays the computed beats again from the first
	if v.cur != 0 || !v.playing || len(v.run.beats) != 45 {
		t.Errorf("space at the end: beat %d, playing %v", v.cur+1, v.playing)
	}
}

// Playing preload-reduction to the end recovers the model's Ees from the
// end-systolic points of the loops, as the iterated maximal-elastance
// method does in a pure elastance model (docs/science.md §6): the fitted Ees on
// screen is within 3 % of the model's, on two scenarios with different Ees.
func TestPreloadReductionFitsEesOnScreen(t *testing.T) {
	for _, preset := range []string{"normal", "hfref"} {
		m, tk := playing(t, preset, "preload-reduction", 120, 40)
		tk.run(t, 24)
		screen := m.View()
		fit := fitRow(t, screen)
		sc, _ := presets.Get(preset)
		model := sc.Params.Ees
		got, err1 := strconv.ParseFloat(fit[1], 64)
		shown, err2 := strconv.ParseFloat(fit[3], 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("%s: fit row %q", preset, fit)
		}
		if shown != model {
			t.Errorf("%s: model Ees on screen %g, the scenario's %g", preset, shown, model)
		}
		if math.Abs(got-model)/model > 0.03 {
			t.Errorf("%s: fitted Ees %g on screen, model %g: more than 3 %% apart", preset, got, model)
		}
		if !strings.Contains(m.status, "fitted Ees "+fit[1]) {
			t.Errorf("%s: end of run does not state the fit: %q", preset, m.status)
		}
	}
}

// fitRow returns the fields of the Ees row under the ESPVR fit heading.
func fitRow(t *testing.T, screen string) []string {
	t.Helper()
	lines := strings.Split(screen, "\n")
	for i, l := range lines {
		if strings.Contains(l, " ESPVR ") && strings.Contains(l, "fit") && strings.Contains(l, "model") && i+1 < len(lines) {
			next := lines[i+1]
			if j := strings.Index(next, " Ees "); j >= 0 {
				return strings.Fields(next[j:])
			}
		}
	}
	t.Fatalf("no ESPVR fit on screen:\n%s", screen)
	return nil
}

// Picking another protocol mid-run discards the old run: its ticks, still on
// their way, change nothing.
func TestSwitchingProtocolDiscardsOldTicks(t *testing.T) {
	m, tk := playing(t, "normal", "preload-reduction", 120, 40)
	tk.run(t, 3)
	oldTick := tk.last(t)
	oldRun := m.play.run
	pickProtocol(t, m, "volume-challenge")
	v := m.play
	if v.run == oldRun || v.run.id == oldTick.run {
		t.Fatal("the new run has the old run's id")
	}
	for range 5 {
		press(m, oldTick)
	}
	if v.cur != 0 || len(v.run.beats) != 1 || len(oldRun.beats) != 4 {
		t.Errorf("the old run's ticks moved something: beat %d, %d computed; old run %d computed",
			v.cur+1, len(v.run.beats), len(oldRun.beats))
	}
	if !strings.Contains(m.View(), "volume-challenge") {
		t.Error("the new protocol is not on screen")
	}
	tk.run(t, 1)
	if v.cur != 1 {
		t.Errorf("the new run's tick: beat %d, want 2", v.cur+1)
	}
}

// Leaving the view pauses the run, and its tick on the way does nothing;
// coming back, the beat is where it was.
func TestLeavingViewPauses(t *testing.T) {
	m, tk := playing(t, "normal", "preload-reduction", 120, 40)
	tk.run(t, 2)
	pending := tk.last(t)
	keys(m, "1")
	v := m.play
	if v.playing || !strings.Contains(m.status, "preload-reduction paused at beat 3 of 25") {
		t.Fatalf("leaving: playing %v, %q", v.playing, m.status)
	}
	press(m, pending)
	if v.cur != 2 {
		t.Errorf("a tick after leaving moved the beat to %d", v.cur+1)
	}
	keys(m, "3")
	if v.cur != 2 || !strings.Contains(m.View(), "beat 3 of 25") {
		t.Error("coming back, the beat moved")
	}
	// Playback keys elsewhere say where they act and do nothing.
	keys(m, "2")
	for _, k := range []string{" ", ".", ",", "R"} {
		before := v.cur
		keys(m, k)
		if !m.statusErr || !strings.Contains(m.status, "acts on protocols in view 3") || v.cur != before || v.run == nil {
			t.Errorf("%q in view 2: %q", k, m.status)
		}
	}
	// x is the map's outside the protocol view: it stops nothing.
	if keys(m, "x"); v.run == nil || !strings.Contains(m.status, "coupling map shows: view 4") {
		t.Errorf("x in view 2: run %v, %q", v.run, m.status)
	}
	if keys(m, " "); !strings.HasPrefix(m.status, "Space acts") {
		t.Errorf("the hint does not name the key: %q", m.status)
	}
}

// A protocol that would take a lever out of its range, and bad files,
// change nothing and say file:line:key.
func TestPlayErrorsChangeNothing(t *testing.T) {
	m, tk := playing(t, "normal", "preload-reduction", 120, 40)
	tk.run(t, 2)
	run, cur := m.play.run, m.play.cur
	keys(m, "tab", "tab", "tab") // heart rate
	for range 5 {
		keys(m, "K") // 170 bpm: ×1.15 would pass 180
	}
	pickProtocol2 := func(name string) {
		keys(m, "P")
		for m.picker.names[m.picker.sel] != name {
			keys(m, "down")
		}
		keys(m, "enter")
	}
	pickProtocol2("inotrope-challenge")
	want := "protocol inotrope-challenge:21: steps[2].ramp.heart_rate_bpm: from heart_rate_bpm = 170 the step would reach heart_rate_bpm = 195.5: out of range; allowed 30 to 180 bpm"
	if m.play.run != run || m.play.cur != cur || !m.statusErr || !strings.Contains(m.status, want) {
		t.Errorf("out-of-range protocol: run replaced %v, status %q", m.play.run != run, m.status)
	}

	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.yaml")
	if err := os.WriteFile(bad, []byte("version: 1\nsteps:\n  - label: up\n    set: {heart_rate_bpm: 500}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ path, want string }{
		{bad, "bad.yaml:4: steps[1].set.heart_rate_bpm: heart_rate_bpm = 500: out of range; allowed 30 to 180 bpm"},
		{filepath.Join(dir, "none.yaml"), "no such file"},
	} {
		pickProtocol2(protocolFileItem)
		if m.mode != modePrompt || !strings.Contains(m.View(), "Play protocol file:") || !strings.Contains(m.View(), "Enter plays") {
			t.Fatalf("the file entry did not ask for a path:\n%s", m.View())
		}
		keys(m, "ctrl+u")
		press(m, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(c.path)})
		keys(m, "enter")
		if m.play.run != run || !m.statusErr || !strings.Contains(m.status, c.want) {
			t.Errorf("%s: run replaced %v, status %q", c.path, m.play.run != run, m.status)
		}
	}
}

func TestPlayFile(t *testing.T) {
	m := sized(t, "normal")
	withTicker(m)
	path := filepath.Join(t.TempDir(), "occlusion.yaml")
	data := "version: 1\nname: short-occlusion\nsteps:\n  - label: base\n    hold: 2\n" +
		"  - label: fall\n    ramp: {caval_occlusion_pct: 50}\n    beats: 6\n"
	if err := os.WriteFile(path, []byte(data), 0o644); err != nil {
		t.Fatal(err)
	}
	keys(m, "P", "up", "enter", "ctrl+u")
	press(m, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(path)})
	keys(m, "enter")
	v := m.play
	if v.run == nil || v.run.pr.Name != "short-occlusion" || v.run.total() != 8 || m.statusErr {
		t.Fatalf("file not played: %q", m.status)
	}
	// The prompt offers the same file next time.
	keys(m, "P", "up", "enter")
	if m.prompt.Value() != path {
		t.Errorf("prompt offers %q, want %q", m.prompt.Value(), path)
	}
	keys(m, "esc")
}

// The view before any protocol lists the built-ins; space opens the list.
func TestPlayIntro(t *testing.T) {
	m := sized(t, "normal")
	withTicker(m)
	keys(m, "3")
	screen := m.View()
	for _, n := range presets.ProtocolNames() {
		if !strings.Contains(screen, n) {
			t.Errorf("intro lacks %s", n)
		}
	}
	if !strings.Contains(screen, "Space play/pause") {
		t.Error("the key line does not show the playback keys")
	}
	keys(m, "+")
	if m.play.speed != defaultSpeed+1 {
		t.Error("+ did not set the speed before a run")
	}
	keys(m, " ")
	if m.mode != modeProtocols {
		t.Error("space without a protocol did not open the list")
	}
}

// Stepping back shows the fit of the loops up to that beat; the readouts
// are the beat's against the run's start.
func TestStepBackShowsEarlierFit(t *testing.T) {
	m, tk := playing(t, "normal", "preload-reduction", 120, 40)
	tk.run(t, 24)
	end := fitRow(t, m.View())
	keys(m, ",", ",", ",", ",", ",", ",", ",", ",", ",", ",") // beat 15
	v := m.play
	if v.cur != 14 {
		t.Fatalf("beat %d", v.cur+1)
	}
	screen := m.View()
	if !strings.Contains(screen, "beat 15 of 25 · caval occlusion") || !strings.Contains(screen, "fitted to 15 loops") {
		t.Errorf("beat 15 not on screen:\n%s", screen)
	}
	b := v.beat().Metrics
	if row := screenRow(t, screen, "EDV"); row[1] != fmtNum(b.EDV, 1) || row[3] != fmtNum(v.run.start.Metrics.EDV, 1) ||
		!strings.HasPrefix(row[4], "-") {
		t.Errorf("EDV row %q: want beat 15's EDV against the start's, lower", row)
	}
	if fitRow(t, screen)[1] == "" || len(end) < 4 {
		t.Error("no fit at beat 15")
	}
}

// Δ never reads 0 beside a % that does not (Ea 1.330 → 1.326 mmHg/mL).
func TestDeltaAgreesWithPercent(t *testing.T) {
	for _, c := range []struct {
		d, pct     float64
		decimals   int
		width      int
		want, wpct string
	}{
		{-0.004, -0.3, 2, 7, "-0.004", "-0.3%"},
		{-0.0004, -0.05, 2, 6, "-0.0004", "-0.1%"}, // one cell too wide for the column
		{0.04, 0.1, 1, 6, "+0.04", "+0.1%"},
		{0.0001, 0.001, 2, 7, "0", "0"}, // both round to nothing
		{-0.4, -0.004, 0, 7, "0", "0"},
		{-12.5, -9, 1, 6, "-12.5", "-9.0%"},
	} {
		pct := fmtPct(c.pct)
		got := fmtDeltaBeside(c.d, c.decimals, c.width, pct != "0")
		want := c.want
		if len(want) > c.width {
			want = "-0.00" // no room for the digits: the sign says which way
		}
		if got != want || pct != c.wpct {
			t.Errorf("Δ %g, %% %g: %q %q, want %q %q", c.d, c.pct, got, pct, want, c.wpct)
		}
	}
}

// At 80×24 an error too long for two lines takes a third, from the body,
// so the range at its end is on screen; the frame keeps its 24 lines.
func TestLongErrorFitsNarrowScreen(t *testing.T) {
	m := newTestModel(t, "normal", termenv.Ascii)
	withTicker(m)
	press(m, tea.WindowSizeMsg{Width: 80, Height: 24})
	keys(m, "tab", "tab", "tab") // heart rate
	for range 5 {
		keys(m, "K")
	}
	keys(m, "P")
	for m.picker.names[m.picker.sel] != "inotrope-challenge" {
		keys(m, "down")
	}
	keys(m, "enter") // 170 × 1.15 bpm is out of range
	screen := m.View()
	lines := strings.Split(screen, "\n")
	if len(lines) != 24 {
		t.Fatalf("%d lines", len(lines))
	}
	joined := strings.Join(strings.Fields(strings.Join(lines[len(lines)-3:], " ")), " ")
	for _, w := range []string{"protocol inotrope-challenge:21: steps[2].ramp.heart_rate_bpm:", "allowed 30 to 180 bpm"} {
		if !strings.Contains(joined, w) {
			t.Errorf("the error's last lines lack %q:\n%s", w, screen)
		}
	}
	for i, l := range lines {
		if n := len([]rune(l)); n > 80 {
			t.Errorf("line %d is %d wide", i, n)
		}
	}
}
