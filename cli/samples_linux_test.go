//go:build linux

package cli

import (
	"bytes"
	"errors"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"pvcouple/internal/fsizelimit"
)

// A run whose --samples file cannot be written to the end leaves the old
// file as it was and no partial file. The failure is real: a file-size limit
// (RLIMIT_FSIZE) makes the write fail with EFBIG, which works even as root.
func TestFailedSamplesWriteLeavesOldFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "run.csv")
	if err := os.WriteFile(path, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	var code int
	var out, errs string
	fsizelimit.Run(t, 100<<10, func() { // bytes: a quarter of the run's samples
		code, out, errs = runCLI(t, "protocol", "run", "preload-reduction", "--samples", path, "--force")
	})
	if code != 1 || out != "" || !strings.Contains(errs, "--samples") || !strings.Contains(errs, "run.csv") {
		t.Errorf("exit %d, stdout %d bytes, stderr %q", code, len(out), errs)
	}
	if data, _ := os.ReadFile(path); string(data) != "old" {
		t.Errorf("old file changed to %d bytes", len(data))
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("failed write left files behind: %v", entries)
	}
}

// Every file a command writes fails cleanly on a full disk (a real write
// failure: the binary runs under a file-size limit of 0, ulimit -f, with
// SIGXFSZ ignored): exit 1, the option and the file named, the temporary
// file gone and no file of that name left.
func TestFilesFailCleanlyOnFullDisk(t *testing.T) {
	bin := buildBinary(t)
	rec := writeRecording(t, 10, 0)
	for _, c := range []struct {
		name string
		args func(path string) []string
		want string
	}{
		{"scenario.yaml", func(p string) []string { return []string{"solve", "--save", p} }, "cannot save scenario"},
		{"fitted.yaml", func(p string) []string { return []string{"fit", rec, "-o", p, "--max-seconds", "0.5"} }, "cannot save scenario"},
		{"figure.svg", func(p string) []string { return []string{"figure", "-o", p} }, "cannot write"},
		{"run.csv", func(p string) []string { return []string{"protocol", "run", "rate-steps", "--samples", p} }, "--samples"},
	} {
		dir := t.TempDir()
		path := filepath.Join(dir, c.name)
		cmd := exec.Command("sh", append([]string{"-c", `trap '' XFSZ; ulimit -f 0; exec "$@"`, "sh", bin}, c.args(path)...)...)
		var errb bytes.Buffer
		cmd.Stdout, cmd.Stderr = io.Discard, &errb
		err := cmd.Run()
		errs := errb.String()
		var ee *exec.ExitError
		if !errors.As(err, &ee) || ee.ExitCode() != 1 || !strings.Contains(errs, c.want) || !strings.Contains(errs, path) ||
			!strings.Contains(errs, "file too large") || strings.Contains(errs, ".tmp-") {
			t.Errorf("%s: %v, stderr %q", c.name, err, errs)
		}
		if entries, _ := os.ReadDir(dir); len(entries) != 0 {
			t.Errorf("%s: left %v", c.name, entries)
		}
	}
}
