package server

import (
	"context"
	"encoding/base64"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	gossh "golang.org/x/crypto/ssh"
)

// Reload takes a new key in, keeps the keys in use when the file is bad,
// and closes the session of a key that was removed.
func TestReload(t *testing.T) {
	l := startLab(t, nil)
	carol := newKey(t)
	keysPath := filepath.Join(l.dir, "authorized_keys")
	if _, err := gossh.Dial("tcp", l.addr, l.clientConfig("carol", gossh.PublicKeys(carol.signer))); err == nil {
		t.Fatal("carol got in before her key was added")
	}
	bobs := openTerm(t, l.dial(t, "bob", l.bob), "xterm", 100, 30)
	bobs.waitFor("Opened preset normal")

	// A bad file: nothing changes.
	if err := os.WriteFile(keysPath, []byte(l.alice.line("", "Alice@laptop")), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := l.srv.Reload(); err == nil || !strings.Contains(err.Error(), "authorized_keys:1:") {
		t.Fatalf("a bad file was taken: %v", err)
	}
	l.dial(t, "bob", l.bob).Close()

	// Carol in, bob out.
	keys := l.alice.line(`name="alice"`, "") + carol.line("", "carol")
	if err := os.WriteFile(keysPath, []byte(keys), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := l.srv.Reload(); err != nil {
		t.Fatal(err)
	}
	l.dial(t, "carol", carol).Close()
	if c, err := gossh.Dial("tcp", l.addr, l.clientConfig("bob", gossh.PublicKeys(l.bob.signer))); err == nil {
		c.Close()
		t.Error("bob got in after his key was removed")
	}
	if code := bobs.exit(); code != 1 || !strings.Contains(bobs.text(), "your key is no longer authorized") {
		t.Errorf("bob's open session: exit %d, told %q", code, lastChars(bobs.text(), 200))
	}
	log := l.log.String()
	if !strings.Contains(log, `msg="keys not reloaded"`) || !strings.Contains(log, `msg="keys reloaded" fellows=2 keys=2`) {
		t.Errorf("reloads not logged:\n%s", log)
	}
}

// Shutdown tells every session and closes it, in well under the 5 s it
// may wait; new connections are refused.
func TestShutdown(t *testing.T) {
	l := startLab(t, nil)
	a := openTerm(t, l.dial(t, "alice", l.alice), "xterm", 100, 30)
	b := openTerm(t, l.dial(t, "bob", l.bob), "xterm", 100, 30)
	a.waitFor("Opened preset normal")
	b.waitFor("Opened preset normal")
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	start := time.Now()
	if err := l.srv.Shutdown(ctx); err != nil {
		t.Fatal(err)
	}
	if took := time.Since(start); took > 2*time.Second {
		t.Errorf("shutdown took %v", took)
	}
	for _, tm := range []*term{a, b} {
		if code := tm.exit(); code != 1 || !strings.Contains(tm.text(), "the lab server is stopping") {
			t.Errorf("exit %d, told %q", code, lastChars(tm.text(), 200))
		}
	}
	if c, err := gossh.Dial("tcp", l.addr, l.clientConfig("alice", gossh.PublicKeys(l.alice.signer))); err == nil {
		c.Close()
		t.Error("a connection was taken after shutdown")
	}
}

// The log has a line for each connection, save and disconnect, and never a
// key (its wire form in base64) or a file's contents.
func TestLogHoldsNoSecrets(t *testing.T) {
	l := startLab(t, nil)
	tm := openTerm(t, l.dial(t, "alice", l.alice), "xterm", 100, 30)
	tm.waitFor("Opened preset normal")
	tm.keys("s\x15logged\r")
	tm.waitFor("Saved levers and baseline to logged.yaml")
	tm.keys("q")
	tm.exit()
	if _, err := gossh.Dial("tcp", l.addr, l.clientConfig("alice", gossh.PublicKeys(newKey(t).signer))); err == nil {
		t.Fatal("a stranger got in")
	}
	log := l.log.String()
	for _, want := range []string{"msg=connect", `msg=save session=1 fellow=alice file=logged.yaml bytes=`,
		"msg=disconnect", `msg="auth failure"`} {
		if !strings.Contains(log, want) {
			t.Errorf("the log lacks %s", want)
		}
	}
	saved, _ := os.ReadFile(filepath.Join(l.data, "users", "alice", "logged.yaml"))
	for _, secret := range []string{
		base64.StdEncoding.EncodeToString(l.alice.pub.Marshal()),
		base64.StdEncoding.EncodeToString(l.srv.HostKey().Marshal()),
		"filling_pressure_mmhg", // in the saved file
	} {
		if strings.Contains(log, secret) {
			t.Errorf("the log holds %.40s…", secret)
		}
	}
	if !strings.Contains(string(saved), "filling_pressure_mmhg") {
		t.Error("the saved file is not a scenario")
	}
	for _, line := range strings.Split(strings.TrimSpace(log), "\n") {
		if !strings.HasPrefix(line, "time=") || !strings.Contains(line, " level=") || !strings.Contains(line, " msg=") {
			t.Errorf("not a structured line: %q", line)
		}
	}
}
