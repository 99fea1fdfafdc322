package ui

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/muesli/termenv"

	"pvcouple/presets"
)

// dirFolders is Folders over two plain folders, for the explorer's side of
// a session (the server's os.Root folders are tested in package server).
type dirFolders struct{ own, shared string }

func (d dirFolders) dir(f File) string {
	if f.Shared {
		return d.shared
	}
	return d.own
}

func (d dirFolders) List(k FileKind) ([]File, error) {
	ext := map[FileKind]string{ScenarioFiles: ".yaml", ProtocolFiles: ".yaml", RecordingFiles: ".csv"}[k]
	var out []File
	for _, shared := range []bool{false, true} {
		dir := d.dir(File{Shared: shared})
		entries, err := os.ReadDir(dir)
		if err != nil {
			return nil, err
		}
		var names []string
		for _, e := range entries {
			if filepath.Ext(e.Name()) == ext {
				names = append(names, e.Name())
			}
		}
		sort.Strings(names)
		for _, n := range names {
			fi, _ := os.Stat(filepath.Join(dir, n))
			out = append(out, File{Name: n, Shared: shared, Size: fi.Size()})
		}
	}
	return out, nil
}

func (d dirFolders) Open(f File) (*os.File, error) { return os.Open(filepath.Join(d.dir(f), f.Name)) }

func (d dirFolders) Save(name string, data []byte, overwrite bool) (File, error) {
	if strings.ContainsAny(name, "/") {
		return File{}, fmt.Errorf("cannot save as %q: a name without folders", name)
	}
	if filepath.Ext(name) != ".yaml" {
		name += ".yaml"
	}
	p := filepath.Join(d.own, name)
	if _, err := os.Stat(p); err == nil && !overwrite {
		return File{}, fmt.Errorf("%s: %w", name, presets.ErrExists)
	}
	return File{Name: name}, os.WriteFile(p, data, 0o644)
}

func (d dirFolders) Own() string { return "alice" }

// sessionModel is the explorer as a lab server's session has it: with
// folders instead of paths.
func sessionModel(t *testing.T) (*Model, dirFolders) {
	t.Helper()
	d := dirFolders{own: t.TempDir(), shared: t.TempDir()}
	sc, err := presets.Get("normal")
	if err != nil {
		t.Fatal(err)
	}
	m, err := NewWithOptions(sc, "preset normal", NewStyles(NewRenderer(nil, termenv.Ascii)), Options{Folders: d})
	if err != nil {
		t.Fatal(err)
	}
	m.loadTick = func(int) tea.Cmd { return nil }
	withTicker(m) // a protocol waits for the test's ticks
	press(m, tea.WindowSizeMsg{Width: 120, Height: 40})
	return m, d
}

// With folders, o, O and a protocol file list the files to pick from
// (the fellow's, then the lab's), and a pick is read as a path would be.
func TestFileListsInASession(t *testing.T) {
	m, d := sessionModel(t)
	keys(m, "up", "up", "s", "ctrl+u")
	press(m, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("mine")})
	keys(m, "enter")
	if !strings.Contains(m.status, "Saved levers and baseline to mine.yaml in your folder (alice)") {
		t.Fatalf("save: %q", m.status)
	}
	hr90, _ := presets.Get("normal")
	hr90.Name, hr90.Params.HeartRate = "lab-hr90", 90
	data, err := hr90.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(d.shared, "lab-hr90.yaml"), data, 0o644); err != nil {
		t.Fatal(err)
	}
	pr, _ := presets.ProtocolSource("preload-reduction")
	if err := os.WriteFile(filepath.Join(d.shared, "occlusion.yaml"), pr, 0o644); err != nil {
		t.Fatal(err)
	}

	keys(m, "o")
	if m.mode != modeFiles {
		t.Fatalf("o did not list files: mode %v, status %q", m.mode, m.status)
	}
	screen := m.View()
	for _, want := range []string{"Open a scenario", "mine.yaml", "shared/lab-hr90.yaml", "shared/occlusion.yaml"} {
		if !strings.Contains(screen, want) {
			t.Errorf("the list lacks %q:\n%s", want, screen)
		}
	}
	if strings.Index(screen, "mine.yaml") > strings.Index(screen, "shared/lab-hr90.yaml") {
		t.Error("the fellow's files are not listed first")
	}
	keys(m, "down", "enter")
	if m.st.name != "lab-hr90" || m.st.target.HeartRate != 90 || !strings.Contains(m.status, "Opened shared/lab-hr90.yaml") {
		t.Fatalf("after picking the shared scenario: %s at %g bpm, %q", m.st.name, m.st.target.HeartRate, m.status)
	}
	keys(m, "P")
	for range len(m.picker.names) - 1 {
		keys(m, "down") // to "a file…"
	}
	keys(m, "enter")
	if m.mode != modeFiles || m.fileKind != ProtocolFiles {
		t.Fatalf("a protocol file did not list files: %q", m.status)
	}
	keys(m, "down", "down", "enter") // shared/occlusion.yaml
	if m.play.run == nil || !strings.Contains(m.status, "Playing preload-reduction") {
		t.Errorf("the picked protocol does not play: %q", m.status)
	}
	keys(m, "O")
	if m.mode == modeFiles || !m.statusErr || !strings.Contains(m.status, "No recording files in your folder (alice)") {
		t.Errorf("O with no recordings: mode %v, %q", m.mode, m.status)
	}
}

// Saving over a file in the folder asks first; a name the folders refuse
// is said and nothing changes.
func TestSaveInFolder(t *testing.T) {
	m, d := sessionModel(t)
	save := func(name string) {
		keys(m, "s", "ctrl+u")
		press(m, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(name)})
		keys(m, "enter")
	}
	save("a")
	save("a")
	if m.mode != modeConfirm || !strings.Contains(m.status, "a exists. Overwrite it?") {
		t.Fatalf("a second save of a: mode %v, %q", m.mode, m.status)
	}
	keys(m, "y")
	if !strings.Contains(m.status, "Saved levers and baseline to a.yaml") {
		t.Errorf("after y: %q", m.status)
	}
	save("../b")
	if !m.statusErr || !strings.Contains(m.status, "a name without folders") {
		t.Errorf("../b: %q", m.status)
	}
	if _, err := os.Stat(filepath.Join(filepath.Dir(d.own), "b.yaml")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("../b was written: %v", err)
	}
	keys(m, "s")
	if v := m.prompt.Value(); v != "a.yaml" {
		t.Errorf("the save prompt offers %q, want the last name, a.yaml", v)
	}
}
