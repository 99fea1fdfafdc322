package server

import (
	"bytes"
	"encoding/pem"
	"errors"
	"io"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/charmbracelet/x/ansi"
	gossh "golang.org/x/crypto/ssh"
)

// sshClient is OpenSSH's client, if installed.
func sshClient(t *testing.T) string {
	t.Helper()
	p, err := exec.LookPath("ssh")
	if err != nil {
		t.Skip("no OpenSSH client:", err)
	}
	return p
}

// opensshArgs are the options for OpenSSH's client to log in to the lab
// with key k, checking the server's host key against a known_hosts file.
func (l *lab) opensshArgs(t *testing.T, k fellowKey) []string {
	t.Helper()
	dir := t.TempDir()
	block, err := gossh.MarshalPrivateKey(k.priv, "")
	if err != nil {
		t.Fatal(err)
	}
	id := filepath.Join(dir, "id")
	if err := os.WriteFile(id, pem.EncodeToMemory(block), 0o600); err != nil {
		t.Fatal(err)
	}
	host, port, _ := net.SplitHostPort(l.addr)
	known := "[" + host + "]:" + port + " " + string(gossh.MarshalAuthorizedKey(l.srv.HostKey()))
	kh := filepath.Join(dir, "known_hosts")
	if err := os.WriteFile(kh, []byte(known), 0o644); err != nil {
		t.Fatal(err)
	}
	return []string{"-F", "/dev/null", "-o", "BatchMode=yes", "-o", "IdentitiesOnly=yes", "-i", id,
		"-o", "StrictHostKeyChecking=yes", "-o", "UserKnownHostsFile=" + kh, "-o", "ConnectTimeout=5",
		"-p", port, "fellow@" + host}
}

// OpenSSH's client opens the explorer, sends keys and quits with exit
// status 0; a command is refused.
func TestOpenSSHClient(t *testing.T) {
	bin := sshClient(t)
	l := startLab(t, nil)
	args := l.opensshArgs(t, l.alice)

	cmd := exec.Command(bin, append([]string{"-tt"}, args...)...)
	cmd.Env = append(os.Environ(), "TERM=xterm-256color")
	in, _ := cmd.StdinPipe()
	var out logBuf
	cmd.Stdout, cmd.Stderr = &out, &out
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	waitText := func(what string) {
		t.Helper()
		deadline := time.Now().Add(10 * time.Second)
		for !strings.Contains(ansi.Strip(out.String()), what) {
			if time.Now().After(deadline) {
				_ = cmd.Process.Kill()
				t.Fatalf("never saw %q:\n%s", what, lastChars(ansi.Strip(out.String()), 2000))
			}
			time.Sleep(20 * time.Millisecond)
		}
	}
	waitText("Opened preset normal")
	io.WriteString(in, "k")
	waitText("Filling pressure 8 → 9 mmHg · SV")
	io.WriteString(in, "q")
	done := make(chan error, 1)
	go func() { done <- cmd.Wait() }()
	select {
	case err := <-done:
		if err != nil {
			t.Errorf("ssh ended with %v after q, want exit status 0", err)
		}
	case <-time.After(10 * time.Second):
		_ = cmd.Process.Kill()
		t.Fatal("ssh did not end after q")
	}

	var stderr bytes.Buffer
	run := exec.Command(bin, append(args, "cat", "/etc/passwd")...)
	run.Stderr = &stderr
	got, err := run.Output()
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.ExitCode() != 255 || len(got) > 0 || !strings.Contains(stderr.String(), "exec request failed") {
		t.Errorf("a command over OpenSSH: %v, output %q, %s", err, got, stderr.String())
	}
}
