package cli

import (
	"os"
	"path/filepath"
	"syscall"
	"testing"
	"time"
)

// The explorer on a terminal refuses a named pipe at once, reads a huge
// file in the background with its progress on the status line, stops the
// read on Esc, and quits within a second while one is being read.
func TestExplorerFifoAndHugeFileOnPTY(t *testing.T) {
	bin := buildBinary(t)
	p := startPTY(t, bin, 120, 40, []string{"NO_COLOR=1"})
	dir := p.cmd.Dir // the paths typed are relative to it, short enough for one line
	fifo := filepath.Join(dir, "pipe.yaml")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	// 8 GB of nothing: a sparse file takes no disk and reads as zeros.
	huge := filepath.Join(dir, "huge.csv")
	f, err := os.Create(huge)
	if err != nil {
		t.Fatal(err)
	}
	if err := f.Truncate(8 << 30); err != nil {
		t.Fatal(err)
	}
	f.Close()

	p.waitFor("Filling pressure", 10*time.Second)
	p.send("o\x15pipe.yaml\r")
	p.waitFor("pipe.yaml is a named pipe (FIFO), not a regular file", time.Second)
	p.send("O\x15huge.csv\r")
	p.waitFor("Reading recording huge.csv: ", time.Second)
	p.waitFor(" % of 8.6 GB · Esc stops.", time.Second)
	p.send("\x1b")
	p.waitFor("Stopped reading huge.csv: nothing changed.", time.Second)
	p.send("9") // still answering keys
	p.waitFor("There is no view 9", time.Second)

	p.send("O\x15huge.csv\r")
	p.waitFor("Reading recording", time.Second)
	sent := time.Now()
	p.send("q")
	p.exited(2 * time.Second)
	if d := time.Since(sent); d > time.Second {
		t.Errorf("q during a read quit after %v", d)
	}
}
