package ui

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/muesli/termenv"
)

// openRec overlays the recording at path with the keys a user types.
func openRec(m *Model, path string) { keys(m, "O", "ctrl+u", path, "enter") }

// withoutFooter is the screen without the status and key lines.
func withoutFooter(screen string) string {
	lines := strings.Split(screen, "\n")
	return strings.Join(lines[:len(lines)-2], "\n")
}

func TestRecordingKeys(t *testing.T) {
	m := sized(t, "hfref")
	keys(m, "O")
	if m.mode != modePrompt || m.promptFor != promptRecording || !strings.Contains(m.View(), "Open recording (CSV): ") {
		t.Fatalf("O: mode %v, prompt %q", m.mode, m.prompt.Prompt)
	}
	keys(m, "esc")
	if m.mode != modeMain || m.st.rec != nil {
		t.Fatalf("Esc: mode %v, recording %v", m.mode, m.st.rec)
	}
	openRec(m, occlusionCSV)
	rec := m.st.rec
	if rec == nil || rec.rep == nil || rec.ov.ESPVR == nil {
		t.Fatalf("recording not overlaid: %+v; status %q", rec, m.status)
	}
	if m.statusErr || !strings.Contains(m.status, "Overlaid occlusion-synthetic.csv") {
		t.Errorf("status %q", m.status)
	}
	screen := m.View()
	// The axes take the recording in (hfref's loop alone sits right of it).
	pv := m.views[0].(*pvView)
	if !pv.f.X.contains(rec.ov.VMin, rec.ov.VMax) || !pv.f.Y.contains(rec.ov.PMin, rec.ov.PMax) {
		t.Errorf("frame %+v does not hold the recording's V %g–%g, P %g–%g", pv.f, rec.ov.VMin, rec.ov.VMax, rec.ov.PMin, rec.ov.PMax)
	}
	for _, want := range []string{"• rec beat", "rec ESPVR Ees " + fmtNum(rec.ov.ESPVR.Ees, 2), string(recLoopMark), "rec"} {
		if !strings.Contains(screen, want) {
			t.Errorf("screen lacks %q", want)
		}
	}
	// The readouts compare with the recording's steady beat.
	sv := screenRow(t, screen, "SV")
	now := m.st.shown.Metrics.SV
	if sv[len(sv)-3] != fmtNum(rec.rep.SV, 1) || sv[len(sv)-2] != fmtDelta(now-rec.rep.SV, 1) {
		t.Errorf("SV row %q: want rec %s and Δ %s", sv, fmtNum(rec.rep.SV, 1), fmtDelta(now-rec.rep.SV, 1))
	}
	// The lever nudges still work with a recording open.
	keys(m, "up")
	if m.st.target.FillingPressure != 21 || m.st.rec != rec {
		t.Errorf("after a nudge: filling pressure %g, recording kept %v", m.st.target.FillingPressure, m.st.rec == rec)
	}
	keys(m, "C")
	if m.st.rec != nil || strings.Contains(m.View(), "• rec") || !strings.Contains(m.status, "Cleared") {
		t.Errorf("C: recording %v, status %q", m.st.rec, m.status)
	}
	if sv := screenRow(t, m.View(), "SV"); sv[len(sv)-3] != fmtNum(m.st.base.Metrics.SV, 1) {
		t.Errorf("after C, SV row %q: want the baseline again", sv)
	}
	keys(m, "C")
	if !m.statusErr {
		t.Errorf("C with nothing to clear: status %q", m.status)
	}
}

// The narrow readout panel swaps % for the recording's value.
func TestRecordingNarrowReadouts(t *testing.T) {
	m := newTestModel(t, "normal", termenv.Ascii)
	press(m, tea.WindowSizeMsg{Width: 80, Height: 24})
	openRec(m, steadyCSV)
	screen := m.View()
	if !strings.Contains(screen, "now  unit       rec      Δ") {
		t.Errorf("narrow readout head:\n%s", screen)
	}
	ef := screenRow(t, screen, "EF")
	if ef[len(ef)-2] != fmtNum(m.st.rec.rep.EF, 1) {
		t.Errorf("EF row %q: want rec %s", ef, fmtNum(m.st.rec.rep.EF, 1))
	}
}

