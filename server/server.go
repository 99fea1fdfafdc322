package server

import (
	"context"
	"crypto/sha256"
	"encoding/base64"
	"errors"
	"fmt"
	"io/fs"
	"log/slog"
	"net"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/charmbracelet/ssh"
	"github.com/charmbracelet/wish"
	"github.com/charmbracelet/wish/bubbletea"
	"github.com/muesli/termenv"
	gossh "golang.org/x/crypto/ssh"

	"pvcouple/internal/pool"
)

// Server is a lab server. Make one with New, run it with Serve, stop it
// with Shutdown; Reload re-reads the authorized keys.
type Server struct {
	cfg  Config
	log  *slog.Logger
	pool *pool.Pool
	srv  *ssh.Server
	keys atomic.Pointer[Keyring]

	hostKey        gossh.PublicKey
	users, shared  *os.Root // DATA/users and DATA/shared
	keyFileCreated bool

	mu       sync.Mutex
	sessions map[int]*session // the explorers open
	nextID   int
	closing  bool
	wg       sync.WaitGroup // one per registered session
}

// context keys of a connection.
type ctxKey int

const (
	keyConn    ctxKey = iota // *connState
	keySession               // *session
)

// connState is what the server knows of one connection.
type connState struct {
	id      int64
	started atomic.Bool  // an explorer was opened on it
	offered atomic.Value // string: the fingerprint of the last key offered
}

var connIDs atomic.Int64

// New checks cfg, reads (or creates) the host key, reads the authorized
// keys and opens DATA, creating DATA/users and DATA/shared if missing.
func New(cfg Config) (*Server, error) {
	cfg, err := cfg.withDefaults()
	if err != nil {
		return nil, err
	}
	s := &Server{cfg: cfg, log: cfg.Log, pool: cfg.Pool, sessions: map[int]*session{}}
	signer, created, err := LoadHostKey(cfg.HostKey)
	if err != nil {
		return nil, err
	}
	s.hostKey, s.keyFileCreated = signer.PublicKey(), created
	ring, err := LoadAuthorizedKeys(cfg.AuthorizedKeys)
	if err != nil {
		return nil, err
	}
	if ring.Len() == 0 {
		return nil, fmt.Errorf("%s has no keys: add one line per fellow (see pvcouple serve --help)", cfg.AuthorizedKeys)
	}
	s.keys.Store(ring)
	if s.users, s.shared, err = openData(cfg.Data); err != nil {
		return nil, err
	}

	s.srv, err = wish.NewServer(
		wish.WithAddress(cfg.Listen),
		wish.WithVersion("pvcouple"),
		func(srv *ssh.Server) error { srv.AddHostKey(signer); return nil },
		wish.WithPublicKeyAuth(s.checkKey),
		wish.WithMiddleware(
			bubbletea.MiddlewareWithProgramHandler(s.program, termenv.Ascii),
			s.admit,
		),
	)
	if err != nil {
		return nil, err
	}
	s.srv.ChannelHandlers = map[string]ssh.ChannelHandler{"session": s.sessionChannel, "default": s.otherChannel}
	s.srv.RequestHandlers = map[string]ssh.RequestHandler{"default": s.globalRequest}
	s.srv.SubsystemHandlers = map[string]ssh.SubsystemHandler{}
	s.srv.SessionRequestCallback = func(_ ssh.Session, kind string) bool { return kind == "shell" }
	s.srv.ConnCallback = s.connected
	s.srv.ServerConfigCallback = s.sshConfig
	s.srv.ConnectionFailedCallback = func(c net.Conn, err error) {
		if !errors.Is(err, net.ErrClosed) {
			s.log.Info("handshake failed", "remote", c.RemoteAddr().String(), "error", err.Error())
		}
	}
	return s, nil
}

// openData opens DATA/users and DATA/shared, creating them if missing.
func openData(data string) (users, shared *os.Root, err error) {
	fi, err := os.Stat(data)
	if err != nil {
		return nil, nil, fmt.Errorf("--data: %w", err)
	}
	if !fi.IsDir() {
		return nil, nil, fmt.Errorf("--data %s: not a folder", data)
	}
	for _, d := range []string{"users", "shared"} {
		if err := os.Mkdir(filepath.Join(data, d), 0o750); err != nil && !errors.Is(err, fs.ErrExist) {
			return nil, nil, fmt.Errorf("--data: %w", err)
		}
	}
	if users, err = os.OpenRoot(filepath.Join(data, "users")); err != nil {
		return nil, nil, fmt.Errorf("--data: %w", err)
	}
	if shared, err = os.OpenRoot(filepath.Join(data, "shared")); err != nil {
		users.Close()
		return nil, nil, fmt.Errorf("--data: %w", err)
	}
	return users, shared, nil
}

// HostKeyCreated reports whether New created the host key.
func (s *Server) HostKeyCreated() bool { return s.keyFileCreated }

// HostKey returns the server's public host key.
func (s *Server) HostKey() gossh.PublicKey { return s.hostKey }

