//go:build unix

package cli

import (
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// makeFIFO makes a named pipe that no one writes to.
func makeFIFO(t *testing.T) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), "pipe.yaml")
	if err := syscall.Mkfifo(p, 0o644); err != nil {
		t.Skip(err)
	}
	return p
}

// Every path a command reads that is not a regular file is refused at
// once, naming what it is: a named pipe would otherwise block the read, a
// device never end.
func TestCommandsRefuseWhatIsNotAFile(t *testing.T) {
	fifo := makeFIFO(t)
	dir := t.TempDir()
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"solve", "--scenario", fifo}, "is a named pipe (FIFO), not a regular file"},
		{[]string{"solve", "--scenario", "/dev/zero"}, "is a character device, not a regular file"},
		{[]string{"solve", "--scenario", dir}, "is a folder, not a regular file"},
		{[]string{"loop", "--scenario", fifo}, "is a named pipe"},
		{[]string{"sweep", "--scenario", fifo, "--vary", "heart_rate_bpm=60:70:2"}, "is a named pipe"},
		{[]string{"protocol", "run", fifo}, "is a named pipe"},
		{[]string{"protocol", "run", "rate-steps", "--scenario", fifo}, "is a named pipe"},
		{[]string{"analyze", fifo}, "is a named pipe"},
		{[]string{"analyze", "/dev/zero"}, "is a character device"},
		{[]string{"fit", fifo}, "is a named pipe"},
		{[]string{"figure", "-o", filepath.Join(dir, "f.svg"), "--baseline", fifo}, "is a named pipe"},
		{[]string{"figure", "-o", filepath.Join(dir, "g.svg"), "--scenario", fifo}, "is a named pipe"},
	} {
		code, _, errs := runCLI(t, c.args...)
		if code != 1 || !strings.Contains(errs, c.want) {
			t.Errorf("%q: exit %d, stderr %q", c.args, code, errs)
		}
	}
}
