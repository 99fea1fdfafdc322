package server

import (
	"bytes"
	"context"
	"crypto/ed25519"
	"crypto/rand"
	"errors"
	"io"
	"log/slog"
	"net"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/charmbracelet/ssh"
	"github.com/charmbracelet/x/ansi"
	gossh "golang.org/x/crypto/ssh"

	"pvcouple/internal/pool"
)

// fellowKey is a test fellow's key pair.
type fellowKey struct {
	signer gossh.Signer
	pub    gossh.PublicKey
	priv   ed25519.PrivateKey
}

func newKey(t testing.TB) fellowKey {
	t.Helper()
	_, priv, err := ed25519.GenerateKey(rand.Reader)
	if err != nil {
		t.Fatal(err)
	}
	s, err := gossh.NewSignerFromKey(priv)
	if err != nil {
		t.Fatal(err)
	}
	return fellowKey{s, s.PublicKey(), priv}
}

// line is the key's authorized-keys line with prefix (options) and comment.
func (k fellowKey) line(prefix, comment string) string {
	l := strings.TrimSpace(string(gossh.MarshalAuthorizedKey(k.pub)))
	if prefix != "" {
		l = prefix + " " + l
	}
	if comment != "" {
		l += " " + comment
	}
	return l + "\n"
}

// logBuf collects the server's log lines.
type logBuf struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (l *logBuf) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *logBuf) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

// lab is a server running on the loopback interface with two fellows:
// alice (named by an option) and bob (named by his key's comment).
type lab struct {
	srv        *Server
	addr       string
	dir        string // holds host_key, authorized_keys and data/
	data       string
	alice, bob fellowKey
	log        *logBuf
	served     chan error
}

// startLab starts a lab server; change adjusts its configuration first.
func startLab(t *testing.T, change func(*Config)) *lab {
	t.Helper()
	dir := t.TempDir()
	l := &lab{dir: dir, data: filepath.Join(dir, "data"), alice: newKey(t), bob: newKey(t), log: &logBuf{}}
	if err := os.Mkdir(l.data, 0o755); err != nil {
		t.Fatal(err)
	}
	keys := l.alice.line(`name="alice"`, "alice@laptop") + "# the lab's second fellow\n" + l.bob.line("", "bob")
	if err := os.WriteFile(filepath.Join(dir, "authorized_keys"), []byte(keys), 0o644); err != nil {
		t.Fatal(err)
	}
	cfg := Config{
		Listen: "127.0.0.1:0", HostKey: filepath.Join(dir, "host_key"),
		AuthorizedKeys: filepath.Join(dir, "authorized_keys"), Data: l.data,
		Log: slog.New(slog.NewTextHandler(l.log, nil)), Pool: pool.New(0),
	}
	if change != nil {
		change(&cfg)
	}
	srv, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	l.srv, l.addr, l.served = srv, ln.Addr().String(), make(chan error, 1)
	go func() { l.served <- srv.Serve(ln) }()
	t.Cleanup(func() {
		ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
		defer cancel()
		_ = srv.Shutdown(ctx)
		if err := <-l.served; !errors.Is(err, ssh.ErrServerClosed) {
			t.Errorf("Serve returned %v", err)
		}
	})
	return l
}

// clientConfig logs in as user with auth, checking the server's host key.
func (l *lab) clientConfig(user string, auth ...gossh.AuthMethod) *gossh.ClientConfig {
	return &gossh.ClientConfig{User: user, Auth: auth, HostKeyCallback: gossh.FixedHostKey(l.srv.HostKey()),
		Timeout: 5 * time.Second}
}

// dial connects as user with key k.
func (l *lab) dial(t testing.TB, user string, k fellowKey) *gossh.Client {
	t.Helper()
	c, err := gossh.Dial("tcp", l.addr, l.clientConfig(user, gossh.PublicKeys(k.signer)))
	if err != nil {
		t.Fatalf("login as %s: %v", user, err)
	}
	t.Cleanup(func() { c.Close() })
	return c
}

// term is an SSH session with a terminal, its output collected.
type term struct {
	t    testing.TB
	sess *gossh.Session
	in   io.WriteCloser
	mu   sync.Mutex
	out  bytes.Buffer
	errs bytes.Buffer
	more chan struct{}  // a signal after each read
	from int            // waitFor looks at the output from here (mark)
	read sync.WaitGroup // the copies of stdout and stderr
}

