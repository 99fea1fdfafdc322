package server

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pvcouple/internal/fsizelimit"
)

// A save that fails part-way (a real file-size limit) leaves the old file
// as it was and no temporary file behind.
func TestFailedSaveKeepsOldFile(t *testing.T) {
	f, own, _ := testFolders(t)
	if _, err := f.Save("keep", []byte("old"), false); err != nil {
		t.Fatal(err)
	}
	var err error
	fsizelimit.Run(t, 64, func() { _, err = f.Save("keep", []byte(strings.Repeat("new ", 100)), true) })
	if err == nil {
		t.Fatal("a save past the size limit succeeded")
	}
	if b, _ := os.ReadFile(filepath.Join(own, "keep.yaml")); string(b) != "old" {
		t.Errorf("the old file holds %q after the failed save", b)
	}
	if entries, _ := os.ReadDir(own); len(entries) != 1 {
		t.Errorf("%d entries after the failed save, want the old file alone", len(entries))
	}
}
