package ui

import (
	"strings"

	"github.com/charmbracelet/lipgloss"
)

// helpBoxFrame is the width the help box's border and padding take.
const helpBoxFrame = 4

// packColumns lays the help's key groups out left to right, as many in a row
// as fit in width w (three cells between groups), starting a new row, gap
// below the last, when the next would not fit.
func packColumns(s *Styles, cols []string, w int, gap string) string {
	var rows []string
	var row []string
	used := 0
	flush := func() {
		if len(row) > 0 {
			rows = append(rows, lipgloss.JoinHorizontal(lipgloss.Top, row...))
		}
		row, used = nil, 0
	}
	for _, c := range cols {
		cw := lipgloss.Width(c)
		if len(row) > 0 && used+helpColumnGap+cw > w {
			flush()
		}
		if len(row) > 0 {
			row[len(row)-1] = pad(s, row[len(row)-1])
			used += helpColumnGap
		}
		row = append(row, c)
		used += cw
	}
	flush()
	return strings.Join(rows, gap)
}

// helpColumnGap is the room between two key groups in a row (see pad).
const helpColumnGap = 3

// recordingCues says what the recording overlay and the map show.
const recordingCues = "Recording (O): • its steady loop, · its other beats, rec ESPVR fitted to it.\n" +
	"Coupling map: ·░▒▓█ low to high, ◆ the levers now, * the largest value,\n" +
	"× no steady beat."

// circulationCue says what the two circulations are.
const circulationCue = "Circulation (c): closed keeps its blood volume, so filling follows from what the\n" +
	"heart ejects, and the filling-pressure lever gives or takes blood for a mean\n" +
	"LAP; held holds the filling pressure, for one lever at a time."

// fitCue says how to start from a model fitted to a recording.
const fitCue = "Model fitted to a recording: pvcouple fit FILE.csv -o fit.yaml, then o."
