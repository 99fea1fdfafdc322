package ui

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"
	"github.com/muesli/termenv"

	"pvcouple/model"
	"pvcouple/presets"
)

// keyMsg is the message of a key as Bubble Tea names it ("up", "K", "ctrl+r").
func keyMsg(name string) tea.KeyMsg {
	for t, n := range map[tea.KeyType]string{
		tea.KeyUp: "up", tea.KeyDown: "down", tea.KeyLeft: "left", tea.KeyRight: "right",
		tea.KeyShiftUp: "shift+up", tea.KeyShiftDown: "shift+down", tea.KeyPgUp: "pgup", tea.KeyPgDown: "pgdown",
		tea.KeyTab: "tab", tea.KeyShiftTab: "shift+tab", tea.KeyEnter: "enter", tea.KeyEsc: "esc",
		tea.KeyCtrlC: "ctrl+c", tea.KeyCtrlR: "ctrl+r", tea.KeyCtrlU: "ctrl+u",
	} {
		if n == name {
			return tea.KeyMsg{Type: t}
		}
	}
	return tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(name)}
}

// keys sends named keys, one message each.
func keys(m *Model, names ...string) (quit bool) {
	for _, n := range names {
		if press(m, keyMsg(n)) {
			quit = true
		}
	}
	return quit
}

// sized returns the explorer on a preset at 120×40 without colour.
func sized(t *testing.T, preset string) *Model {
	t.Helper()
	m := newTestModel(t, preset, termenv.Ascii)
	press(m, tea.WindowSizeMsg{Width: 120, Height: 40})
	return m
}

func fill(m *Model) float64 { return m.st.target.FillingPressure }

func TestNudgeKeys(t *testing.T) {
	for _, c := range []struct {
		key  string
		want float64 // filling pressure after the key, from 10 mmHg
	}{
		{"up", 11}, {"k", 11}, {"down", 9}, {"j", 9},
		{"shift+up", 15}, {"K", 15}, {"pgup", 15},
		{"shift+down", 5}, {"J", 5}, {"pgdown", 5},
	} {
		m := sized(t, "normal")
		keys(m, c.key)
		if fill(m) != c.want {
			t.Errorf("%s: filling pressure %g, want %g", c.key, fill(m), c.want)
		}
		if !m.st.settled() || m.st.shown.Params.FillingPressure != c.want {
			t.Errorf("%s: the loop on screen was not re-solved", c.key)
		}
		if m.inflight {
			t.Errorf("%s: a solve is still marked running", c.key)
		}
	}
}

// Raising preload raises SV and ESP (the Frank–Starling mechanism with a
// fixed arterial load; common practice, no source), and the screen says so.
func TestNudgeRaisesSVAndESP(t *testing.T) {
	m := sized(t, "normal")
	base := m.st.shown.Metrics
	keys(m, "up", "up", "up")
	now := m.st.shown.Metrics
	if !(now.SV > base.SV && now.ESP > base.ESP) {
		t.Errorf("SV %g → %g, ESP %g → %g: want both to rise", base.SV, now.SV, base.ESP, now.ESP)
	}
	if !strings.Contains(m.status, "Filling pressure 12 → 13 mmHg") || !strings.Contains(m.status, "SV") {
		t.Errorf("status %q", m.status)
	}
	sv := screenRow(t, m.View(), "SV")
	if sv[1] != fmtNum(now.SV, 1) || !strings.HasPrefix(sv[len(sv)-2], "+") || !strings.HasPrefix(sv[len(sv)-1], "+") {
		t.Errorf("SV row %q: want the new value and a positive Δ and %%", sv)
	}
}

// screenRow returns the fields of the readout row whose label is label.
func screenRow(t *testing.T, screen, label string) []string {
	t.Helper()
	for _, line := range strings.Split(screen, "\n") {
		if i := strings.Index(line, " "+label+" "); i >= 0 {
			f := strings.Fields(line[i:])
			if len(f) >= 5 && f[0] == label {
				return f
			}
		}
	}
	t.Fatalf("no readout row %q on screen:\n%s", label, screen)
	return nil
}

