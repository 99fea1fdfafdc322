package server

import (
	"strings"
	"testing"

	gossh "golang.org/x/crypto/ssh"
)

// Everything but the explorer in a terminal is refused: unknown keys,
// passwords, keyboard-interactive, commands, subsystems (SFTP), forwarding
// of ports, agents and X11, and a session without a terminal.
func TestRefusals(t *testing.T) {
	l := startLab(t, nil)
	stranger := newKey(t)
	for _, c := range []struct {
		name string
		auth gossh.AuthMethod
	}{
		{"unknown key", gossh.PublicKeys(stranger.signer)},
		{"password", gossh.Password("alice")},
		{"keyboard-interactive", gossh.KeyboardInteractive(func(string, string, []string, []bool) ([]string, error) {
			return []string{"alice"}, nil
		})},
	} {
		if conn, err := gossh.Dial("tcp", l.addr, l.clientConfig("alice", c.auth)); err == nil {
			conn.Close()
			t.Errorf("%s: logged in", c.name)
		}
	}

	client := l.dial(t, "alice", l.alice)
	sess, _ := client.NewSession()
	if out, err := sess.CombinedOutput("cat /etc/passwd"); err == nil || len(out) > 0 {
		t.Errorf("exec: ran, output %q, err %v", out, err)
	}
	sess, _ = client.NewSession()
	if err := sess.RequestSubsystem("sftp"); err == nil {
		t.Error("the sftp subsystem was granted")
	}
	if c, err := client.Dial("tcp", l.addr); err == nil {
		c.Close()
		t.Error("local port forwarding was granted")
	}
	if ln, err := client.Listen("tcp", "127.0.0.1:0"); err == nil {
		ln.Close()
		t.Error("remote port forwarding was granted")
	}
	sess, _ = client.NewSession()
	for _, req := range []string{"auth-agent-req@openssh.com", "x11-req"} {
		if ok, _ := sess.SendRequest(req, true, nil); ok {
			t.Errorf("%s was granted", req)
		}
	}
	if ch, _, err := client.OpenChannel("auth-agent@openssh.com", nil); err == nil {
		ch.Close()
		t.Error("an agent channel was opened")
	}
	sess.Close()

	// A shell without a terminal is told and closed.
	sess, _ = client.NewSession()
	var stderr strings.Builder
	sess.Stderr = &stderr
	if err := sess.Shell(); err != nil {
		t.Fatal(err)
	}
	err := sess.Wait()
	if ee, ok := err.(*gossh.ExitError); !ok || ee.ExitStatus() != 1 || !strings.Contains(stderr.String(), "needs a terminal") {
		t.Errorf("a shell without a terminal: %v, told %q", err, stderr.String())
	}

	log := l.log.String()
	// (The client does not try a password or keyboard-interactive: the
	// server offers neither.)
	for _, want := range []string{"msg=\"auth failure\" method=publickey login=alice", "what=exec", "what=\"subsystem sftp\"", "what=\"port forwarding\"",
		"what=\"remote port forwarding\"", "what=\"agent forwarding\"", "what=\"X11 forwarding\"",
		"what=\"session without a terminal\""} {
		if !strings.Contains(log, want) {
			t.Errorf("the log lacks %s", want)
		}
	}
	if want := fingerprint(stranger.pub); !strings.Contains(log, want) {
		t.Errorf("the refused key's fingerprint %s is not in the log", want)
	}
	if strings.Contains(log, "cat /etc/passwd") {
		t.Error("the log holds the refused command")
	}
}
