package ui

import (
	"context"
	"fmt"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/internal/safefile"
)

// Files (scenarios, protocols, recordings) are read and checked off the
// update loop, so a slow, huge or hostile file never stops the keys: a load
// runs as a command in its own goroutine, the status line shows its progress
// on a tick, Esc cancels it, and its result is put on screen by the update
// loop only if it is still the load asked for last. A load that fails, or is
// cancelled, changes nothing on screen.

// loadRefresh is how often the status line shows a load's progress.
const loadRefresh = 100 * time.Millisecond

// loadFunc reads the opened file f (named path) and returns what the update
// loop's apply puts on screen; it runs off the update loop and must not
// touch the Model.
type loadFunc func(ctx context.Context, f *safefile.File, path string) (any, error)

// applyFunc puts a load's result on screen; it runs on the update loop.
type applyFunc func(m *Model, path string, result any) tea.Cmd

// fileLoad is one kind of file the explorer reads.
type fileLoad struct {
	what  string // "scenario", "protocol", "recording", for the status line
	then  string // what follows the reading: "Checking", "Analysing"
	read  loadFunc
	apply applyFunc
}

// loading is the load in progress.
type loading struct {
	id     int
	load   fileLoad
	path   string
	prog   *safefile.Progress
	cancel context.CancelFunc
}

// loadedMsg is the result of load id.
type loadedMsg struct {
	id     int
	result any
	err    error
}

// loadTickMsg asks for load id's progress to be shown.
type loadTickMsg struct{ id int }

// startLoad reads path as l describes, replacing any load in progress.
func (m *Model) startLoad(l fileLoad, path string) tea.Cmd {
	return m.startLoadWith(l, path, nil)
}

// startLoadWith is startLoad with the file opened by open (nil:
// safefile.Open). The model work of the load (solving a scenario) takes
// its turn in the explorer's share of the pool (inPool).
func (m *Model) startLoadWith(l fileLoad, path string, open safefile.Opener) tea.Cmd {
	m.stopLoad()
	ctx, cancel := context.WithCancel(context.WithValue(context.Background(), tenantKey{}, m.tenant))
	m.loads++
	ld := &loading{id: m.loads, load: l, path: path, prog: &safefile.Progress{}, cancel: cancel}
	m.loading = ld
	m.setStatus(m.loadStatus(ld))
	work := func() tea.Msg {
		defer cancel()
		f, err := safefile.OpenReader(ctx, open, path, ld.prog)
		if err != nil {
			return loadedMsg{id: ld.id, err: err}
		}
		defer f.Close()
		res, err := l.read(ctx, f, path)
		if ctx.Err() != nil {
			err = ctx.Err()
		}
		return loadedMsg{id: ld.id, result: res, err: err}
	}
	return tea.Batch(work, m.loadTick(ld.id))
}

// stopLoad cancels the load in progress, if any, and reports whether there
// was one.
func (m *Model) stopLoad() bool {
	ld := m.loading
	if ld == nil {
		return false
	}
	ld.cancel()
	m.loading = nil
	return true
}

// cancelLoad is Esc during a load.
func (m *Model) cancelLoad() {
	ld := m.loading
	if m.stopLoad() {
		m.setStatus(fmt.Sprintf("Stopped reading %s: nothing changed.", ld.path))
	}
}

// loaded takes a load's result.
func (m *Model) loaded(msg loadedMsg) tea.Cmd {
	ld := m.loading
	if ld == nil || msg.id != ld.id {
		return nil // cancelled or replaced since
	}
	m.loading = nil
	if msg.err != nil {
		m.setError(fmt.Sprintf("%s not opened: %v", capitalize(ld.load.what), msg.err))
		return nil
	}
	return ld.load.apply(m, ld.path, msg.result)
}

// loadProgress shows the progress of the load in progress and asks for the
// next tick.
func (m *Model) loadProgress(msg loadTickMsg) tea.Cmd {
	ld := m.loading
	if ld == nil || msg.id != ld.id {
		return nil
	}
	m.setStatus(m.loadStatus(ld))
	return m.loadTick(ld.id)
}

// loadStatus says how far a load has come.
func (m *Model) loadStatus(ld *loading) string {
	read, size := ld.prog.Read(), ld.prog.Size()
	switch {
	case size > 0 && read < size:
		return fmt.Sprintf("Reading %s %s: %d %% of %s · Esc stops.", ld.load.what, ld.path, int(100*ld.prog.Fraction()), byteSize(size))
	case size > 0:
		return fmt.Sprintf("%s %s %s (%s read) · Esc stops.", ld.load.then, ld.load.what, ld.path, byteSize(size))
	}
	return fmt.Sprintf("Opening %s %s · Esc stops.", ld.load.what, ld.path)
}

// defaultLoadTick is the tick of the running program.
func defaultLoadTick(id int) tea.Cmd {
	return tea.Tick(loadRefresh, func(time.Time) tea.Msg { return loadTickMsg{id} })
}

// byteSize writes a file size for people: 812 B, 14 KB, 3.2 MB, 1.4 GB.
func byteSize(n int64) string {
	f := float64(n)
	switch {
	case n < 1000:
		return fmt.Sprintf("%d B", n)
	case n < 1e6:
		return fmt.Sprintf("%.0f KB", f/1e3)
	case n < 1e9:
		return fmt.Sprintf("%.1f MB", f/1e6)
	}
	return fmt.Sprintf("%.1f GB", f/1e9)
}

// capitalize upper-cases the first letter of an ASCII word.
func capitalize(s string) string {
	if s == "" || s[0] < 'a' || s[0] > 'z' {
		return s
	}
	return string(s[0]-'a'+'A') + s[1:]
}