// mark makes waitFor look only at output written from now on.
func (tm *term) mark() {
	tm.mu.Lock()
	tm.from = tm.out.Len()
	tm.mu.Unlock()
}

// openTerm opens the explorer on client c in a terminal of type termType,
// w × h, with the environment variables env ("KEY=value").
func openTerm(t testing.TB, c *gossh.Client, termType string, w, h int, env ...string) *term {
	t.Helper()
	sess, err := c.NewSession()
	if err != nil {
		t.Fatal(err)
	}
	tm := &term{t: t, sess: sess, more: make(chan struct{}, 1)}
	for _, kv := range env {
		k, v, _ := strings.Cut(kv, "=")
		if err := sess.Setenv(k, v); err != nil {
			t.Fatalf("setenv %s: %v", k, err)
		}
	}
	if err := sess.RequestPty(termType, h, w, gossh.TerminalModes{}); err != nil {
		t.Fatal(err)
	}
	if tm.in, err = sess.StdinPipe(); err != nil {
		t.Fatal(err)
	}
	stdout, _ := sess.StdoutPipe()
	stderr, _ := sess.StderrPipe()
	tm.read.Add(2)
	go tm.copy(stdout, &tm.out)
	go tm.copy(stderr, &tm.errs)
	if err := sess.Shell(); err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { sess.Close() })
	return tm
}

func (tm *term) copy(r io.Reader, dst *bytes.Buffer) {
	defer tm.read.Done()
	buf := make([]byte, 32<<10)
	for {
		n, err := r.Read(buf)
		if n > 0 {
			tm.mu.Lock()
			dst.Write(buf[:n])
			tm.mu.Unlock()
			select {
			case tm.more <- struct{}{}:
			default:
			}
		}
		if err != nil {
			return
		}
	}
}

// raw returns everything written to the terminal so far, escapes included.
func (tm *term) raw() string {
	tm.mu.Lock()
	defer tm.mu.Unlock()
	return tm.out.String()
}

// text is the terminal's output without escape sequences, stdout then stderr.
func (tm *term) text() string {
	tm.mu.Lock()
	defer tm.mu.Unlock()
	return ansi.Strip(tm.out.String()) + ansi.Strip(tm.errs.String())
}

// recent is text from the mark on.
func (tm *term) recent() string {
	tm.mu.Lock()
	defer tm.mu.Unlock()
	return ansi.Strip(tm.out.String()[tm.from:]) + ansi.Strip(tm.errs.String())
}

// waitFor waits until the output holds every one of what.
func (tm *term) waitFor(what ...string) {
	tm.t.Helper()
	deadline := time.After(10 * time.Second)
	for {
		txt := tm.recent()
		ok := true
		for _, w := range what {
			ok = ok && strings.Contains(txt, w)
		}
		if ok {
			return
		}
		select {
		case <-tm.more:
		case <-time.After(50 * time.Millisecond):
		case <-deadline:
			tm.t.Fatalf("never saw %q; the screen had:\n%s", what, lastChars(txt, 3000))
		}
	}
}

// keys types s.
func (tm *term) keys(s string) {
	tm.t.Helper()
	if _, err := io.WriteString(tm.in, s); err != nil {
		tm.t.Fatalf("typing %q: %v", s, err)
	}
}

// exit waits for the session to end and returns its exit status.
func (tm *term) exit() int {
	tm.t.Helper()
	done := make(chan error, 1)
	go func() {
		err := tm.sess.Wait()
		tm.read.Wait() // all the output is in
		done <- err
	}()
	select {
	case err := <-done:
		var ee *gossh.ExitError
		switch {
		case err == nil:
			return 0
		case errors.As(err, &ee):
			return ee.ExitStatus()
		}
		tm.t.Fatalf("session ended without a status: %v", err)
	case <-time.After(10 * time.Second):
		tm.t.Fatal("the session did not end")
	}
	return -1
}

func lastChars(s string, n int) string {
	if len(s) > n {
		return s[len(s)-n:]
	}
	return s
}