// Keys returns the authorized keys in use.
func (s *Server) Keys() *Keyring { return s.keys.Load() }

// Serve accepts connections on l until Shutdown; it then returns
// ssh.ErrServerClosed.
func (s *Server) Serve(l net.Listener) error {
	s.log.Info("listening", "addr", l.Addr().String(), "fellows", s.Keys().Fellows(), "keys", s.Keys().Len(),
		"max_sessions", s.cfg.MaxSessions, "idle_timeout", s.cfg.IdleTimeout.String(),
		"host_key", fingerprint(s.hostKey))
	return s.srv.Serve(l)
}

// Reload re-reads the authorized-keys file. A file that cannot be read
// changes nothing: the keys in use stay, and the error says why. Sessions
// of keys that are gone, or now belong to another name, are told and closed.
func (s *Server) Reload() error {
	ring, err := LoadAuthorizedKeys(s.cfg.AuthorizedKeys)
	if err != nil {
		s.log.Warn("keys not reloaded", "error", err.Error(), "kept", s.Keys().Len())
		return err
	}
	s.keys.Store(ring)
	s.log.Info("keys reloaded", "fellows", ring.Fellows(), "keys", ring.Len())
	s.mu.Lock()
	defer s.mu.Unlock()
	for _, ss := range s.sessions {
		if name, ok := ring.Lookup(ss.key); !ok || name != ss.fellow {
			go ss.end(endKeyRemoved)
		}
	}
	return nil
}

// Shutdown stops the server: no new connections or sessions, every open
// session is told and closed, and Shutdown waits for them until ctx is done,
// then closes every connection. Saves are atomic, so a session closed
// mid-save leaves the old file or the new one, never half of one.
func (s *Server) Shutdown(ctx context.Context) error {
	s.mu.Lock()
	s.closing = true
	open := len(s.sessions)
	for _, ss := range s.sessions {
		go ss.end(endShutdown)
	}
	s.mu.Unlock()
	s.log.Info("stopping", "sessions", open)
	done := make(chan struct{})
	go func() { s.wg.Wait(); close(done) }()
	var err error
	select {
	case <-done:
	case <-ctx.Done():
		err = fmt.Errorf("sessions still open when the wait ended: %w", ctx.Err())
	}
	_ = s.srv.Close()
	s.users.Close()
	s.shared.Close()
	s.log.Info("stopped")
	return err
}

// connected starts watching a new connection: it must open an explorer
// within SessionWait.
func (s *Server) connected(ctx ssh.Context, c net.Conn) net.Conn {
	st := &connState{id: connIDs.Add(1)}
	ctx.SetValue(keyConn, st)
	time.AfterFunc(s.cfg.SessionWait, func() {
		if !st.started.Load() {
			_ = c.Close()
		}
	})
	return c
}

// sshConfig is the SSH configuration of one connection: it logs refused
// authentication.
func (s *Server) sshConfig(ctx ssh.Context) *gossh.ServerConfig {
	return &gossh.ServerConfig{
		MaxAuthTries: 6,
		AuthLogCallback: func(meta gossh.ConnMetadata, method string, err error) {
			if err == nil || method == "none" {
				return
			}
			args := []any{"method", method, "login", clip(meta.User()), "remote", meta.RemoteAddr().String()}
			if st, ok := ctx.Value(keyConn).(*connState); ok && method == "publickey" {
				if fp, ok := st.offered.Load().(string); ok {
					args = append(args, "key", fp)
				}
			}
			s.log.Info("auth failure", args...)
		},
	}
}

// checkKey lets a key in if it is in the authorized keys now.
func (s *Server) checkKey(ctx ssh.Context, key ssh.PublicKey) bool {
	if st, ok := ctx.Value(keyConn).(*connState); ok {
		st.offered.Store(fingerprint(key))
	}
	_, ok := s.Keys().Lookup(key)
	return ok
}

// refused logs a request the server refused.
func (s *Server) refused(ctx ssh.Context, what string) {
	args := []any{"what", what, "login", clip(ctx.User()), "remote", addr(ctx.RemoteAddr())}
	if ss, ok := ctx.Value(keySession).(*session); ok {
		args = append(args, "session", ss.id, "fellow", ss.fellow)
	}
	s.log.Info("refused", args...)
}

// fingerprint is a key's type and SHA-256 fingerprint, as OpenSSH prints
// it: a hash that names the key without giving it.
func fingerprint(k gossh.PublicKey) string {
	if k == nil {
		return ""
	}
	sum := sha256.Sum256(k.Marshal())
	return k.Type() + " SHA256:" + base64.RawStdEncoding.EncodeToString(sum[:])
}

// clip shortens a string from a client for the log (which quotes it).
func clip(s string) string {
	r := []rune(strings.ToValidUTF8(s, "?"))
	if len(r) > 64 {
		return string(r[:64]) + "…"
	}
	return string(r)
}

// addr is the text of a network address, "" for none.
func addr(a net.Addr) string {
	if a == nil {
		return ""
	}
	return a.String()
}
