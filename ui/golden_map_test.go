package ui

import (
	"regexp"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/exp/golden"
	"github.com/muesli/termenv"
)

// occlusionCSV and steadyCSV are the example recordings, made by our own
// model (testdata/recordings/README.md).
const (
	occlusionCSV = "../testdata/recordings/occlusion-synthetic.csv"
	steadyCSV    = "../testdata/recordings/steady-synthetic.csv"
)

// elapsed matches the time a map took, which varies from run to run.
var elapsed = regexp.MustCompile(`in \d+\.\d+ s`)

// TestGoldenMap compares the coupling map (once solved: the test runs the
// job's ticks until it ends) and the PV plane with a recording overlaid,
// without colour, with the files in testdata/TestGoldenMap/. Rewrite them
// with go test ./ui -run TestGolden -update.
func TestGoldenMap(t *testing.T) {
	open := func(path string) []string { return []string{"O", "ctrl+u", path, "enter"} }
	for _, c := range []struct {
		name   string
		preset string
		w, h   int
		keys   []string
	}{
		{"map_80x24", "normal", 80, 24, []string{"4"}},
		{"map_120x40", "normal", 120, 40, []string{"4"}},
		{"map_ef_hr_80x24", "hfref", 80, 24, []string{"4", "m", "m", "m", "x"}},
		{"map_ef_fill_zc_120x40", "hfref", 120, 40, []string{"4", "M", "M", "X", "Y"}},
		{"recording_80x24", "hfref", 80, 24, open(occlusionCSV)},
		{"recording_120x40", "hfref", 120, 40, open(occlusionCSV)},
		{"recording_steady_120x40", "normal", 120, 40, append(open(steadyCSV), "K", "K")},
		{"recording_map_80x24", "hfref", 80, 24, append(open(occlusionCSV), "4")},
	} {
		t.Run(c.name, func(t *testing.T) {
			m := newTestModel(t, c.preset, termenv.Ascii)
			t.Cleanup(m.Close)
			press(m, tea.WindowSizeMsg{Width: c.w, Height: c.h})
			keys(m, c.keys...)
			golden.RequireEqual(t, []byte(elapsed.ReplaceAllString(m.View(), "in 0.00 s")))
		})
	}
}
