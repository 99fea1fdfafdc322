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
		{"play_80x24", 80, 24, append([]string{"P", "down", "down", "enter", " "}, repeat(".", 14)...)},
		{"play_120x40", 120, 40, append([]string{"P", "down", "down", "enter", " "}, repeat(".", 14)...)},
		// rate-steps, playing (ticks held back) at beat 1 at twice real time.
		{"play_start_120x40", 120, 40, []string{"3", "+", "P", "down", "down", "down", "enter"}},
		// preload-reduction at beat 15 with a recording open: the readouts
		// still count from the run's start.
		{"play_rec_80x24", 80, 24, append([]string{"O", "ctrl+u", steadyCSV, "enter", "P", "down", "down", "enter", " "}, repeat(".", 14)...)},
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