func TestLeverSelection(t *testing.T) {
	m := sized(t, "normal")
	n := len(model.Levers)
	for _, c := range []struct {
		key  string
		want int
	}{{"right", 1}, {"l", 2}, {"tab", 3}, {"left", 2}, {"h", 1}, {"shift+tab", 0}, {"shift+tab", n - 1}, {"tab", 0}} {
		keys(m, c.key)
		if m.sel != c.want {
			t.Errorf("%s: lever %d, want %d", c.key, m.sel, c.want)
		}
	}
	// The selected lever is the one nudged, and its name is on the status line.
	keys(m, "l", "up")
	if m.st.target.Ees != 2.6 || m.st.target.FillingPressure != 10 {
		t.Errorf("nudged the wrong lever: %+v", m.st.target)
	}
}

func TestLimitStopsAndSays(t *testing.T) {
	m := sized(t, "normal")
	keys(m, "tab", "tab", "tab") // heart rate, 70 bpm
	for range 10 {
		keys(m, "K")
	}
	if m.st.target.HeartRate != 180 || !m.statusErr || !strings.Contains(m.status, "allowed 30 to 180 bpm") {
		t.Errorf("heart rate %g, status %q", m.st.target.HeartRate, m.status)
	}
	if !m.st.settled() {
		t.Error("the loop at the limit was not solved")
	}
}

// A setting the model refuses is not taken: here the ventricle would fill
// less than the 10 mL above V0 a beat needs.
func TestRefusedSettingChangesNothing(t *testing.T) {
	sc, _ := presets.Get("normal")
	sc.Params.EdpvrB, sc.Params.FillingPressure = 0.2, 2
	m, err := New(sc, "test", NewStyles(NewRenderer(nil, termenv.Ascii)))
	if err != nil {
		t.Fatal(err)
	}
	press(m, tea.WindowSizeMsg{Width: 120, Height: 40})
	before := m.st
	keys(m, "down")
	if m.st != before || !m.statusErr || !strings.Contains(m.status, "Filling pressure stays at 2 mmHg") {
		t.Errorf("status %q; state changed: %v", m.status, m.st != before)
	}
	if len(m.hist.undo) != 0 {
		t.Error("a refused nudge went into the undo history")
	}
}

// A failed solve of the latest setting puts the levers back to the loop on
// screen and says so; a failure of an older setting is passed over.
func TestSolveFailureKeepsLastLoop(t *testing.T) {
	m := sized(t, "normal")
	shown := m.st.shown
	_, cmd := m.Update(keyMsg("up")) // the solve starts but its result is replaced below
	if cmd == nil || !m.inflight {
		t.Fatal("a nudge did not start a solve")
	}
	fail := &model.NotSettledError{Beats: 60, Residual: 0.01}
	m.Update(solvedMsg{gen: m.gen, params: m.st.target, err: fail})
	if m.st.target != shown.Params || m.st.shown != shown || !m.statusErr || !strings.Contains(m.status, "kept the last settled loop") {
		t.Errorf("after a failed solve: target %v, status %q", m.st.target.FillingPressure, m.status)
	}
	if m.inflight {
		t.Error("still marked solving")
	}
}

// Held-down keys never queue solves: while one runs or waits for its turn,
// later nudges only move the target, and a solve whose turn comes solves the
// latest target, so settings superseded meanwhile are never solved.
func TestNudgesCoalesce(t *testing.T) {
	m := sized(t, "normal")
	var first tea.Cmd
	_, first = m.Update(keyMsg("up"))
	for range 5 {
		if _, cmd := m.Update(keyMsg("up")); cmd != nil {
			t.Fatal("a nudge started a second solve while one waited")
		}
	}
	if fill(m) != 16 {
		t.Fatalf("target %g, want 16", fill(m))
	}
	msg := first().(solvedMsg)
	if msg.params.FillingPressure != 16 {
		t.Fatalf("the waiting solve solved %g, want the latest target 16", msg.params.FillingPressure)
	}
	if _, next := m.Update(msg); next != nil || !m.st.settled() || m.inflight {
		t.Errorf("after the latest target's solve: another solve %v, settled %v", next != nil, m.st.settled())
	}
	if !strings.Contains(m.status, "Filling pressure 15 → 16 mmHg · SV") {
		t.Errorf("status %q: want the last nudge with its result", m.status)
	}

	// A nudge while a solve runs is solved next.
	_, first = m.Update(keyMsg("up"))
	msg = first().(solvedMsg)
	m.Update(keyMsg("up"))
	_, next := m.Update(msg)
	if next == nil || m.st.shown.Params.FillingPressure != 17 {
		t.Fatalf("the result for 17 mmHg was not shown, or no follow-up solve")
	}
	m.Update(next())
	if !m.st.settled() || m.st.shown.Params.FillingPressure != 18 {
		t.Errorf("the follow-up solved %g, want the latest target 18", m.st.shown.Params.FillingPressure)
	}
}

