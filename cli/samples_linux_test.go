//go:build linux

package cli

import (
	"os"
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
