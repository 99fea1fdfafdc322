package atomicfile

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
)

// names lists the files in dir.
func names(t *testing.T, dir string) []string {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var n []string
	for _, e := range entries {
		n = append(n, e.Name())
	}
	return n
}

func TestWriteFileCreatesReplacesOrRefuses(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "a.yaml")
	if err := WriteFile(path, []byte("one"), false); err != nil {
		t.Fatal(err)
	}
	err := WriteFile(path, []byte("two"), false)
	if !errors.Is(err, ErrExists) || !strings.Contains(err.Error(), path) || strings.Contains(err.Error(), ".tmp-") {
		t.Errorf("second write without replace: %v", err)
	}
	if data, _ := os.ReadFile(path); string(data) != "one" {
		t.Errorf("refused write changed the file: %q", data)
	}
	if err := WriteFile(path, []byte("three"), true); err != nil {
		t.Fatal(err)
	}
	if data, _ := os.ReadFile(path); string(data) != "three" {
		t.Errorf("replace: %q", data)
	}
	if fi, _ := os.Stat(path); fi.Mode().Perm() != Perm {
		t.Errorf("mode %v", fi.Mode())
	}
	if n := names(t, dir); len(n) != 1 {
		t.Errorf("files left: %v", n)
	}
}

// Of writers racing for one new name exactly one wins; the file holds all
// of the winner's data and nothing is left of the others.
func TestOnlyOneOfRacingWritersCreates(t *testing.T) {
	for round := range 20 {
		dir := t.TempDir()
		path := filepath.Join(dir, "new.yaml")
		const writers = 8
		errs := make([]error, writers)
		var wg sync.WaitGroup
		for i := range writers {
			wg.Go(func() {
				errs[i] = WriteFile(path, []byte(strings.Repeat(fmt.Sprint(i), 10000)), false)
			})
		}
		wg.Wait()
		won := -1
		for i, err := range errs {
			switch {
			case err == nil && won >= 0:
				t.Fatalf("round %d: writers %d and %d both created the file", round, won, i)
			case err == nil:
				won = i
			case !errors.Is(err, ErrExists):
				t.Fatalf("round %d: writer %d: %v", round, i, err)
			}
		}
		data, _ := os.ReadFile(path)
		if won < 0 || string(data) != strings.Repeat(fmt.Sprint(won), 10000) {
			t.Fatalf("round %d: winner %d, file of %d bytes", round, won, len(data))
		}
		if n := names(t, dir); len(n) != 1 {
			t.Fatalf("round %d: files left: %v", round, n)
		}
	}
}

// The temporary file is beside the destination, hidden, and not in TMPDIR.
func TestTemporaryFileBesideTarget(t *testing.T) {
	dir, tmpdir := t.TempDir(), t.TempDir()
	t.Setenv("TMPDIR", tmpdir)
	f, err := Create(filepath.Join(dir, "out.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Discard()
	n := names(t, dir)
	if len(n) != 1 || !strings.HasPrefix(n[0], ".out.csv.tmp-") {
		t.Errorf("temporary file: %v", n)
	}
	if n := names(t, tmpdir); len(n) != 0 {
		t.Errorf("files in TMPDIR: %v", n)
	}
	f.Discard()
	if n := names(t, dir); len(n) != 0 {
		t.Errorf("Discard left %v", n)
	}
}