// Back to the baseline while a solve waits: the waiting solve finds nothing
// to do and the baseline stays on screen.
func TestRevertDropsWaitingSolve(t *testing.T) {
	m := sized(t, "normal")
	_, first := m.Update(keyMsg("up"))
	keys(m, "r")
	msg := first().(solvedMsg)
	if msg.st != nil {
		t.Errorf("the waiting solve solved %g after the revert", msg.params.FillingPressure)
	}
	if _, next := m.Update(msg); next != nil || m.st.shown != m.st.base {
		t.Error("the baseline did not stay on screen")
	}
}

// Keys typed faster than read arrive as one message; each counts.
func TestRunOfRunesIsSeveralKeys(t *testing.T) {
	m := sized(t, "normal")
	press(m, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("kkk")})
	if fill(m) != 13 {
		t.Errorf("filling pressure %g after \"kkk\", want 13", fill(m))
	}
}

func TestBaselineUndoRedo(t *testing.T) {
	m := sized(t, "normal")
	base := m.st.base
	keys(m, "up", "up")
	if m.st.base != base {
		t.Fatal("a nudge moved the baseline")
	}
	keys(m, "b") // pin 12 mmHg
	if m.st.base != m.st.shown || m.st.base.Params.FillingPressure != 12 {
		t.Fatalf("pin: baseline at %g", m.st.base.Params.FillingPressure)
	}
	keys(m, "b")
	if !strings.Contains(m.status, "already the baseline") {
		t.Errorf("second pin: %q", m.status)
	}
	keys(m, "up", "r") // 13, then back to the baseline (12)
	if fill(m) != 12 || m.st.shown != m.st.base {
		t.Fatalf("revert: %g", fill(m))
	}
	keys(m, "u") // undo the revert: 13
	if fill(m) != 13 || !m.st.settled() {
		t.Fatalf("undo revert: %g", fill(m))
	}
	keys(m, "u", "u") // undo the nudge to 13, then the pin
	if fill(m) != 12 || m.st.base != base {
		t.Fatalf("undo pin: fill %g, baseline %g", fill(m), m.st.base.Params.FillingPressure)
	}
	keys(m, "ctrl+r") // redo the pin
	if m.st.base == base || m.st.base.Params.FillingPressure != 12 {
		t.Fatalf("redo pin: baseline %g", m.st.base.Params.FillingPressure)
	}
	keys(m, "U") // redo the nudge
	if fill(m) != 13 {
		t.Fatalf("redo nudge: %g", fill(m))
	}
	keys(m, "U", "U")
	if !m.statusErr || !strings.Contains(m.status, "Nothing to redo") {
		t.Errorf("redo past the end: %q", m.status)
	}
	for range 10 {
		keys(m, "u")
	}
	if fill(m) != 10 || m.st.base != base || !strings.Contains(m.status, "Nothing to undo") {
		t.Errorf("undo to the start: %g, %q", fill(m), m.status)
	}
	// A nudge after undo forgets the redo stack.
	keys(m, "up")
	if len(m.hist.redo) != 0 {
		t.Error("redo kept after a new change")
	}
}

