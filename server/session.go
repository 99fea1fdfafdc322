package server

import (
	"fmt"
	"io"
	"math"
	"sync"
	"sync/atomic"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/ssh"

	"pvcouple/presets"
	"pvcouple/ui"
)

// endReason is why the server ended a session; "" when the fellow quit or
// the connection went.
type endReason string

const (
	endIdle       endReason = "idle"
	endShutdown   endReason = "shutdown"
	endKeyRemoved endReason = "key removed"
)

// session is one explorer being served.
type session struct {
	id     int
	fellow string
	key    ssh.PublicKey
	start  time.Time

	mu     sync.Mutex
	prog   *tea.Program // nil until the program is made
	model  *ui.Model
	files  *folders
	reason endReason // why the server ended it, once
}

// end asks the session's explorer to quit for reason; the first reason
// counts.
func (ss *session) end(r endReason) {
	ss.mu.Lock()
	if ss.reason == "" {
		ss.reason = r
	}
	p := ss.prog
	ss.mu.Unlock()
	if p != nil {
		p.Quit()
	}
}

// ended returns the reason the server ended the session, if it did.
func (ss *session) ended() endReason {
	ss.mu.Lock()
	defer ss.mu.Unlock()
	return ss.reason
}

// farewell is what a session is told when the server ends it.
func (s *Server) farewell(r endReason) string {
	switch r {
	case endIdle:
		return fmt.Sprintf("closed after %s without a key pressed. Files you saved are kept.", s.cfg.IdleTimeout)
	case endShutdown:
		return "the lab server is stopping, so this session is closed. Files you saved are kept."
	case endKeyRemoved:
		return "your key is no longer authorized on this lab server, so this session is closed."
	}
	return ""
}

// admit runs first for every shell request: it finds the fellow of the key,
// requires a terminal, applies the session limit and opens the fellow's
// folders; then the explorer runs (next), and admit logs the end.
func (s *Server) admit(next ssh.Handler) ssh.Handler {
	return func(sess ssh.Session) {
		ctx := sess.Context()
		if st, ok := ctx.Value(keyConn).(*connState); ok {
			st.started.Store(true)
		}
		refuse := func(why, msg string) {
			s.refused(ctx, why)
			fmt.Fprintf(sess.Stderr(), "pvcouple: %s\n", msg)
			_ = sess.Exit(1)
		}
		fellow, ok := s.Keys().Lookup(sess.PublicKey())
		if !ok {
			refuse("session of an unknown key", "this key is not authorized on the lab server.")
			return
		}
		pty, _, ok := sess.Pty()
		if !ok {
			refuse("session without a terminal", "the explorer needs a terminal: connect with ssh -t.")
			return
		}
		ss, err := s.register(fellow, sess.PublicKey())
		if err != nil {
			refuse("session: "+err.Error(), err.Error()+"; try again later.")
			return
		}
		defer s.unregister(ss)
		files, err := openFolders(s.users, s.shared, fellow)
		if err != nil {
			s.log.Error("folder", "session", ss.id, "fellow", fellow, "error", err.Error())
			fmt.Fprintln(sess.Stderr(), "pvcouple: your folder on the lab server cannot be opened; tell the lab's administrator.")
			_ = sess.Exit(1)
			return
		}
		defer files.Close()
		files.saved = func(name string, size int, replaced bool) {
			s.log.Info("save", "session", ss.id, "fellow", fellow, "file", name, "bytes", size, "replaced", replaced)
		}
		ss.files = files
		ctx.SetValue(keySession, ss)
		s.log.Info("connect", "session", ss.id, "fellow", fellow, "login", clip(sess.User()),
			"remote", addr(sess.RemoteAddr()), "term", clip(pty.Term), "cols", pty.Window.Width, "rows", pty.Window.Height)

		next(sess) // the explorer, until it quits

		ss.mu.Lock()
		m := ss.model
		ss.mu.Unlock()
		if m != nil {
			m.Close()
		}
		r := ss.ended()
		how := string(r)
		switch {
		case r != "":
		case ctx.Err() != nil:
			how = "connection closed"
		default:
			how = "quit"
		}
		s.log.Info("disconnect", "session", ss.id, "fellow", fellow, "reason", how,
			"seconds", int(time.Since(ss.start).Seconds()))
		if r != "" {
			fmt.Fprintf(sess.Stderr(), "pvcouple: %s\n", s.farewell(r))
			_ = sess.Exit(1)
		}
	}
}

