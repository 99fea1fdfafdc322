package ui

import (
	"bytes"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/exp/teatest"
	"github.com/muesli/termenv"

	"pvcouple/presets"
)

// TestFlow runs the whole program as a user would: start, nudge preload
// up three times, see SV and ESP rise on screen, save the scenario, quit.
func TestFlow(t *testing.T) {
	m := newTestModel(t, "normal", termenv.Ascii)
	tm := teatest.NewTestModel(t, m, teatest.WithInitialTermSize(120, 40))
	out := tm.Output()
	wait := func(what string) {
		t.Helper()
		teatest.WaitFor(t, out, func(b []byte) bool { return bytes.Contains(b, []byte(what)) },
			teatest.WithDuration(5*time.Second), teatest.WithCheckInterval(10*time.Millisecond))
	}
	wait("Filling pressure")
	first := m.st.shown.Metrics // read before any key: the program has not touched it yet

	for range 3 {
		tm.Send(tea.KeyMsg{Type: tea.KeyUp})
	}
	wait("Filling pressure 10 → 11 mmHg · SV")

	path := filepath.Join(t.TempDir(), "flow.yaml")
	tm.Send(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("s")})
	wait("Save scenario to:")
	tm.Send(tea.KeyMsg{Type: tea.KeyCtrlU})
	tm.Type(path)
	tm.Send(tea.KeyMsg{Type: tea.KeyEnter})
	wait("Saved levers and baseline")
	tm.Send(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("q")})

	final := tm.FinalModel(t, teatest.WithFinalTimeout(5*time.Second)).(*Model)
	screen := final.View()
	for _, label := range []string{"SV", "ESP"} {
		row := screenRow(t, screen, label)
		now, err1 := strconv.ParseFloat(strings.TrimRight(row[1], "▲▼"), 64)
		base, err2 := strconv.ParseFloat(row[len(row)-3], 64)
		if err1 != nil || err2 != nil || !(now > base) || !strings.HasPrefix(row[len(row)-2], "+") {
			t.Errorf("%s row %q: want now above base with a positive Δ", label, row)
		}
	}
	if row := screenRow(t, screen, "SV"); row[1] == fmtNum(first.SV, 1) {
		t.Errorf("SV on screen still %s", row[1])
	}
	sc, err := presets.LoadScenario(path)
	if err != nil {
		t.Fatalf("saved file: %v", err)
	}
	// The closed circulation saves its mean LAP as the filling pressure.
	if math.Abs(sc.Params.FillingPressure-11) > 1e-3 || sc.Baseline == nil || math.Abs(sc.Baseline.FillingPressure-8) > 1e-3 {
		t.Errorf("saved filling pressure %g, baseline %v", sc.Params.FillingPressure, sc.Baseline)
	}
}

// TestPlayFlow plays a protocol in the whole program with real ticks: open
// the protocol view, set the fastest speed, pick preload-reduction, see the
// run end with the fitted ESPVR on screen, step back a beat, quit.
func TestPlayFlow(t *testing.T) {
	m := newTestModel(t, "normal", termenv.Ascii)
	tm := teatest.NewTestModel(t, m, teatest.WithInitialTermSize(120, 40))
	out := tm.Output()
	wait := func(what string) {
		t.Helper()
		teatest.WaitFor(t, out, func(b []byte) bool { return bytes.Contains(b, []byte(what)) },
			teatest.WithDuration(10*time.Second), teatest.WithCheckInterval(10*time.Millisecond))
	}
	wait("Filling pressure")
	tm.Send(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("3")})
	wait("Protocol playback")
	for range 3 {
		tm.Send(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("+")})
	}
	wait("Speed: as fast as it computes.")
	tm.Send(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("P")})
	wait("Play a protocol")
	for range protocolPosition(t, "preload-reduction") {
		tm.Send(tea.KeyMsg{Type: tea.KeyDown})
	}
	tm.Send(tea.KeyMsg{Type: tea.KeyEnter})
	wait("End of preload-reduction, 25 beats: fitted Ees")
	tm.Send(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(",")})
	wait("Beat 24 of 25")
	tm.Send(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("q")})
	final := tm.FinalModel(t, teatest.WithFinalTimeout(5*time.Second)).(*Model)
	if v := final.play; v.cur != 23 || len(v.run.beats) != 25 || v.playing {
		t.Errorf("final: beat %d of %d computed, playing %v", v.cur+1, len(v.run.beats), v.playing)
	}
	if fit := fitRow(t, final.View()); fit[1] != "2.50" {
		t.Errorf("fitted Ees on screen %q, want 2.50 (the model's)", fit[1])
	}
}

// protocolPosition is the place of a built-in protocol in the picker's list,
// from 0: the number of Down presses that reach it.
func protocolPosition(tb testing.TB, name string) int {
	tb.Helper()
	for i, n := range presets.ProtocolNames() {
		if n == name {
			return i
		}
	}
	tb.Fatalf("no built-in protocol %s", name)
	return 0
}
