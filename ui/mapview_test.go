package ui

import (
	"context"
	"errors"
	"runtime"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/muesli/termenv"

	"pvcouple/model"
	"pvcouple/model/sweep"
)

// mapOf returns the map view of m.
func mapOf(t *testing.T, m *Model) *mapView {
	t.Helper()
	for _, v := range m.views {
		if mv, ok := v.(*mapView); ok {
			return mv
		}
	}
	t.Fatal("no map view")
	return nil
}

// onMap returns the explorer at 120×40 on the map view, the map solved.
func onMap(t *testing.T, preset string) (*Model, *mapView) {
	t.Helper()
	m := sized(t, preset)
	t.Cleanup(m.Close)
	keys(m, "4")
	v := mapOf(t, m)
	if v.job == nil || !v.finished {
		t.Fatalf("map not solved: job %v, finished %v, err %v", v.job, v.finished, v.err)
	}
	return m, v
}

// marker returns the row and column of the setting's mark on the screen.
func marker(t *testing.T, screen string) (row, col int) {
	t.Helper()
	for r, line := range strings.Split(screen, "\n") {
		if i := strings.Index(line, mapMarker); i >= 0 {
			return r, len([]rune(line[:i]))
		}
	}
	t.Fatalf("no %s on screen:\n%s", mapMarker, screen)
	return 0, 0
}

func leverIndex(t *testing.T, key string) int {
	for i, l := range model.Levers {
		if l.Key == key {
			return i
		}
	}
	t.Fatalf("no lever %s", key)
	return 0
}

// The default map is stroke work over systemic resistance (columns) and Ees
// (rows), spanning half to twice the setting (sweep.MapAround).
func TestMapDefaults(t *testing.T) {
	m, v := onMap(t, "normal")
	ay, ax := v.grid.Axes[0], v.grid.Axes[1]
	if ax.Key != "resistance_mmhg_s_per_ml" || ay.Key != "ees_mmhg_per_ml" || sweep.MapMetrics[v.metric] != "sw_mmhg_ml" {
		t.Errorf("map of %s over %s × %s", sweep.MapMetrics[v.metric], ax.Key, ay.Key)
	}
	p := m.st.target
	if ax.From != p.Resistance/2 || ax.To != 2*p.Resistance || ay.From != p.Ees/2 || ay.To != 2*p.Ees {
		t.Errorf("axes %v, %v around R %g, Ees %g", ax, ay, p.Resistance, p.Ees)
	}
	nx, ny := v.dims()
	if ax.N != nx || ay.N != ny || len(v.vals) != nx*ny {
		t.Errorf("grid %d×%d, %d values; view fits %d×%d", ax.N, ay.N, len(v.vals), nx, ny)
	}
	screen := m.View()
	for _, want := range []string{"Ees mmHg/mL", "R sys mmHg·s/mL", "SW: stroke work", "mmHg·mL", "◆ now " + fmtNum(m.st.shown.Metrics.SW, 0), "* max ", "points in"} {
		if !strings.Contains(screen, want) {
			t.Errorf("map screen lacks %q", want)
		}
	}
	// The largest stroke work of the map is at its largest Ees (a stronger
	// ventricle does more work against the same load; common practice, no
	// source), and it is the largest value of the job's field.
	_, iMax := sweep.Extremes(v.vals)
	if iMax/nx != ny-1 {
		t.Errorf("largest SW in row %d of %d", iMax/nx, ny)
	}
}

