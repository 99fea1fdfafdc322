package atomicfile

import (
	"bufio"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"pvcouple/internal/fsizelimit"
)

// A write that fails for real (a file-size limit) leaves the old file and
// no temporary file, and its error names the destination only.
func TestFailedWriteLeavesNothing(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "a.csv")
	if err := os.WriteFile(path, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	var err error
	fsizelimit.Run(t, 1000, func() { err = WriteFile(path, make([]byte, 5000), true) })
	if err == nil || !strings.Contains(err.Error(), "cannot write "+path) || strings.Contains(err.Error(), ".tmp-") {
		t.Errorf("error %v", err)
	}
	if data, _ := os.ReadFile(path); string(data) != "old" {
		t.Errorf("old file now %d bytes", len(data))
	}
	if n := names(t, dir); len(n) != 1 {
		t.Errorf("files left: %v", n)
	}
}

// SIGINT, SIGTERM and SIGHUP during a write remove the temporary file and
// still end the program as the signal does.
func TestSignalsRemoveTemporaryFiles(t *testing.T) {
	if os.Getenv("ATOMICFILE_CHILD") != "" {
		f, err := Create(filepath.Join(os.Getenv("ATOMICFILE_CHILD"), "big.csv"))
		if err != nil {
			fmt.Println(err)
			os.Exit(3)
		}
		f.Write(make([]byte, 1<<20))
		fmt.Println("ready")
		time.Sleep(time.Minute)
		os.Exit(4)
	}
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM, syscall.SIGHUP} {
		dir := t.TempDir()
		cmd := exec.Command(os.Args[0], "-test.run", "^TestSignalsRemoveTemporaryFiles$")
		cmd.Env = append(os.Environ(), "ATOMICFILE_CHILD="+dir)
		out, err := cmd.StdoutPipe()
		if err != nil {
			t.Fatal(err)
		}
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		line, _ := bufio.NewReader(out).ReadString('\n')
		if line != "ready\n" {
			cmd.Process.Kill()
			cmd.Wait()
			t.Fatalf("child: %q", line)
		}
		if n := names(t, dir); len(n) != 1 {
			t.Errorf("%v: before the signal: %v", sig, n)
		}
		cmd.Process.Signal(sig)
		err = cmd.Wait()
		var ee *exec.ExitError
		if !errors.As(err, &ee) || ee.Sys().(syscall.WaitStatus).Signal() != sig {
			t.Errorf("%v: child ended with %v, not by the signal", sig, err)
		}
		if n := names(t, dir); len(n) != 0 {
			t.Errorf("%v: left %v", sig, n)
		}
	}
}
