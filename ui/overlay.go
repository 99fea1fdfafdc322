package ui

import (
	"fmt"
	"path/filepath"
	"strings"

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
	r := &recording{path: path, name: filepath.Base(path), ov: ov, kept: len(ov.Loops)}
	if i := ov.Representative; i >= 0 {
		for _, b := range a.Beats {
			if b.Index == ov.Loops[i].Beat && b.Measured {
				r.rep, r.repBeat = &b.Metrics, b.Index
			}
		}
	}
	return r, nil
}

// openRecording reads, analyses and overlays a recording. A file that cannot
// be read or analysed changes nothing; the status line names the file, the
// line and the column at fault.
func (m *Model) openRecording(path string) {
	a, err := analysis.Open(path, analysis.ReadOptions{}, analysis.Options{})
	m.overlaid(path, a, err)
}

// overlaid overlays a recording read and analysed from the file shown as
// path, or says why it was not read.
func (m *Model) overlaid(path string, a *analysis.Analysis, err error) {
	var rec *recording
	if err == nil {
		rec, err = newRecording(path, a)
	}
	if err != nil {
		m.setError("Recording not opened: " + err.Error())
		return
	}
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
