//go:build unix

package safefile

import (
	"bytes"
	"context"
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// Open refuses every kind of path that is not a regular file, at once, and
// says what it is; a regular file, also through a link, opens.
func TestOpenRefusesWhatIsNotAFile(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "a.yaml")
	if err := os.WriteFile(file, []byte("version: 1\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	fifo := filepath.Join(dir, "pipe.yaml")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "link.yaml")
	if err := os.Symlink(file, link); err != nil {
		t.Fatal(err)
	}
	fifoLink := filepath.Join(dir, "fifolink.yaml")
	if err := os.Symlink(fifo, fifoLink); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		path, want string // want: "" to open, else a part of the error
	}{
		{file, ""},
		{link, ""},
		{fifo, "is a named pipe (FIFO), not a regular file"},
		{fifoLink, "is a named pipe (FIFO), not a regular file"},
		{dir, "is a folder, not a regular file"},
		{"/dev/null", "is a character device, not a regular file"},
		{"/dev/zero", "is a character device, not a regular file"},
		{filepath.Join(dir, "missing.yaml"), "no such file"},
	}
	for _, c := range cases {
		start := time.Now()
		f, err := Open(c.path)
		if d := time.Since(start); d > time.Second {
			t.Errorf("Open(%s) took %v", c.path, d)
		}
		if c.want == "" {
			if err != nil {
				t.Errorf("Open(%s): %v", c.path, err)
				continue
			}
			f.Close()
			continue
		}
		if err == nil {
			f.Close()
			t.Errorf("Open(%s) opened it", c.path)
			continue
		}
		if !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), c.path) {
			t.Errorf("Open(%s): %q lacks %q or the path", c.path, err, c.want)
		}
		if strings.Contains(c.want, "regular") != errors.Is(err, ErrNotRegular) {
			t.Errorf("Open(%s): errors.Is(ErrNotRegular) wrong for %v", c.path, err)
		}
		if strings.Contains(c.want, "no such") && !errors.Is(err, fs.ErrNotExist) {
			t.Errorf("Open(%s): not fs.ErrNotExist: %v", c.path, err)
		}
	}
}

// A path named with control characters is printed escaped.
func TestNotRegularErrorEscapesThePath(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "x\x1b]0;title\x07")
	if err := os.Mkdir(bad, 0o755); err != nil {
		t.Fatal(err)
	}
	_, err := Open(bad)
	if err == nil || strings.ContainsAny(err.Error(), "\x1b\x07") || !strings.Contains(err.Error(), `x\x1b]0;title\x07`) {
		t.Fatalf("error not escaped: %q", err)
	}
}

// OpenReader records the size, counts the bytes read and stops at once
// when cancelled, even mid-file.
func TestReaderCountsAndCancels(t *testing.T) {
	path := filepath.Join(t.TempDir(), "big.csv")
	data := bytes.Repeat([]byte("0.001,80,120\n"), 1<<18) // 3.4 MB
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	var prog Progress
	f, err := OpenReader(context.Background(), nil, path, &prog)
	if err != nil {
		t.Fatal(err)
	}
	got, err := io.ReadAll(f)
	f.Close()
	if err != nil || !bytes.Equal(got, data) {
		t.Fatalf("read %d of %d bytes: %v", len(got), len(data), err)
	}
	if prog.Size() != int64(len(data)) || prog.Read() != int64(len(data)) || prog.Fraction() != 1 {
		t.Errorf("progress %d of %d (size %d)", prog.Read(), len(data), prog.Size())
	}

	ctx, cancel := context.WithCancel(context.Background())
	var p2 Progress
	f, err = OpenReader(ctx, nil, path, &p2)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	buf := make([]byte, 4<<20)
	n, err := f.Read(buf)
	if err != nil || n > chunk {
		t.Fatalf("first read: %d bytes, %v (a read is capped at %d)", n, err, chunk)
	}
	cancel()
	if _, err := f.Read(buf); !errors.Is(err, context.Canceled) {
		t.Errorf("read after cancel: %v", err)
	}
	if p2.Read() != int64(n) || p2.Fraction() <= 0 || p2.Fraction() >= 1 {
		t.Errorf("progress after one read: %d bytes, %.2f", p2.Read(), p2.Fraction())
	}
}
