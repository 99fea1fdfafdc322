package ui

import (
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/exp/golden"
	"github.com/muesli/termenv"
)

// TestGolden compares whole screens, without colour, with the files in
// testdata/TestGolden/. After a deliberate change of the screen, rewrite
// them with
//
//	go test ./ui -run TestGolden -update
//
// and read the diff before committing.
func TestGolden(t *testing.T) {
	to := func(name string) []string { return repeat("down", protocolPosition(t, name)) }
	cat := func(parts ...[]string) []string {
		var out []string
		for _, p := range parts {
			out = append(out, p...)
		}
		return out
	}
	for _, c := range []struct {
		name string
		w, h int
		keys []string
	}{
		{"pv_80x24", 80, 24, nil},
		{"pv_120x40", 120, 40, nil},
		{"pv_nudged_120x40", 120, 40, []string{"up", "up", "up", "tab", "down"}},
		{"pv_nudged_80x24", 80, 24, []string{"up", "up", "up", "tab", "down"}},
		{"traces_80x24", 80, 24, []string{"K", "2"}},
		{"traces_120x40", 120, 40, []string{"K", "2"}},
		{"help_80x24", 80, 24, []string{"?"}},
		{"help_120x40", 120, 40, []string{"?"}},
		{"presets_80x24", 80, 24, []string{"p"}},
		{"save_prompt_80x24", 80, 24, []string{"s"}},
		{"limit_80x24", 80, 24, []string{"tab", "tab", "tab", "K", "K", "K", "K", "K", "K"}},
		{"too_small_60x20", 60, 20, nil},
		{"protocols_80x24", 80, 24, []string{"P"}},
		{"play_intro_80x24", 80, 24, []string{"3"}},
		{"play_intro_120x40", 120, 40, []string{"3"}},
		// preload-reduction, paused at beat 15 after 14 steps.
		{"play_80x24", 80, 24, cat([]string{"P"}, to("preload-reduction"), []string{"enter", " "}, repeat(".", 14))},
		{"play_120x40", 120, 40, cat([]string{"P"}, to("preload-reduction"), []string{"enter", " "}, repeat(".", 14))},
		// rate-steps, playing (ticks held back) at beat 1 at twice real time.
		{"play_start_120x40", 120, 40, cat([]string{"3", "+", "P"}, to("rate-steps"), []string{"enter"})},
		// preload-reduction at beat 15 with a recording open: the readouts
		// still count from the run's start.
		{"play_rec_80x24", 80, 24, cat([]string{"O", "ctrl+u", steadyCSV, "enter", "P"}, to("preload-reduction"), []string{"enter", " "}, repeat(".", 14))},
		// The lesion and support levers shown (d), then a pump at 2.5 L/min
		// (its lever, a small and a large step up), on the PV plane and in
		// the beat traces with the flow plot.
		{"devices_120x40", 120, 40, []string{"d"}},
		{"devices_80x24", 80, 24, []string{"d"}},
		{"devices_pump_120x40", 120, 40, []string{"d", "tab", "tab", "tab", "tab", "up", "K"}},
		{"traces_pump_120x40", 120, 40, []string{"d", "tab", "tab", "tab", "tab", "up", "K", "2"}},
		{"traces_pump_80x24", 80, 24, []string{"d", "tab", "tab", "tab", "tab", "up", "K", "2"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			m := newTestModel(t, "normal", termenv.Ascii)
			withTicker(m)
			press(m, tea.WindowSizeMsg{Width: c.w, Height: c.h})
			keys(m, c.keys...)
			golden.RequireEqual(t, []byte(m.View()))
		})
	}
}

// repeat is n copies of s.
func repeat(s string, n int) []string {
	out := make([]string, n)
	for i := range out {
		out[i] = s
	}
	return out
}
