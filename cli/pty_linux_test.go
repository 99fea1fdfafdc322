package cli

import (
	"bytes"
	"os"
	"os/exec"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/creack/pty"
)

// ptyProc is the binary running on a pseudo-terminal whose other side is
// this test: it reads everything the program writes and answers nothing, as
// a terminal that ignores queries (or a link that drops them) would.
type ptyProc struct {
	t     *testing.T
	tty   *os.File // the terminal's side (the program's is closed here)
	cmd   *exec.Cmd
	start time.Time
	mu    sync.Mutex
	out   bytes.Buffer
	done  chan struct{} // closed when the program has exited and all its output is read
	err   error         // its exit status
}

// startPTY runs bin with args on a w × h pseudo-terminal as its controlling
// terminal, in the foreground, with TERM=xterm-256color and the extra
// environment env.
func startPTY(t *testing.T, bin string, w, h int, env []string, args ...string) *ptyProc {
	t.Helper()
	tty, prog, err := pty.Open()
	if err != nil {
		t.Skipf("no pseudo-terminal: %v", err)
	}
	if err := pty.Setsize(tty, &pty.Winsize{Cols: uint16(w), Rows: uint16(h)}); err != nil {
		t.Fatal(err)
	}
	p := &ptyProc{t: t, tty: tty, done: make(chan struct{})}
	p.cmd = exec.Command(bin, args...)
	p.cmd.Dir = t.TempDir()
	p.cmd.Env = append([]string{"TERM=xterm-256color", "HOME=" + p.cmd.Dir, "PATH=" + os.Getenv("PATH")}, env...)
	p.cmd.Stdin, p.cmd.Stdout, p.cmd.Stderr = prog, prog, prog
	p.cmd.SysProcAttr = &syscall.SysProcAttr{Setsid: true, Setctty: true, Ctty: 0}
	p.start = time.Now()
	if err := p.cmd.Start(); err != nil {
		t.Fatal(err)
	}
	prog.Close()
	drained := make(chan struct{})
	go func() {
		defer close(drained)
		buf := make([]byte, 1<<16)
		for {
			n, err := tty.Read(buf)
			p.mu.Lock()
			p.out.Write(buf[:n])
			p.mu.Unlock()
			if err != nil {
				return // the program's side is closed: it has exited
			}
		}
	}()
	go func() { p.err = p.cmd.Wait(); <-drained; close(p.done) }()
	t.Cleanup(func() {
		_ = p.cmd.Process.Kill()
		<-p.done
		tty.Close()
	})
	return p
}

// output is what the program has written so far.
func (p *ptyProc) output() string {
	p.mu.Lock()
	defer p.mu.Unlock()
	return p.out.String()
}

// waitFor waits until the output holds s and returns the time since the
// start, or fails after limit.
func (p *ptyProc) waitFor(s string, limit time.Duration) time.Duration {
	p.t.Helper()
	deadline := time.Now().Add(limit)
	for !strings.Contains(p.output(), s) {
		if time.Now().After(deadline) {
			p.t.Fatalf("no %q within %v; output:\n%q", s, limit, tail(p.output()))
		}
		time.Sleep(5 * time.Millisecond)
	}
	return time.Since(p.start)
}

// exited waits up to limit for the program to end and returns the time
// since the start, or fails.
func (p *ptyProc) exited(limit time.Duration) time.Duration {
	p.t.Helper()
	select {
	case <-p.done:
		return time.Since(p.start)
	case <-time.After(limit):
		p.t.Fatalf("still running after %v; output:\n%q", limit, tail(p.output()))
	}
	return 0
}

// send types s on the terminal.
func (p *ptyProc) send(s string) {
	p.t.Helper()
	if _, err := p.tty.Write([]byte(s)); err != nil {
		p.t.Fatal(err)
	}
}

func tail(s string) string {
	if len(s) > 2000 {
		return "…" + s[len(s)-2000:]
	}
	return s
}