func TestViewsAndFit(t *testing.T) {
	m := sized(t, "normal")
	t.Cleanup(m.Close)
	if n := len(m.views); n != 4 {
		t.Fatalf("%d views, want 4: PV plane, beat traces, protocol, coupling map", n)
	}
	for _, c := range []struct {
		key  string
		want int
	}{{"v", 1}, {"v", 2}, {"v", 3}, {"v", 0}, {"2", 1}, {"3", 2}, {"4", 3}, {"1", 0}} {
		keys(m, c.key)
		if m.cur != c.want {
			t.Errorf("%s: view %d, want %d", c.key, m.cur, c.want)
		}
	}
	for k, want := range map[string]string{"3": "[3 Protocol]", "4": "[4 Coupling map]"} {
		keys(m, k)
		if !strings.Contains(m.View(), want) {
			t.Errorf("%s: %s is not on screen", k, want)
		}
	}
	keys(m, "2")
	if !strings.Contains(m.View(), "[2 Beat traces]") || !strings.Contains(m.View(), "t ms") {
		t.Error("the trace view is not on screen")
	}
	keys(m, "9")
	if m.cur != 1 || !m.statusErr || !strings.Contains(m.status, "no view 9: views 1 to 4") {
		t.Errorf("key 9: view %d, %q", m.cur, m.status)
	}
	// The axes hold still for a nudge that stays inside them, and z fits them anew.
	keys(m, "1")
	_ = m.View()
	pv := m.views[0].(*pvView)
	f := pv.f
	for range 8 {
		keys(m, "K") // filling pressure up to 40 mmHg: the loop leaves the view
	}
	_ = m.View()
	if pv.f == f {
		t.Error("the axes did not grow when the loop left them")
	}
	g := pv.f
	keys(m, "j")
	_ = m.View()
	if pv.f != g {
		t.Error("the axes moved for a nudge inside them")
	}
	keys(m, "r", "z")
	_ = m.View()
	if pv.f == g || !strings.Contains(m.status, "fitted") {
		t.Errorf("z did not refit the axes (%v): %q", pv.f, m.status)
	}
}

func TestHelpKeys(t *testing.T) {
	m := sized(t, "normal")
	for _, close := range []string{"?", "esc", "q", "enter"} {
		keys(m, "?")
		if m.mode != modeHelp || !strings.Contains(m.View(), "not for treating patients") {
			t.Fatal("? did not open the help with the caution")
		}
		if keys(m, "up") || fill(m) != 10 {
			t.Error("a lever key acted under the help")
		}
		if keys(m, close) || m.mode != modeMain {
			t.Errorf("%s did not close the help (or quit)", close)
		}
	}
	keys(m, "?")
	if !keys(m, "ctrl+c") {
		t.Error("ctrl+c did not quit from the help")
	}
}

// Every key of the key map is listed in the help overlay.
func TestHelpListsEveryKey(t *testing.T) {
	m := sized(t, "normal")
	keys(m, "?")
	screen := m.View()
	for _, g := range m.keys.FullHelp() {
		for _, b := range g {
			if h := b.Help(); !strings.Contains(screen, h.Key) || !strings.Contains(screen, h.Desc) {
				t.Errorf("help lacks %q %q", h.Key, h.Desc)
			}
		}
	}
	for _, b := range m.keys.ShortHelp() {
		if len(b.Keys()) == 0 {
			t.Error("a short-help key has no keys")
		}
	}
}

func TestQuitKeys(t *testing.T) {
	for _, k := range []string{"q", "ctrl+c"} {
		if !keys(sized(t, "normal"), k) {
			t.Errorf("%s did not quit", k)
		}
	}
}

