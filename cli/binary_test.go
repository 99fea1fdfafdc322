package cli

import (
	"os"
	"os/exec"
	"path/filepath"
	"sync"
	"testing"
)

// The binary the end-to-end tests run, built once per test process.
var built struct {
	once sync.Once
	dir  string
	bin  string
	err  error
	out  []byte
}

// buildBinary skips the test with -short, and otherwise builds pvcouple
// (once for all the tests of the process) and returns its path.
func buildBinary(t *testing.T) string {
	t.Helper()
	if testing.Short() {
		t.Skip("builds and runs the binary")
	}
	built.once.Do(func() {
		built.dir, built.err = os.MkdirTemp("", "pvcouple-bin-")
		if built.err != nil {
			return
		}
		built.bin = filepath.Join(built.dir, "pvcouple")
		built.out, built.err = exec.Command("go", "build", "-o", built.bin, "pvcouple").CombinedOutput()
	})
	if built.err != nil {
		t.Fatalf("build: %v\n%s", built.err, built.out)
	}
	return built.bin
}

// TestMain removes the binary after the tests.
func TestMain(m *testing.M) {
	code := m.Run()
	if built.dir != "" {
		os.RemoveAll(built.dir)
	}
	os.Exit(code)
}
