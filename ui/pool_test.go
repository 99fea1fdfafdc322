package ui

import (
	"io"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/muesli/termenv"

	"pvcouple/internal/pool"
	"pvcouple/presets"
)

// Two explorers share a pool of one slot, as sessions of a busy lab server
// share the cores: while one solves a coupling map in the background, the
// other's nudge waits for at most one of the map's points, not for the map.
func TestMapDoesNotStallAnotherExplorersNudge(t *testing.T) {
	p := pool.New(1)
	open := func() *Model {
		sc, _ := presets.Get("normal")
		m, err := NewWithOptions(sc, "preset normal", NewStyles(NewRenderer(io.Discard, termenv.Ascii)), Options{Pool: p})
		if err != nil {
			t.Fatal(err)
		}
		t.Cleanup(m.Close)
		m.Update(tea.WindowSizeMsg{Width: 120, Height: 40})
		return m
	}
	mapper, nudger := open(), open()
	mapper.Update(keyMsg("4")) // the coupling map view starts its job
	mv := mapper.views[mapper.cur].(*mapView)
	if mv.job == nil {
		t.Fatal("no map being solved")
	}
	time.Sleep(20 * time.Millisecond) // the map's points hold the slot by turns

	for i := range 5 {
		_, cmd := nudger.Update(keyMsg("up"))
		start := time.Now()
		msg := cmd().(solvedMsg)
		took := time.Since(start)
		nudger.Update(msg)
		if msg.err != nil || !nudger.st.settled() {
			t.Fatalf("nudge %d: %v", i, msg.err)
		}
		// One map point is a warm solve of a few beats, about a
		// millisecond here; 50 ms leaves room for a slow, shared machine
		// and is still far below the whole map (hundreds of points).
		limit := 50 * time.Millisecond
		if raceDetector {
			limit *= 10 // the race detector slows the solve itself
		}
		if took > limit {
			t.Errorf("nudge %d waited %v for its solve beside a map", i, took)
		}
	}
	select {
	case <-mv.job.Done():
		t.Fatal("the map finished before the nudges: the test shows nothing")
	default:
	}
	if st := p.Stats(); st.Granted[pool.Background] == 0 || st.Granted[pool.Interactive] < 5 {
		t.Errorf("pool counts %+v: want map points and the nudges through the pool", st)
	}
}