func TestPresetPicker(t *testing.T) {
	m := sized(t, "normal")
	keys(m, "p")
	if m.mode != modePicker || !strings.Contains(m.View(), "hfref") {
		t.Fatal("p did not open the preset list")
	}
	keys(m, "esc")
	if m.mode != modeMain || m.st.name != "normal" {
		t.Fatal("esc did not close the list unchanged")
	}
	// Pick hfref: its place in the list, moving down from normal (first).
	keys(m, "p")
	idx := -1
	for i, n := range presets.Names() {
		if n == "hfref" {
			idx = i
		}
	}
	for range idx {
		keys(m, "down")
	}
	keys(m, "up", "j", "enter")
	if m.st.name != "hfref" || m.mode != modeMain {
		t.Fatalf("picked %q", m.st.name)
	}
	want, _ := presets.Get("hfref")
	if m.st.target != want.Params || m.st.base.Params != want.BaselineOrParams() || !m.st.settled() {
		t.Error("the preset's levers and baseline are not on screen")
	}
	keys(m, "u")
	normal, _ := presets.Get("normal")
	if m.st.name != "normal" || m.st.target != normal.Params || m.st.base.Params != normal.Params || !m.st.settled() {
		t.Errorf("undo did not go back to the scenario before the preset: %s", m.st.name)
	}
	keys(m, "p")
	if !keys(m, "ctrl+c") {
		t.Error("ctrl+c did not quit from the list")
	}
}

func TestSaveAndOpen(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "study.yaml")
	m := sized(t, "normal")
	keys(m, "up", "up", "s")
	if m.mode != modePrompt || !strings.Contains(m.View(), "Save scenario to: normal.yaml") {
		t.Fatalf("s did not prompt with a default path:\n%s", m.View())
	}
	keys(m, "ctrl+u")
	press(m, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(path)})
	keys(m, "enter")
	if m.mode != modeMain || m.statusErr || !strings.Contains(m.status, "Saved") {
		t.Fatalf("save: %q", m.status)
	}
	sc, err := presets.LoadScenario(path)
	if err != nil {
		t.Fatal(err)
	}
	if sc.Params != m.st.target || sc.Baseline == nil || *sc.Baseline != m.st.base.Params || sc.Name != "study" {
		t.Errorf("saved %+v", sc)
	}
	// Saving again over it asks first; n keeps the file, y replaces it.
	keys(m, "up", "s", "enter")
	if m.mode != modeConfirm || !strings.Contains(m.status, "exists") {
		t.Fatalf("no confirmation: %q", m.status)
	}
	keys(m, "n")
	if sc2, _ := presets.LoadScenario(path); sc2.Params.FillingPressure != 12 || !strings.Contains(m.status, "nothing saved") {
		t.Errorf("n replaced the file (%g) or said %q", sc2.Params.FillingPressure, m.status)
	}
	keys(m, "s", "enter", "y")
	if sc3, _ := presets.LoadScenario(path); sc3.Params.FillingPressure != 13 {
		t.Errorf("y did not replace the file: %g", sc3.Params.FillingPressure)
	}
	// Esc cancels the prompt.
	keys(m, "s", "esc")
	if m.mode != modeMain || m.status != "Cancelled." {
		t.Errorf("esc: %q", m.status)
	}
	// A folder that does not exist is named.
	keys(m, "s", "ctrl+u")
	press(m, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(filepath.Join(dir, "no", "x.yaml"))})
	keys(m, "enter")
	if !m.statusErr || !strings.Contains(m.status, "no folder") {
		t.Errorf("missing folder: %q", m.status)
	}

	// Open: back to the preset, then open the saved file.
	keys(m, "r")
	keys(m, "o", "ctrl+u")
	press(m, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(path)})
	keys(m, "enter")
	if m.statusErr || m.st.name != "study" || m.st.target.FillingPressure != 13 || m.st.base.Params.FillingPressure != 10 {
		t.Errorf("open: %q, fill %g, base %g", m.status, fill(m), m.st.base.Params.FillingPressure)
	}
}