// A file that cannot be read or analysed changes nothing on screen but the
// status line, which names the file, the line and the column.
func TestBadRecordingChangesNothing(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.csv")
	if err := os.WriteFile(bad, []byte("time_s,pressure_mmhg,volume_ml\n0,10,120\n0.004,abc,121\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	flat := filepath.Join(dir, "flat.csv")
	var b strings.Builder
	b.WriteString("time_s,pressure_mmhg,volume_ml\n")
	for i := range 1000 {
		b.WriteString(strings.Join([]string{fmtNum(float64(i)*0.004, 3), "10", "120"}, ",") + "\n")
	}
	if err := os.WriteFile(flat, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		path string
		want []string // in the status line
	}{
		{bad, []string{"bad.csv:3", `column "pressure_mmhg"`, `"abc" is not a number`}},
		{filepath.Join(dir, "missing.csv"), []string{"missing.csv", "no such file"}},
		{flat, []string{"flat.csv", `column "pressure_mmhg"`, "hardly varies"}},
		{dir, []string{dir}},
	} {
		for _, before := range []string{"", occlusionCSV} {
			m := sized(t, "normal")
			if before != "" {
				openRec(m, before)
			}
			rec, st, screen := m.st.rec, m.st, withoutFooter(m.View())
			openRec(m, c.path)
			if m.st != st || m.st.rec != rec {
				t.Errorf("%s over %q: the state changed", c.path, before)
			}
			if got := withoutFooter(m.View()); got != screen {
				t.Errorf("%s over %q: the screen changed:\n%s", c.path, before, got)
			}
			if !m.statusErr {
				t.Errorf("%s: status %q is not an error", c.path, m.status)
			}
			for _, w := range c.want {
				if !strings.Contains(m.status, w) {
					t.Errorf("%s: status %q lacks %q", c.path, m.status, w)
				}
			}
		}
	}
}

// The representative loop is the steady beat of median end-diastolic
// volume, and the readouts' rec column is that beat's measurement.
func TestRecordingRepresentative(t *testing.T) {
	m := sized(t, "normal")
	openRec(m, steadyCSV)
	rec := m.st.rec
	l := rec.ov.Loops[rec.ov.Representative]
	if l.Beat != rec.repBeat || !l.Steady {
		t.Fatalf("representative loop of beat %d (steady %v), metrics of beat %d", l.Beat, l.Steady, rec.repBeat)
	}
	// Its measurements lie on the loop drawn.
	lo, hi := l.V[0], l.V[0]
	for _, v := range l.V {
		lo, hi = min(lo, v), max(hi, v)
	}
	if !(rec.rep.EDV >= lo && rec.rep.EDV <= hi && rec.rep.ESV >= lo && rec.rep.ESV <= hi) {
		t.Errorf("rec EDV %g and ESV %g outside the loop's volumes %g–%g", rec.rep.EDV, rec.rep.ESV, lo, hi)
	}
}

// A small heart's recording (the synthetic mouse example) gives its ESPVR
// on the legend line in µL, as analyze shows it.
func TestRecordingSmallHeartInMicrolitres(t *testing.T) {
	m := sized(t, "normal")
	openRec(m, "../testdata/recordings/mouse-synthetic.csv")
	rec := m.st.rec
	if rec == nil || rec.ov.ESPVR == nil {
		t.Fatalf("recording not overlaid; status %q", m.status)
	}
	want := "Ees " + fmtNum(rec.ov.ESPVR.Ees/1000, 2) + " mmHg/µL"
	if screen := m.View(); !strings.Contains(screen, want) || !strings.Contains(screen, " µL") {
		t.Errorf("screen lacks %q:\n%s", want, screen)
	}
}
