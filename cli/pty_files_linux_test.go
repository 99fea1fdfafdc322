package cli

import (
	"bufio"
	"os"
	"path/filepath"
	"strconv"
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
	// A long recording (120 MB of valid rows; a file of zeros or beyond the
	// reader's cap is refused at once, without a read to watch).
	huge := filepath.Join(dir, "huge.csv")
	f, err := os.Create(huge)
	if err != nil {
		t.Fatal(err)
	}
	w := bufio.NewWriterSize(f, 1<<20)
	w.WriteString("time_s,pressure_mmhg,volume_ml\n")
	var row []byte
	for i := 0; i < 6_000_000; i++ {
		row = strconv.AppendFloat(row[:0], float64(i)/1000, 'f', 3, 64)
		w.Write(append(row, ",80.000,100.000\n"...))
	}
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	f.Close()

	p.waitFor("Filling pressure", 10*time.Second)
	p.send("o\x15pipe.yaml\r")
	p.waitFor("pipe.yaml is a named pipe (FIFO), not a regular file", time.Second)
	p.send("O\x15huge.csv\r")
	p.waitFor("Reading recording huge.csv: ", time.Second)
	p.waitFor(" MB · Esc stops.", time.Second)
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
