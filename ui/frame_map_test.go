package ui

import (
	"bytes"
	"sync"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/muesli/termenv"
)

// frameLog records each write of the renderer (one frame each) and when.
type frameLog struct {
	mu     sync.Mutex
	sizes  []int
	times  []time.Time
	finish int // index of the first frame that shows the map finished; −1 until then
}

func (f *frameLog) Write(p []byte) (int, error) {
	f.mu.Lock()
	defer f.mu.Unlock()
	f.sizes = append(f.sizes, len(p))
	f.times = append(f.times, time.Now())
	if f.finish < 0 && bytes.Contains(p, []byte("points in")) {
		f.finish = len(f.sizes) - 1
	}
	return len(p), nil
}

func (f *frameLog) total() int {
	f.mu.Lock()
	defer f.mu.Unlock()
	n := 0
	for _, s := range f.sizes {
		n += s
	}
	return n
}

func (f *frameLog) done() bool {
	f.mu.Lock()
	defer f.mu.Unlock()
	return f.finish >= 0
}

// TestMapFrames holds the map, while it fills in, to at most 12 frames a
// second (it is redrawn every mapTick, 100 ms; the key's own frame comes on
// top) and at most 16 KB a frame in 256 colours, and reports the figures. A
// map at 200×60 has the most points the view solves (48 × 32). A nudge of
// a lever of the map, which only moves the marker, is held to the explorer's
// 8 KB at 120×40 (TestBytesPerNudge) and, since a changed line is written
// whole, to 8 KB per 120 columns in wider windows: every readout that moves
// rewrites the map line beside it, and the closed circulation's readouts
// move with every nudge.
func TestMapFrames(t *testing.T) {
	if testing.Short() {
		t.Skip("takes a second")
	}
	for _, c := range []struct {
		w, h int
		p    termenv.Profile
	}{{120, 40, termenv.ANSI256}, {200, 60, termenv.ANSI256}, {120, 40, termenv.Ascii}} {
		m := newTestModel(t, "normal", c.p)
		log := &frameLog{finish: -1}
		prog := NewProgram(m, tea.WithOutput(log), tea.WithInput(nil), tea.WithoutSignals())
		done := make(chan struct{})
		go func() {
			defer close(done)
			if _, err := prog.Run(); err != nil {
				t.Error(err)
			}
		}()
		prog.Send(tea.WindowSizeMsg{Width: c.w, Height: c.h})
		time.Sleep(100 * time.Millisecond)
		log.mu.Lock()
		first := len(log.sizes)
		log.mu.Unlock()
		prog.Send(keyMsg("4"))
		deadline := time.Now().Add(20 * time.Second)
		for !log.done() && time.Now().Before(deadline) {
			time.Sleep(5 * time.Millisecond)
		}
		// Nudges of a lever of the map: the marker moves, the map stays.
		prog.Send(keyMsg("tab"))
		prog.Send(keyMsg("tab"))
		time.Sleep(150 * time.Millisecond)
		var nudges []int
		last := log.total()
		for i := range 8 {
			k := keyUp
			if i%2 == 1 {
				k = keyDown
			}
			prog.Send(k)
			time.Sleep(80 * time.Millisecond)
			now := log.total()
			nudges = append(nudges, now-last)
			last = now
		}
		prog.Quit()
		<-done
		m.Close()
		if log.finish < 0 {
			t.Fatalf("%d×%d: the map did not finish", c.w, c.h)
		}
		t.Logf("%d×%d %s: median %d bytes per nudge of systemic resistance on the map (all: %v)", c.w, c.h, profileName[c.p], median(nudges), nudges)
		if med, budget := median(nudges), 8192*max(c.w, 120)/120; med > budget {
			t.Errorf("%d×%d: median %d bytes per nudge on the map, want ≤ %d", c.w, c.h, med, budget)
		}
		sizes, times := log.sizes[first:log.finish+1], log.times[first:log.finish+1]
		span := times[len(times)-1].Sub(times[0])
		rate := float64(len(sizes)-1) / span.Seconds()
		total := 0
		for _, s := range sizes {
			total += s
		}
		t.Logf("%d×%d %s: %d frames over %v while filling in (%.1f per second), median %d bytes, largest %d, %d in all",
			c.w, c.h, profileName[c.p], len(sizes), span.Round(time.Millisecond), rate, median(sizes), maxInt(sizes), total)
		if len(sizes) > 2 && rate > 12 {
			t.Errorf("%d×%d: %.1f frames per second while the map fills in, want ≤ 12", c.w, c.h, rate)
		}
		if med := median(sizes); med > 16384 {
			t.Errorf("%d×%d: median %d bytes per frame while the map fills in, want ≤ 16384", c.w, c.h, med)
		}
	}
}

func maxInt(x []int) int {
	m := 0
	for _, v := range x {
		m = max(m, v)
	}
	return m
}

var profileName = map[termenv.Profile]string{termenv.Ascii: "no colour", termenv.ANSI: "16 colours", termenv.ANSI256: "256 colours", termenv.TrueColor: "true colour"}

// BenchmarkMapNudge is one nudge of systemic resistance on the coupling map
// at 120×40 in 256 colours: the solve, the marker moved, the frame drawn.
func BenchmarkMapNudge(b *testing.B) {
	m := newTestModel(b, "normal", termenv.ANSI256)
	b.Cleanup(m.Close)
	press(m, tea.WindowSizeMsg{Width: 120, Height: 40})
	keys(m, "4", "tab", "tab")
	_ = m.View()
	i := 0
	for b.Loop() {
		k := keyUp
		if i%2 == 1 {
			k = keyDown
		}
		i++
		press(m, k)
		_ = m.View()
	}
}
