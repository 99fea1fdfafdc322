//go:build unix

package ui

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/internal/safefile"
)

// typePath opens prompt key k, types path and presses Enter, returning the
// command Enter gave without running it (the load, off the update loop).
func typePath(m *Model, k, path string) tea.Cmd {
	keys(m, k, "ctrl+u")
	press(m, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(path)})
	_, cmd := m.Update(keyMsg("enter"))
	return cmd
}

// Every file key refuses a named pipe, a device and a folder at once, with
// the kind of file named, and changes nothing on screen.
func TestFileKeysRefuseWhatIsNotAFile(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "pipe.yaml")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ key, path, want string }{
		{"o", fifo, "Scenario not opened: " + fifo + " is a named pipe (FIFO), not a regular file"},
		{"O", fifo, "Recording not opened: " + fifo + " is a named pipe (FIFO), not a regular file"},
		{"O", "/dev/zero", "Recording not opened: /dev/zero is a character device, not a regular file"},
		{"O", dir, "is a folder, not a regular file"},
	} {
		m := sized(t, "normal")
		keys(m, "up")
		before := m.st
		start := time.Now()
		runCmd(m, typePath(m, c.key, c.path))
		if d := time.Since(start); d > time.Second {
			t.Errorf("%s %s took %v", c.key, c.path, d)
		}
		if m.st != before || !m.statusErr || !strings.Contains(m.status, c.want) {
			t.Errorf("%s %s: state changed %v, status %q, want %q", c.key, c.path, m.st != before, m.status, c.want)
		}
	}
	// The protocol file entry of P, the last in the list.
	m := sized(t, "normal")
	keys(m, "P")
	for m.picker.names[m.picker.sel] != protocolFileItem {
		keys(m, "down")
	}
	keys(m, "enter", "ctrl+u")
	press(m, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(fifo)})
	_, cmd := m.Update(keyMsg("enter"))
	runCmd(m, cmd)
	if m.play.run != nil || !strings.Contains(m.status, "Protocol not opened: "+fifo+" is a named pipe") {
		t.Errorf("protocol FIFO: run %v, status %q", m.play.run != nil, m.status)
	}
}

// Esc stops a load: its result, when it comes, is thrown away and nothing
// changes; q still quits while a file is read.
func TestEscStopsALoad(t *testing.T) {
	path := filepath.Join(t.TempDir(), "study.yaml")
	if err := os.WriteFile(path, []byte("version: 1\nname: study\nbase: normal\nparams:\n  filling_pressure_mmhg: 20\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	m := sized(t, "normal")
	before := m.st
	cmd := typePath(m, "o", path)
	if m.loading == nil || !strings.Contains(m.status, "Esc stops") {
		t.Fatalf("no load in progress: %q", m.status)
	}
	keys(m, "esc")
	if m.loading != nil || m.statusErr || !strings.Contains(m.status, "Stopped reading "+path+": nothing changed") {
		t.Fatalf("Esc: loading %v, status %q", m.loading != nil, m.status)
	}
	runCmd(m, cmd) // the work, cancelled, reports back
	if m.st != before || !strings.Contains(m.status, "Stopped reading") {
		t.Errorf("a stopped load changed the screen: name %q, status %q", m.st.name, m.status)
	}

	// A second load replaces the first: only the latest is shown.
	first := typePath(m, "o", path)
	second := typePath(m, "o", path)
	runCmd(m, first)
	if m.st != before {
		t.Errorf("a replaced load was shown")
	}
	runCmd(m, second)
	if m.st.name != "study" || fill(m) != 20 {
		t.Errorf("the latest load was not shown: %q, %q", m.st.name, m.status)
	}

	typePath(m, "O", path)
	if !keys(m, "q") || m.loading != nil {
		t.Errorf("q did not quit during a load")
	}
}

// The status line counts the bytes read, on each progress tick.
func TestLoadShowsProgress(t *testing.T) {
	path := filepath.Join(t.TempDir(), "long.csv")
	data := bytes.Repeat([]byte("0.001,80.5,120.25\n"), 200_000) // 3.6 MB
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	m := sized(t, "normal")
	typePath(m, "O", path) // not run: the file is read below, one chunk
	ld := m.loading
	f, err := safefile.OpenReader(context.Background(), nil, path, ld.prog)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if _, err := f.Read(make([]byte, 1<<20)); err != nil {
		t.Fatal(err)
	}
	m.Update(loadTickMsg{id: ld.id})
	want := "Reading recording " + path + ": 29 % of 3.6 MB · Esc stops."
	if m.status != want {
		t.Errorf("status %q, want %q", m.status, want)
	}
	if !strings.Contains(m.View(), "29 % of 3.6 MB") {
		t.Errorf("progress not on screen")
	}
	m.Update(loadTickMsg{id: ld.id - 1})
	if m.status != want {
		t.Errorf("a stale tick changed the status: %q", m.status)
	}
}

// A file named with an escape sequence (a window-title OSC, a screen clear)
// is shown escaped everywhere: the status line, the play view, the overlay
// legend. With colour off, the frame holds no ESC or BEL at all.
func TestHostileFileNamesShowEscaped(t *testing.T) {
	dir := t.TempDir()
	hostile := "x\x1b]0;owned\x07\x1b[2J"
	shown := `x\x1b]0;owned\x07\x1b[2J`
	scen := filepath.Join(dir, hostile+".yaml")
	if err := os.WriteFile(scen, []byte("version: 1\nname: study\nbase: normal\nparams: {}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	proto := filepath.Join(dir, hostile+"-proto.yaml")
	if err := os.WriteFile(proto, []byte("version: 1\nsteps:\n  - {label: rest, hold: 3}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	rec := filepath.Join(dir, hostile+".csv")
	data, err := os.ReadFile(occlusionCSV)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(rec, data, 0o644); err != nil {
		t.Fatal(err)
	}
	m := sized(t, "normal")
	check := func(what, want string) {
		t.Helper()
		screen := m.View()
		if strings.ContainsAny(screen, "\x1b\x07") {
			t.Errorf("%s: the frame holds ESC or BEL", what)
		}
		if !strings.Contains(strings.ReplaceAll(screen, "\n   ", " "), want) {
			t.Errorf("%s: the frame lacks %q:\n%s", what, want, screen)
		}
	}
	// The path prompt drops control characters typed or pasted; a path can
	// still hold them (a name completed or remembered), so load it directly.
	runCmd(m, m.open(scen))
	check("open", "Opened "+filepath.Join(dir, shown)+".yaml (study)")
	runCmd(m, m.openRecording(rec))
	check("overlay", shown+".csv")
	runCmd(m, m.playFile(proto))
	check("play", shown+"-proto")
}
