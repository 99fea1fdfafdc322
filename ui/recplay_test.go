package ui

import (
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
)

// readoutHead is the heading line of the readout panel on screen: the line
// with the Δ column's heading.
func readoutHead(t *testing.T, screen string) string {
	t.Helper()
	for _, line := range strings.Split(screen, "\n") {
		if strings.Contains(line, "unit") && strings.Contains(line, "Δ") {
			return line
		}
	}
	t.Fatalf("no readout heading on screen:\n%s", screen)
	return ""
}

// With a recording open, the protocol view's readouts still count from the
// run's start; the other views' count from the recording; a recording
// opened after another replaces it in the readouts (the panel's cache
// tells them apart), and clearing it brings back the baseline.
func TestRecordingBesideProtocol(t *testing.T) {
	for _, size := range []struct{ w, h int }{{120, 40}, {80, 24}} {
		m, tk := playing(t, "normal", "preload-reduction", size.w, size.h)
		t.Cleanup(m.Close)
		tk.run(t, 6)
		keys(m, " ") // pause
		openRec(m, steadyCSV)
		rec := m.st.rec
		if rec == nil || rec.rep == nil || !m.onPlay() {
			t.Fatalf("%d×%d: recording %v, protocol view on screen %v; status %q", size.w, size.h, rec, m.onPlay(), m.status)
		}
		wide := size.w >= 120
		// The protocol view: the beat against the run's start, and the fit.
		screen := m.View()
		head := readoutHead(t, screen)
		if !strings.Contains(head, "beat") || strings.Contains(head, "rec") || !strings.Contains(head, "%") {
			t.Errorf("%d×%d protocol view with a recording: head %q", size.w, size.h, head)
		}
		if wide && !strings.Contains(head, "start") {
			t.Errorf("%d×%d protocol view: head %q lacks start", size.w, size.h, head)
		}
		if !strings.Contains(screen, "ESPVR") || !strings.Contains(screen, " fit ") {
			t.Errorf("%d×%d protocol view lost its fit section:\n%s", size.w, size.h, screen)
		}
		v := m.play
		sv := screenRow(t, screen, "SV")
		if wide && sv[len(sv)-3] != fmtNum(v.run.start.Metrics.SV, 1) {
			t.Errorf("SV row %q: want the run's start %s", sv, fmtNum(v.run.start.Metrics.SV, 1))
		}
		// Every other view: the steady loop against the recording.
		for _, k := range []string{"1", "2", "4"} {
			keys(m, k)
			screen := m.View()
			head := readoutHead(t, screen)
			if !strings.Contains(head, "now") || !strings.Contains(head, "rec") {
				t.Errorf("%d×%d view %s with a recording: head %q", size.w, size.h, k, head)
			}
			if wide != strings.Contains(head, "%") {
				t.Errorf("%d×%d view %s: head %q (narrow: rec and Δ, no %%)", size.w, size.h, k, head)
			}
			sv := screenRow(t, screen, "SV")
			col := len(sv) - 2 // narrow: … rec Δ
			if wide {
				col = len(sv) - 3 // wide: … rec Δ %
			}
			if sv[col] != fmtNum(rec.rep.SV, 1) {
				t.Errorf("%d×%d view %s: SV row %q, want rec %s", size.w, size.h, k, sv, fmtNum(rec.rep.SV, 1))
			}
		}
		keys(m, "1")
		_ = m.View()
		openRec(m, occlusionCSV)
		other := m.st.rec
		if other == nil || other == rec || other.rep == nil || other.rep.SV == rec.rep.SV {
			t.Fatalf("second recording: %+v; status %q", other, m.status)
		}
		sv = screenRow(t, m.View(), "SV")
		if !strings.Contains(strings.Join(sv, " "), fmtNum(other.rep.SV, 1)) {
			t.Errorf("%d×%d after a second recording: SV row %q, want rec %s", size.w, size.h, sv, fmtNum(other.rep.SV, 1))
		}
		keys(m, "C")
		if head := readoutHead(t, m.View()); strings.Contains(head, "rec") || wide && !strings.Contains(head, "base") {
			t.Errorf("%d×%d after C: head %q", size.w, size.h, head)
		}
		// Back on the protocol view the paused run is as it was.
		keys(m, "3")
		if !strings.Contains(readoutHead(t, m.View()), "beat") || v.run == nil {
			t.Errorf("%d×%d: the run did not survive the recording", size.w, size.h)
		}
	}
}

// x stops a run in the protocol view, moves the map's x lever in the map
// view and elsewhere says where the map is; nowhere else does it stop the
// run, and in the protocol view it leaves the map alone.
func TestXByView(t *testing.T) {
	m, _ := playing(t, "normal", "preload-reduction", 120, 40)
	t.Cleanup(m.Close)
	v, mv := m.play, mapOf(t, m)
	kx := mv.kx
	for _, k := range []string{"1", "2"} {
		keys(m, k, "x")
		if v.run == nil || mv.kx != kx || !strings.Contains(m.status, "view 4 shows it") {
			t.Errorf("x in view %s: run %v, map x lever %d, %q", k, v.run != nil, mv.kx, m.status)
		}
	}
	keys(m, "4", "x")
	if v.run == nil || mv.kx == kx || !strings.Contains(m.status, "Map of") {
		t.Errorf("x in the map view: run %v, map x lever %d → %d, %q", v.run != nil, kx, mv.kx, m.status)
	}
	kx = mv.kx
	keys(m, "3", "x")
	if v.run != nil || mv.kx != kx || !strings.Contains(m.status, "Stopped preload-reduction") {
		t.Errorf("x in the protocol view: run %v, map x lever %d, %q", v.run != nil, mv.kx, m.status)
	}
	press(m, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("X")})
	if mv.kx != kx || !strings.Contains(m.status, "x stops the run") {
		t.Errorf("X in the protocol view: map x lever %d, %q", mv.kx, m.status)
	}
}