func TestMapKeys(t *testing.T) {
	m, v := onMap(t, "normal")
	first := v.started
	for _, c := range []struct {
		key    string
		metric string
	}{{"m", "efficiency"}, {"m", "esp_mmhg"}, {"M", "efficiency"}, {"M", "sw_mmhg_ml"}, {"M", "sv_ml"}, {"M", "ef_pct"}} {
		keys(m, c.key)
		if sweep.MapMetrics[v.metric] != c.metric {
			t.Errorf("%s: metric %s, want %s", c.key, sweep.MapMetrics[v.metric], c.metric)
		}
		spec, _ := model.MetricByKey(c.metric)
		if !strings.Contains(m.View(), spec.Label+":") || !strings.Contains(m.status, "Map of "+spec.Label) {
			t.Errorf("%s: %s not on screen; status %q", c.key, spec.Label, m.status)
		}
	}
	if v.started != first {
		t.Errorf("changing the metric solved the map again (%d jobs)", v.started)
	}
	ees, r, fill, hr := leverIndex(t, "ees_mmhg_per_ml"), leverIndex(t, "resistance_mmhg_s_per_ml"),
		leverIndex(t, "filling_pressure_mmhg"), leverIndex(t, "heart_rate_bpm")
	for _, c := range []struct {
		key    string
		kx, ky int
	}{
		{"x", hr, ees},                     // R sys → heart rate
		{"X", r, ees},                      // back
		{"X", fill, ees},                   // Ees is the y lever: skipped
		{"y", fill, r},                     // Ees → R sys
		{"Y", fill, ees},                   // back
		{"Y", fill, len(model.Levers) - 1}, // Fill P is the x lever: skipped, wrapping round
	} {
		before := v.started
		keys(m, c.key)
		if v.kx != c.kx || v.ky != c.ky {
			t.Errorf("%s: levers %d × %d, want %d × %d", c.key, v.kx, v.ky, c.kx, c.ky)
		}
		if v.started != before+1 || v.grid.Axes[1].Key != model.Levers[c.kx].Key || v.grid.Axes[0].Key != model.Levers[c.ky].Key {
			t.Errorf("%s: no new map of the new levers (%d jobs, axes %s × %s)", c.key, v.started-before, v.grid.Axes[1].Key, v.grid.Axes[0].Key)
		}
		if !strings.Contains(m.View(), model.Levers[c.kx].Short+" "+model.Levers[c.kx].Spec().Unit) {
			t.Errorf("%s: x axis title not on screen", c.key)
		}
	}
}

// Nudging a lever of the map moves the marker and keeps the map; nudging
// another lever, or leaving the map, solves a new one.
func TestMapFollowsLevers(t *testing.T) {
	m, v := onMap(t, "normal")
	job := v.job
	row0, col0 := marker(t, m.View())
	keys(m, "tab", "tab", "K") // systemic resistance up 0.25
	row1, col1 := marker(t, m.View())
	if v.job != job || v.started != 1 {
		t.Fatalf("nudging R sys solved the map again")
	}
	if row1 != row0 || col1 <= col0 {
		t.Errorf("R sys up: marker from (%d, %d) to (%d, %d), want it right", row0, col0, row1, col1)
	}
	keys(m, "shift+tab", "K") // Ees up 0.5
	row2, col2 := marker(t, m.View())
	if v.job != job || row2 >= row1 || col2 != col1 {
		t.Errorf("Ees up: marker from (%d, %d) to (%d, %d), want it up; new job %v", row1, col1, row2, col2, v.job != job)
	}
	keys(m, "shift+tab", "up") // filling pressure: not a lever of the map
	if v.job == job || v.started != 2 || !v.finished || v.grid.Base.FillingPressure != 9 {
		t.Errorf("filling pressure up: jobs %d, base %g", v.started, v.grid.Base.FillingPressure)
	}
	// Ees past twice the map's centre leaves the map: a new one around it.
	job = v.job
	top := v.grid.Axes[0].To
	keys(m, "tab")
	for m.st.target.Ees <= top {
		keys(m, "K")
	}
	if v.job == job || v.grid.Axes[0].From != m.st.target.Ees/2 {
		t.Errorf("Ees %g off the map (top %g): axes %v", m.st.target.Ees, top, v.grid.Axes[0])
	}
	// Undo comes back onto the map's levers only; a map is solved around the
	// state undo returns to when it is off the map.
	if v.err != nil {
		t.Error(v.err)
	}
}

// Leaving the view cancels a map being solved; coming back solves it anew.
// The map never holds up the keys: Update returns while the job runs.
func TestMapCancelledOffScreen(t *testing.T) {
	m := sized(t, "normal")
	t.Cleanup(m.Close)
	v := mapOf(t, m)
	t0 := time.Now()
	m.Update(keyMsg("4")) // not press: the job's ticks are not run
	if d := time.Since(t0); d > 50*time.Millisecond {
		t.Errorf("starting the map took %v", d)
	}
	job := v.job
	if job == nil {
		t.Fatal("no job on the map view")
	}
	t0 = time.Now()
	m.Update(keyMsg("tab"))
	m.Update(keyMsg("up")) // a nudge of Ees while the map is solved
	m.Update(keyMsg("1"))
	if d := time.Since(t0); d > 100*time.Millisecond {
		t.Errorf("keys took %v while the map was solved", d)
	}
	select {
	case <-job.Done():
	case <-time.After(2 * time.Second):
		t.Fatal("the job runs on off screen")
	}
	if _, err := job.Wait(); err == nil {
		t.Log("the job ended before it was cancelled") // a fast machine: nothing to check
	}
	if v.job != nil {
		t.Error("the cancelled map is kept")
	}
	keys(m, "4")
	if v.job == nil || v.job == job || !v.finished {
		t.Error("coming back did not solve the map")
	}
	// A finished map is kept off screen and shown again without solving.
	n := v.started
	keys(m, "1", "4")
	if v.started != n {
		t.Error("a finished map was solved again")
	}
}

