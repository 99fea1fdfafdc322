package cli

import (
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"
)

// Of 8 `solve --save` racing to create one new file, exactly one succeeds;
// the others say the file exists and leave nothing behind.
func TestConcurrentSavesCreateOnce(t *testing.T) {
	bin := buildBinary(t)
	for round := range 3 {
		dir := t.TempDir()
		path := filepath.Join(dir, "study.yaml")
		const n = 8
		codes := make([]int, n)
		stderr := make([]string, n)
		var wg sync.WaitGroup
		for i := range n {
			wg.Go(func() {
				out, err := exec.Command(bin, "solve", "--set", "heart_rate_bpm="+[]string{"60", "70", "80", "90", "100", "110", "120", "130"}[i], "--save", path).CombinedOutput()
				stderr[i] = string(out)
				var ee *exec.ExitError
				if errors.As(err, &ee) {
					codes[i] = ee.ExitCode()
				} else if err != nil {
					codes[i] = -1
				}
			})
		}
		wg.Wait()
		ok := 0
		for i, c := range codes {
			switch {
			case c == 0:
				ok++
			case c != 1 || !strings.Contains(stderr[i], "file exists"):
				t.Errorf("round %d, writer %d: exit %d: %s", round, i, c, stderr[i])
			}
		}
		if ok != 1 {
			t.Errorf("round %d: %d of %d saves succeeded", round, ok, n)
		}
		if entries, _ := os.ReadDir(dir); len(entries) != 1 {
			t.Errorf("round %d: files left: %v", round, entries)
		}
	}
}

// SIGINT, SIGTERM or SIGHUP while --samples is written removes its
// temporary file, which is beside the target and not in TMPDIR.
func TestSignalDuringSamplesLeavesNothing(t *testing.T) {
	bin := buildBinary(t)
	long := filepath.Join(t.TempDir(), "long.yaml")
	if err := os.WriteFile(long, []byte("version: 1\nsteps:\n  - {label: rest, hold: 500}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM, syscall.SIGHUP} {
		dir, tmp := t.TempDir(), t.TempDir()
		cmd := exec.Command(bin, "protocol", "run", long, "--samples", filepath.Join(dir, "run.csv"))
		cmd.Env = append(os.Environ(), "TMPDIR="+tmp)
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		deadline := time.Now().Add(10 * time.Second)
		for {
			entries, _ := os.ReadDir(dir)
			if len(entries) == 1 && strings.HasPrefix(entries[0].Name(), ".run.csv.tmp-") {
				break
			}
			if time.Now().After(deadline) || len(entries) > 1 {
				cmd.Process.Kill()
				cmd.Wait()
				t.Fatalf("%v: no temporary file beside the target: %v", sig, entries)
			}
			time.Sleep(time.Millisecond)
		}
		cmd.Process.Signal(sig)
		err := cmd.Wait()
		var ee *exec.ExitError
		if !errors.As(err, &ee) || ee.Sys().(syscall.WaitStatus).Signal() != sig {
			t.Errorf("%v: ended with %v", sig, err)
		}
		for _, d := range []string{dir, tmp} {
			if entries, _ := os.ReadDir(d); len(entries) != 0 {
				t.Errorf("%v: left %v in %s", sig, entries, d)
			}
		}
	}
}

// fit -o with an existing file refuses before it fits, at once.
func TestFitRefusesExistingOutputFirst(t *testing.T) {
	rec := writeRecording(t, 10, 0)
	out := filepath.Join(t.TempDir(), "fitted.yaml")
	if err := os.WriteFile(out, []byte("mine"), 0o644); err != nil {
		t.Fatal(err)
	}
	start := time.Now()
	code, stdout, errs := runCLI(t, "fit", rec, "-o", out, "--max-seconds", "10")
	if d := time.Since(start); d > 300*time.Millisecond {
		t.Errorf("refused after %v: it fitted first", d)
	}
	if code != 1 || stdout != "" || !strings.Contains(errs, "-o "+out+": file exists") {
		t.Errorf("exit %d, stdout %q, stderr %q", code, stdout, errs)
	}
	for _, args := range [][]string{
		{"fit", rec, "-o", filepath.Join(t.TempDir(), "x.txt")},
		{"fit", rec, "--force"},
		{"fit", rec, "--name", "a\x1b]0;x\x07"},
	} {
		if code, _, errs := runCLI(t, args...); code != 2 || strings.ContainsRune(errs, 0x1b) {
			t.Errorf("%q: exit %d, %q", args, code, errs)
		}
	}
}
