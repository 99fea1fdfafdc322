//go:build linux

package presets

import (
	"os"
	"path/filepath"
	"testing"

	"pvcouple/internal/fsizelimit"
)

// A save that fails part-way leaves the old file as it was. The failure is
// real: a file-size limit makes the write of the new content fail with
// EFBIG, which works even when the tests run as root.
func TestFailedSaveLeavesOldFile(t *testing.T) {
	path := filepath.Join(t.TempDir(), "s.yaml")
	if err := os.WriteFile(path, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	sc, _ := Get("normal")

	var err error
	fsizelimit.Run(t, 64, func() { err = SaveScenario(path, sc, true) }) // 64 bytes: less than any scenario
	if err == nil {
		t.Fatal("save beyond the file-size limit succeeded")
	}
	if data, _ := os.ReadFile(path); string(data) != "old" {
		t.Errorf("old file changed to %q", data)
	}
	entries, _ := os.ReadDir(filepath.Dir(path))
	if len(entries) != 1 {
		t.Errorf("failed save left files behind: %v", entries)
	}
}