// No goroutine of the map outlives the program: quitting while a map is
// solved cancels it.
func TestMapQuitStopsJob(t *testing.T) {
	m := newTestModel(t, "normal", termenv.ANSI256)
	var buf lockedBuffer
	prog := NewProgram(m, tea.WithOutput(&buf), tea.WithInput(nil), tea.WithoutSignals())
	done := make(chan struct{})
	go func() {
		defer close(done)
		if _, err := prog.Run(); err != nil {
			t.Error(err)
		}
	}()
	prog.Send(tea.WindowSizeMsg{Width: 200, Height: 60}) // a large map: still solving at q
	prog.Send(keyMsg("4"))
	prog.Send(keyMsg("q"))
	<-done
	v := mapOf(t, m)
	if !v.closed || v.started != 1 || v.finished {
		t.Errorf("closed %v, %d jobs, finished %v: want one job, cancelled by q", v.closed, v.started, v.finished)
	}
	select {
	case <-v.lastJob.Done():
	case <-time.After(time.Second):
		t.Fatal("the map's job runs on after the program ended")
	}
	if _, err := v.lastJob.Wait(); !errors.Is(err, context.Canceled) {
		t.Errorf("the job ended with %v, want it cancelled", err)
	}
	ours := func() string {
		b := make([]byte, 1<<20)
		for _, g := range strings.Split(string(b[:runtime.Stack(b, true)]), "\n\n") {
			if strings.Contains(g, "pvcouple/model") || strings.Contains(g, "pvcouple/ui.") && !strings.Contains(g, "TestMapQuitStopsJob") {
				return g
			}
		}
		return ""
	}
	deadline := time.Now().Add(3 * time.Second)
	for ours() != "" && time.Now().Before(deadline) {
		time.Sleep(10 * time.Millisecond)
	}
	if g := ours(); g != "" {
		t.Errorf("a goroutine of the explorer outlives the program:\n%s", g)
	}
}

// Every lever makes a map with the other default lever, around every
// preset: the axes hold the setting, and the marker is on screen.
func TestMapEveryLever(t *testing.T) {
	if testing.Short() {
		t.Skip("solves many maps")
	}
	for _, preset := range []string{"normal", "hfref"} {
		m := newTestModel(t, preset, termenv.Ascii)
		t.Cleanup(m.Close)
		press(m, tea.WindowSizeMsg{Width: 80, Height: 24})
		keys(m, "4")
		v := mapOf(t, m)
		for range len(model.Levers) - 1 {
			keys(m, "x")
			l := model.Levers[v.kx]
			if v.err != nil || v.job == nil || !v.finished {
				t.Errorf("%s, map over %s: err %v", preset, l.Key, v.err)
				continue
			}
			ok := 0
			for _, s := range v.stat {
				if s == sweep.OK {
					ok++
				}
			}
			if ok < len(v.stat)/2 {
				t.Errorf("%s, map over %s: %d of %d points settled", preset, l.Key, ok, len(v.stat))
			}
			if !v.holds(m.st.target, v.grid.Axes[1].N, v.grid.Axes[0].N) {
				t.Errorf("%s, map over %s: axes %v do not hold the setting", preset, l.Key, v.grid.Axes[1])
			}
			marker(t, m.View())
		}
	}
}

// Off the map view, the map's keys say where the map is and change nothing;
// in the protocol view x stops the run instead (play_test.go).
func TestMapKeysElsewhere(t *testing.T) {
	m := sized(t, "normal")
	v := mapOf(t, m)
	for _, view := range []string{"1", "2", "3"} {
		keys(m, view)
		for _, k := range []string{"m", "M", "x", "X", "y", "Y"} {
			if view == "3" && k == "x" {
				continue
			}
			metric, kx, ky := v.metric, v.kx, v.ky
			keys(m, k)
			if v.metric != metric || v.kx != kx || v.ky != ky || v.job != nil {
				t.Errorf("%s in view %s changed the map", k, view)
			}
			if m.statusErr || !strings.Contains(m.status, "coupling map") || !strings.Contains(m.status, "view 4 shows it") {
				t.Errorf("%s in view %s: status %q", k, view, m.status)
			}
			if here := strings.Contains(m.status, "x stops the run"); here != (view == "3") {
				t.Errorf("%s in view %s: status %q", k, view, m.status)
			}
		}
	}
}