// A file that fails to load changes nothing on screen and the error names
// the file, the line, the key, the range and the unit.
func TestOpenBadFileChangesNothing(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.yaml")
	if err := os.WriteFile(bad, []byte("version: 1\nbase: normal\nparams:\n  ees_mmhg_per_ml: 40\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		path string
		want []string
	}{
		{bad, []string{"bad.yaml:4", "ees_mmhg_per_ml = 40", "allowed 0.2 to 10 mmHg/mL"}},
		{filepath.Join(dir, "none.yaml"), []string{"none.yaml", "no such file"}},
		{dir, []string{"is a folder, not a regular file"}},
	} {
		m := sized(t, "normal")
		keys(m, "up")
		before, screen := m.st, m.View()
		keys(m, "o", "ctrl+u")
		press(m, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(c.path)})
		keys(m, "enter")
		if m.st != before {
			t.Errorf("%s: the state changed", c.path)
		}
		for _, w := range c.want {
			if !strings.Contains(m.status, w) {
				t.Errorf("%s: status %q lacks %q", c.path, m.status, w)
			}
		}
		if !m.statusErr {
			t.Errorf("%s: not marked as an error", c.path)
		}
		// The whole message is on screen, over the key line if need be.
		if after := m.View(); after == screen || !strings.Contains(strings.ReplaceAll(after, "\n   ", " "), c.want[len(c.want)-1]) {
			t.Errorf("%s: error not on screen:\n%s", c.path, after)
		}
	}
}

func TestEmptyPathAndQuitFromPrompts(t *testing.T) {
	m := sized(t, "normal")
	keys(m, "o", "ctrl+u", "enter")
	if !m.statusErr || !strings.Contains(m.status, "No path") {
		t.Errorf("empty path: %q", m.status)
	}
	keys(m, "s")
	if !keys(m, "ctrl+c") {
		t.Error("ctrl+c did not quit from the prompt")
	}
	// q is typed into the path, not a quit.
	m = sized(t, "normal")
	keys(m, "s", "ctrl+u")
	if keys(m, "q") || m.prompt.Value() != "q" {
		t.Errorf("q in the prompt: %q", m.prompt.Value())
	}
}

func TestTooSmallWindow(t *testing.T) {
	m := sized(t, "normal")
	press(m, tea.WindowSizeMsg{Width: 60, Height: 20})
	v := m.View()
	if !strings.Contains(v, "Enlarge the window") || !strings.Contains(v, "80×24") || !strings.Contains(v, "60×20") {
		t.Errorf("small window:\n%s", v)
	}
	if keys(m, "up"); fill(m) != 10 {
		t.Error("a lever moved while the window was too small")
	}
	press(m, tea.WindowSizeMsg{Width: 80, Height: 24})
	if v := m.View(); !strings.Contains(v, "PVA") || len(strings.Split(v, "\n")) != 24 {
		t.Errorf("after enlarging: %d lines", len(strings.Split(v, "\n")))
	}
	if !keys(m, "q") {
		t.Error("q did not quit")
	}
}

// Every frame has exactly one line per terminal row, none wider than the
// window, at every size from the least up, in every mode.
func TestFrameFitsWindow(t *testing.T) {
	m := newTestModel(t, "hfref", termenv.ANSI256)
	withTicker(m)
	for _, sz := range [][2]int{{80, 24}, {81, 25}, {99, 30}, {100, 33}, {111, 34}, {112, 40}, {120, 40}, {160, 50}, {200, 60}} {
		press(m, tea.WindowSizeMsg{Width: sz[0], Height: sz[1]})
		for _, k := range []string{"1", "2", "?", "?", "p", "esc", "s", "esc", "3", "P", "esc", "P", "up", "enter", "esc", "P", "down", "down", "enter", ".", ".", "x", "3"} {
			keys(m, k)
			lines := strings.Split(m.View(), "\n")
			if len(lines) != sz[1] {
				t.Errorf("%v after %s: %d lines", sz, k, len(lines))
			}
			for i, l := range lines {
				if w := ansi.StringWidth(l); w > sz[0] {
					t.Errorf("%v after %s: line %d is %d wide", sz, k, i, w)
				}
			}
		}
	}
}

// Esc and a key sent together arrive as Alt and the key; both act.
func TestEscThenKeyTogether(t *testing.T) {
	m := sized(t, "normal")
	keys(m, "?")
	press(m, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("2"), Alt: true})
	if m.mode != modeMain || m.cur != 1 {
		t.Errorf("alt+2 in the help: mode %d, view %d; want the help closed and view 2", m.mode, m.cur)
	}
	press(m, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("k"), Alt: true})
	if fill(m) != 11 {
		t.Errorf("alt+k: filling pressure %g, want 11", fill(m))
	}
}
