// Package fsizelimit makes file writes fail for real in tests: it runs a
// function under a file-size limit (RLIMIT_FSIZE), so writing more than the
// limit fails with EFBIG. Unlike a read-only directory, this works even when
// the tests run as root.
package fsizelimit

import (
	"os/signal"
	"syscall"
	"testing"
)

// Run calls fn with the process's file-size limit set to limit bytes and
// SIGXFSZ ignored, then restores both. It skips the test if the limit cannot
// be set. Tests using it must not run in parallel with tests that write files.
func Run(t testing.TB, limit uint64, fn func()) {
	t.Helper()
	signal.Ignore(syscall.SIGXFSZ)
	defer signal.Reset(syscall.SIGXFSZ)
	var old syscall.Rlimit
	if err := syscall.Getrlimit(syscall.RLIMIT_FSIZE, &old); err != nil {
		t.Skip(err)
	}
	lim := old
	lim.Cur = limit
	if err := syscall.Setrlimit(syscall.RLIMIT_FSIZE, &lim); err != nil {
		t.Skip(err)
	}
	defer func() {
		if err := syscall.Setrlimit(syscall.RLIMIT_FSIZE, &old); err != nil {
			t.Fatal(err)
		}
	}()
	fn()
}
