package cli

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// fullWriter takes limit bytes and then fails as a full disk does.
type fullWriter struct{ n, limit int }

func (w *fullWriter) Write(p []byte) (int, error) {
	if room := w.limit - w.n; len(p) > room {
		w.n += max(room, 0)
		return max(room, 0), syscall.ENOSPC
	}
	w.n += len(p)
	return len(p), nil
}

// Output that cannot be written is an error (exit 1, "cannot write the
// output: no space left on device"), never a silent success: for every
// command that writes to standard output, whether the first write fails or
// one in the middle.
func TestLostOutputIsAnError(t *testing.T) {
	rec := writeRecording(t, 10, 0)
	cmds := [][]string{
		{"solve"}, {"solve", "--format", "json"}, {"loop"}, {"loop", "--format", "json"},
		{"params"}, {"presets"}, {"protocol", "list"}, {"protocol", "show", "preload-reduction"},
		{"protocol", "run", "rate-steps"}, {"protocol", "run", "rate-steps", "--format", "json"},
		{"sweep", "--vary", "heart_rate_bpm=60:90:4"}, {"sweep", "--vary", "heart_rate_bpm=60:90:4", "--format", "json"},
		{"analyze", rec}, {"analyze", rec, "--format", "json"},
		{"fit", rec, "--max-seconds", "0.5"}, {"fit", rec, "--max-seconds", "0.5", "--format", "json"},
		{"--help"}, {"solve", "--help"}, {"protocol", "--help"}, {"--version"},
	}
	for _, args := range cmds {
		for _, limit := range []int{0, 8} {
			var errb bytes.Buffer
			w := &fullWriter{limit: limit}
			env := &Env{Stdin: strings.NewReader(""), Stdout: w, Stderr: &errb, IsTerminal: func() bool { return false }}
			code := Main(args, env)
			if code != 1 || !strings.Contains(errb.String(), "cannot write the output: no space left on device") {
				t.Errorf("%v with %d bytes of room: exit %d, stderr %q", args, limit, code, errb.String())
			}
		}
	}
}

// The same with the real binary writing to /dev/full (Linux), for the
// commands whose tables used to be lost in silence.
func TestDevFullIsAnError(t *testing.T) {
	if _, err := os.Stat("/dev/full"); err != nil {
		t.Skip("no /dev/full")
	}
	bin := buildBinary(t)
	rec := filepath.Join("..", "testdata", "recordings", "steady-synthetic.csv")
	for _, args := range [][]string{{"analyze", rec}, {"fit", rec, "--max-seconds", "0.5"}, {"solve"}} {
		full, err := os.OpenFile("/dev/full", os.O_WRONLY, 0)
		if err != nil {
			t.Fatal(err)
		}
		var errb bytes.Buffer
		cmd := exec.Command(bin, args...)
		cmd.Stdout, cmd.Stderr = full, &errb
		err = cmd.Run()
		full.Close()
		if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != 1 || !strings.Contains(errb.String(), "no space left on device") {
			t.Errorf("%v > /dev/full: %v, stderr %q", args, err, errb.String())
		}
	}
}
