package server

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"pvcouple/presets"
	"pvcouple/ui"
)

// testFolders makes DATA with alice's folder and a shared one, and returns
// alice's folders with the paths of her folder and the shared one.
func testFolders(t *testing.T) (f *folders, own, shared string) {
	t.Helper()
	data := t.TempDir()
	users, sh, err := openData(data)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { users.Close(); sh.Close() })
	if f, err = openFolders(users, sh, "alice"); err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { f.Close() })
	return f, filepath.Join(data, "users", "alice"), filepath.Join(data, "shared")
}

func write(t *testing.T, path, data string) {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(data), 0o644); err != nil {
		t.Fatal(err)
	}
}

// Lists hold regular files of the kind asked for, the fellow's first, and
// leave out hidden names, links, other kinds, names with control
// characters, and other fellows' folders.
func TestListedFiles(t *testing.T) {
	f, own, shared := testFolders(t)
	write(t, filepath.Join(own, "b.yaml"), "x")
	write(t, filepath.Join(own, "sub", "a.yml"), "x")
	write(t, filepath.Join(own, "notes.txt"), "x")
	write(t, filepath.Join(own, ".b.yaml.tmp-1"), "x")
	write(t, filepath.Join(own, ".git", "c.yaml"), "x")
	write(t, filepath.Join(own, "evil\x1b]0;title\x07.yaml"), "x")
	write(t, filepath.Join(shared, "protocols", "occlusion.yaml"), "x")
	write(t, filepath.Join(shared, "recordings", "run.csv"), "x")
	write(t, filepath.Join(filepath.Dir(own), "bob", "bob.yaml"), "x")
	if err := os.Symlink("/etc/passwd", filepath.Join(own, "passwd.yaml")); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink("b.yaml", filepath.Join(own, "inside.yaml")); err != nil {
		t.Fatal(err)
	}
	got := func(k ui.FileKind) string {
		files, err := f.List(k)
		if err != nil {
			t.Fatal(err)
		}
		var names []string
		for _, x := range files {
			names = append(names, fileLabelForTest(x))
		}
		return strings.Join(names, " ")
	}
	if s := got(ui.ScenarioFiles); s != "b.yaml sub/a.yml shared/protocols/occlusion.yaml" {
		t.Errorf("scenarios listed: %s", s)
	}
	if s := got(ui.RecordingFiles); s != "notes.txt shared/recordings/run.csv" {
		t.Errorf("recordings listed: %s", s)
	}
}

func fileLabelForTest(f ui.File) string {
	if f.Shared {
		return "shared/" + f.Name
	}
	return f.Name
}

// Open refuses names that leave the folder or are hidden, links out of it,
// and anything but a regular file; a FIFO is refused without waiting for a
// writer.
func TestOpenStaysInside(t *testing.T) {
	f, own, shared := testFolders(t)
	write(t, filepath.Join(own, "mine.yaml"), "mine")
	write(t, filepath.Join(shared, "lab.yaml"), "lab")
	write(t, filepath.Join(filepath.Dir(own), "bob", "bob.yaml"), "bob's")
	if err := os.Symlink("/etc/passwd", filepath.Join(own, "out.yaml")); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink("../bob/bob.yaml", filepath.Join(own, "bobs.yaml")); err != nil {
		t.Fatal(err)
	}
	if err := syscall.Mkfifo(filepath.Join(own, "pipe.yaml"), 0o644); err != nil {
		t.Fatal(err)
	}
	read := func(file ui.File) (string, error) {
		rc, err := f.Open(file)
		if err != nil {
			return "", err
		}
		defer rc.Close()
		b, err := io.ReadAll(rc)
		return string(b), err
	}
	if s, err := read(ui.File{Name: "mine.yaml"}); s != "mine" || err != nil {
		t.Errorf("own file: %q %v", s, err)
	}
	if s, err := read(ui.File{Name: "lab.yaml", Shared: true}); s != "lab" || err != nil {
		t.Errorf("shared file: %q %v", s, err)
	}
	for _, name := range []string{"../bob/bob.yaml", "/etc/passwd", "sub/../../bob/bob.yaml", "out.yaml",
		"bobs.yaml", ".hidden.yaml", "", ".", `..\bob\bob.yaml`, "pipe.yaml"} {
		done := make(chan struct{})
		go func() {
			defer close(done)
			if s, err := read(ui.File{Name: name}); err == nil {
				t.Errorf("%q opened: %q", name, s)
			} else if strings.Contains(err.Error(), filepath.Dir(own)) {
				t.Errorf("%q: the error shows where DATA is: %v", name, err)
			}
		}()
		select {
		case <-done:
		case <-time.After(5 * time.Second):
			t.Fatalf("opening %q did not return", name)
		}
	}
	if _, err := read(ui.File{Name: "../users/alice/mine.yaml", Shared: true}); err == nil {
		t.Error("the shared folder let a name out")
	}
}

// Save takes plain names only, adds .yaml, never replaces a file unless
// told, and leaves neither half a file nor a temporary one after a failure.
func TestSave(t *testing.T) {
	f, own, _ := testFolders(t)
	var logged []string
	f.saved = func(name string, size int, replaced bool) {
		logged = append(logged, name)
	}
	for _, bad := range []string{"../x", "/tmp/x", "sub/x", `a\b`, ".x", "", "..", "x\x1b[2J", strings.Repeat("a", 70), "ä"} {
		if _, err := f.Save(bad, []byte("data"), true); err == nil {
			t.Errorf("saved as %q", bad)
		}
	}
	file, err := f.Save("study 1", []byte("first"), false)
	if err != nil || file.Name != "study 1.yaml" || file.Shared {
		t.Fatalf("save: %+v %v", file, err)
	}
	if _, err := f.Save("study 1.yaml", []byte("second"), false); !errors.Is(err, presets.ErrExists) {
		t.Errorf("a save over an existing file without overwrite: %v", err)
	}
	if _, err := f.Save("study 1.yaml", []byte("second"), true); err != nil {
		t.Errorf("overwrite: %v", err)
	}
	if b, _ := os.ReadFile(filepath.Join(own, "study 1.yaml")); string(b) != "second" {
		t.Errorf("file holds %q", b)
	}
	entries, _ := os.ReadDir(own)
	if len(entries) != 1 {
		t.Errorf("%d entries in the folder, want 1 (no temporary files)", len(entries))
	}
	if strings.Join(logged, ",") != "study 1.yaml,study 1.yaml" {
		t.Errorf("saves logged: %v", logged)
	}
}
