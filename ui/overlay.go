package ui

import (
	"context"
	"fmt"
	"path/filepath"
	"strings"

	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/internal/safefile"
	"pvcouple/internal/safetext"
	"pvcouple/model"
	"pvcouple/model/analysis"
)

// recording is a recorded pressure–volume file overlaid on the PV plane: its
// kept loops, the steady loop the readouts compare with, and its fitted
// ESPVR. Every number in it comes from model/analysis.
type recording struct {
	path string
	name string // the file's base name
	ov   *analysis.Overlay
	// rep is the measurements of the representative steady beat (the
	// loop drawn with •); nil when the recording has no steady beat.
	rep     *model.Metrics
	repBeat int // its beat number, 0 when rep is nil
	kept    int // loops overlaid
}

// newRecording gathers what the screen shows of an analysed recording.
func newRecording(path string, a *analysis.Analysis) (*recording, error) {
	ov := a.Overlay()
	if len(ov.Loops) == 0 {
		return nil, fmt.Errorf("%s: no whole beat to overlay", path)
	}
	r := &recording{path: path, name: safetext.Line(filepath.Base(path)), ov: ov, kept: len(ov.Loops)}
	if i := ov.Representative; i >= 0 {
		for _, b := range a.Beats {
			if b.Index == ov.Loops[i].Beat && b.Measured {
				r.rep, r.repBeat = &b.Metrics, b.Index
			}
		}
	}
	return r, nil
}

// recordingLoad reads and analyses a recording off the update loop. A file
// that cannot be read or analysed changes nothing; the status line names the
// file, the line and the column at fault.
var recordingLoad = fileLoad{
	what: "recording",
	then: "Analysing",
	read: func(ctx context.Context, f *safefile.File, path string) (any, error) {
		r, err := analysis.ReadCSV(f, path, analysis.ReadOptions{})
		if err != nil {
			return nil, err
		}
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		a, err := analysis.Analyze(r, analysis.Options{})
		if err != nil {
			return nil, err
		}
		rec, err := newRecording(path, a)
		if err != nil {
			return nil, err
		}
		return &openedRecording{rec: rec, a: a}, nil
	},
	apply: func(m *Model, path string, res any) tea.Cmd {
		o := res.(*openedRecording)
		m.showRecording(path, o.rec, o.a)
		return nil
	},
}

// openedRecording is a recording read and analysed.
type openedRecording struct {
	rec *recording
	a   *analysis.Analysis
}

// openRecording reads, analyses and overlays a recording in the background.
func (m *Model) openRecording(path string) tea.Cmd { return m.startLoad(recordingLoad, path) }

// showRecording overlays an analysed recording and says what it holds.
func (m *Model) showRecording(path string, rec *recording, a *analysis.Analysis) {
	m.st.rec = rec
	m.lastRecPath = path
	for _, v := range m.views {
		v.Refit() // the axes take the recording in
	}
	msg := fmt.Sprintf("Overlaid %s: %d loops (· each, • steady beat %d); readouts compare with it, C clears.",
		rec.name, rec.kept, rec.repBeat)
	if rec.rep == nil {
		msg = fmt.Sprintf("Overlaid %s: %d loops (·), no steady beat to compare with; C clears.", rec.name, rec.kept)
	}
	switch {
	case len(a.Warnings) > 0:
		msg += " Warning: " + strings.TrimSuffix(a.Warnings[0], ".") + "."
		if n := len(a.Warnings) - 1; n > 0 {
			msg += fmt.Sprintf(" (%d more: pvcouple analyze %s)", n, path)
		}
	case len(a.Notes) > 0:
		msg += " Note: " + strings.TrimSuffix(a.Notes[0], ".") + "."
	}
	m.setStatus(msg)
}

// clearRecording removes the overlay.
func (m *Model) clearRecording() {
	if m.st.rec == nil {
		m.setError("No recording to clear: O opens one.")
		return
	}
	name := m.st.rec.name
	m.st.rec = nil
	for _, v := range m.views {
		v.Refit()
	}
	m.setStatus(fmt.Sprintf("Cleared %s; readouts compare with the baseline again.", name))
}

// reference is what the readouts' Δ and % count from: the recording's
// steady beat when a recording is overlaid, else the baseline; nil when
// neither has measurements.
func reference(st *state) *model.Metrics {
	switch {
	case st.rec != nil:
		return st.rec.rep
	case st.base != nil:
		return &st.base.Metrics
	}
	return nil
}

// refName heads the readouts' reference column.
func refName(st *state) string {
	if st.rec != nil {
		return "rec"
	}
	return "base"
}
