package cli

import (
	"bytes"
	"crypto/ed25519"
	"crypto/rand"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	gossh "golang.org/x/crypto/ssh"
)

// serve with nothing configured prints the two commands that set a lab
// server up, and exits 2; a missing option is a usage error too.
func TestServeUsage(t *testing.T) {
	code, out, errOut := runCLI(t, "serve")
	if code != 2 || out != "" || strings.Count(errOut, "\n  mkdir -p") != 1 || strings.Count(errOut, "\n  pvcouple serve --listen") != 1 {
		t.Errorf("serve alone: exit %d, stdout %q, stderr %q", code, out, errOut)
	}
	for _, c := range [][]string{
		{"serve", "--listen", ":2222"},
		{"serve", "--listen", ":2222", "--host-key", "k", "--authorized-keys", "a", "--data", "d", "--max-sessions", "0"},
		{"serve", "--listen", ":2222", "--host-key", "k", "--authorized-keys", "a", "--data", "d", "--idle-timeout", "-1s"},
		{"serve", "extra"},
	} {
		if code, _, errOut := runCLI(t, c...); code != 2 {
			t.Errorf("%v: exit %d (%s), want 2", c, code, errOut)
		}
	}
}

// The two set-up commands work as printed (in a temporary folder instead of
// /srv/pvcouple, on a free port): the fellow gets in; SIGHUP takes a new
// fellow in; SIGTERM tells the session, and the server exits 0 within the
// 5 s it may wait.
func TestServeSetUpAndSignals(t *testing.T) {
	bin := buildBinary(t)
	dir := t.TempDir()
	alice, bob := sshKey(t), sshKey(t)
	if err := os.WriteFile(filepath.Join(dir, "alice.pub"), gossh.MarshalAuthorizedKey(alice.PublicKey()), 0o644); err != nil {
		t.Fatal(err)
	}
	ln, _ := net.Listen("tcp", "127.0.0.1:0")
	addr := ln.Addr().String()
	ln.Close()
	var cmds []string
	for _, l := range strings.Split(serveSetup, "\n") {
		if strings.HasPrefix(l, "  ") {
			l = strings.ReplaceAll(strings.TrimSpace(l), "/srv/pvcouple", dir)
			cmds = append(cmds, strings.Replace(l, ":2222", addr, 1))
		}
	}
	if len(cmds) != 2 {
		t.Fatalf("%d commands in the set-up text, want 2", len(cmds))
	}
	// The README gives the same two commands (in a shell block of its own:
	// they are run here, not with the README's other examples).
	readme, err := os.ReadFile(filepath.Join("..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	for _, l := range strings.Split(serveSetup, "\n") {
		if strings.HasPrefix(l, "  ") && !strings.Contains(string(readme), "\n"+strings.TrimSpace(l)+"\n") {
			t.Errorf("the README lacks the set-up command %q", strings.TrimSpace(l))
		}
	}
	setup := exec.Command("sh", "-c", cmds[0])
	setup.Dir = dir
	if out, err := setup.CombinedOutput(); err != nil {
		t.Fatalf("%s: %v %s", cmds[0], err, out)
	}
	args := strings.Fields(cmds[1])[1:] // the binary built stands for pvcouple
	srv := exec.Command(bin, args...)
	var log bytes.Buffer
	srv.Stderr = &log
	if err := srv.Start(); err != nil {
		t.Fatal(err)
	}
	defer srv.Process.Kill()

	var host gossh.PublicKey
	hostKey := func(_ string, _ net.Addr, k gossh.PublicKey) error { host = k; return nil }
	dial := func(s gossh.Signer) (*gossh.Client, error) {
		var c *gossh.Client
		var err error
		for range 100 { // until it listens
			c, err = gossh.Dial("tcp", addr, &gossh.ClientConfig{User: "x", Auth: []gossh.AuthMethod{gossh.PublicKeys(s)},
				HostKeyCallback: hostKey, Timeout: 5 * time.Second})
			if err == nil || !strings.Contains(err.Error(), "connection refused") {
				break
			}
			time.Sleep(50 * time.Millisecond)
		}
		return c, err
	}
	c, err := dial(alice)
	if err != nil {
		t.Fatalf("alice: %v\n%s", err, log.String())
	}
	defer c.Close()
	if fi, err := os.Stat(filepath.Join(dir, "host_key")); err != nil || fi.Mode().Perm() != 0o600 || host == nil {
		t.Errorf("host key: %v %v", fi, err)
	}
	sess, _ := c.NewSession()
	var out, errOut bytes.Buffer
	sess.Stdout, sess.Stderr = &out, &errOut
	if err := sess.RequestPty("xterm", 30, 100, gossh.TerminalModes{}); err != nil {
		t.Fatal(err)
	}
	if err := sess.Shell(); err != nil {
		t.Fatal(err)
	}
	if _, err := dial(bob); err == nil {
		t.Fatal("bob got in before his key was added")
	}
	f, _ := os.OpenFile(filepath.Join(dir, "authorized_keys"), os.O_APPEND|os.O_WRONLY, 0)
	f.Write(append(bytes.TrimSpace(gossh.MarshalAuthorizedKey(bob.PublicKey())), " bob\n"...))
	f.Close()
	srv.Process.Signal(syscall.SIGHUP)
	var bc *gossh.Client
	for range 50 {
		if bc, err = dial(bob); err == nil {
			break
		}
		time.Sleep(50 * time.Millisecond)
	}
	if err != nil {
		t.Fatalf("bob after SIGHUP: %v", err)
	}
	bc.Close()

	time.Sleep(300 * time.Millisecond) // the explorer is drawn
	start := time.Now()
	srv.Process.Signal(syscall.SIGTERM)
	done := make(chan error, 1)
	go func() { done <- srv.Wait() }()
	select {
	case err := <-done:
		if err != nil {
			t.Errorf("the server exited with %v after SIGTERM, want 0", err)
		}
		t.Logf("stopped in %v", time.Since(start))
		if took := time.Since(start); took > 5*time.Second {
			t.Errorf("the server took %v to stop", took)
		}
	case <-time.After(10 * time.Second):
		t.Fatal("the server did not stop on SIGTERM")
	}
	var ee *gossh.ExitError
	werr := sess.Wait()
	if e, ok := werr.(*gossh.ExitError); ok {
		ee = e
	}
	if ee == nil || ee.ExitStatus() != 1 || !strings.Contains(errOut.String(), "the lab server is stopping") ||
		!strings.Contains(out.String(), "Opened preset normal") {
		t.Errorf("alice's session: %v, told %q, last output %q", werr, errOut.String(), lastN(out.String(), 200))
	}
	for _, want := range []string{`msg="host key created"`, "msg=connect", `msg="keys reloaded" fellows=2`, "reason=shutdown", "msg=stopped"} {
		if !strings.Contains(log.String(), want) {
			t.Errorf("the log lacks %s:\n%s", want, log.String())
		}
	}
}

func sshKey(t *testing.T) gossh.Signer {
	_, priv, err := ed25519.GenerateKey(rand.Reader)
	if err != nil {
		t.Fatal(err)
	}
	s, err := gossh.NewSignerFromKey(priv)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func lastN(s string, n int) string {
	if len(s) > n {
		return s[len(s)-n:]
	}
	return s
}