// register counts a new session in, unless the server is at its limit or
// stopping.
func (s *Server) register(fellow string, key ssh.PublicKey) (*session, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	switch {
	case s.closing:
		return nil, errClosing
	case len(s.sessions) >= s.cfg.MaxSessions:
		return nil, fmt.Errorf("the lab server has %d sessions open, its limit", len(s.sessions))
	}
	s.nextID++
	ss := &session{id: s.nextID, fellow: fellow, key: key, start: time.Now()}
	s.sessions[ss.id] = ss
	s.wg.Add(1)
	return ss, nil
}

// unregister counts a session out.
func (s *Server) unregister(ss *session) {
	s.mu.Lock()
	delete(s.sessions, ss.id)
	s.mu.Unlock()
	s.wg.Done()
}

// program makes the explorer of a session admitted by admit: its own
// renderer and colour profile from the client's environment (TERM,
// COLORTERM, NO_COLOR), the fellow's folders, the server's pool, and input
// watched for the idle timeout. It returns nil, and the session ends, if the
// server ended the session meanwhile or the explorer cannot start.
func (s *Server) program(sess ssh.Session) *tea.Program {
	ss, ok := sess.Context().Value(keySession).(*session)
	if !ok {
		return nil
	}
	env := sess.Environ() // with TERM from the terminal request
	profile, _ := ui.RemoteProfile("auto", sess, env)
	styles := ui.NewStyles(ui.NewRenderer(sess, profile))
	sc, err := presets.Get(presets.Default)
	var m *ui.Model
	if err == nil {
		m, err = ui.NewWithOptions(sc, "preset "+presets.Default, styles, ui.Options{Pool: s.pool, Folders: ss.files})
	}
	if err != nil {
		s.log.Error("explorer", "session", ss.id, "error", err.Error())
		return nil
	}
	in := &idleReader{r: sess}
	in.touch()
	p := ui.NewProgram(sizedModel{m}, tea.WithInput(in), tea.WithOutput(sess), tea.WithEnvironment(env), tea.WithoutSignalHandler())

	ss.mu.Lock()
	ss.prog, ss.model = p, m
	ended := ss.reason != ""
	ss.mu.Unlock()
	if ended {
		m.Close()
		return nil
	}
	if s.cfg.IdleTimeout > 0 {
		s.watchIdle(ss, in, sess)
	}
	return p
}

// idleReader is a session's input that remembers when it last read a byte.
type idleReader struct {
	r    io.Reader
	last atomic.Int64 // unix nanoseconds
}

func (ir *idleReader) touch() { ir.last.Store(time.Now().UnixNano()) }

func (ir *idleReader) Read(p []byte) (int, error) {
	n, err := ir.r.Read(p)
	if n > 0 {
		ir.touch()
	}
	return n, err
}

// idleFor is how long since the last input.
func (ir *idleReader) idleFor() time.Duration {
	return time.Since(time.Unix(0, ir.last.Load()))
}

// watchIdle ends the session once no input has come for the idle timeout.
func (s *Server) watchIdle(ss *session, in *idleReader, sess ssh.Session) {
	var check func()
	var t *time.Timer
	check = func() {
		if sess.Context().Err() != nil {
			return
		}
		if d := in.idleFor(); d < s.cfg.IdleTimeout {
			t.Reset(s.cfg.IdleTimeout - d)
			return
		}
		ss.end(endIdle)
	}
	// t is set before it can fire: check reads it.
	t = time.AfterFunc(math.MaxInt64, check)
	t.Reset(s.cfg.IdleTimeout)
}
