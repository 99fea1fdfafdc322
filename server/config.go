package server

import (
	"errors"
	"fmt"
	"log/slog"
	"time"

	"pvcouple/internal/pool"
)

// Defaults of the limits.
const (
	// DefaultMaxSessions is the number of sessions served at once unless
	// told otherwise; the load test measures this many.
	DefaultMaxSessions = 20
	// DefaultIdleTimeout closes a session in which no key has been pressed
	// for this long.
	DefaultIdleTimeout = 30 * time.Minute
	// DefaultSessionWait closes a connection that has not opened an
	// explorer this long after it was made (a scan, a stuck login).
	DefaultSessionWait = time.Minute
)

// Config is how a lab server runs.
type Config struct {
	Listen         string        // TCP address, as ":2222" or "127.0.0.1:2222"
	HostKey        string        // the server's private key; created (0600) if missing
	AuthorizedKeys string        // the fellows' public keys, OpenSSH's format (see ParseAuthorizedKeys)
	Data           string        // the folder of DATA/users and DATA/shared
	MaxSessions    int           // sessions at once; 0 means DefaultMaxSessions
	IdleTimeout    time.Duration // without a key pressed; 0 means DefaultIdleTimeout, < 0 never
	SessionWait    time.Duration // from connecting to opening an explorer; 0 means DefaultSessionWait
	Log            *slog.Logger  // nil discards the log
	Pool           *pool.Pool    // the sessions' solve capacity; nil means pool.Default()
}

// withDefaults checks c and fills in the defaults.
func (c Config) withDefaults() (Config, error) {
	var missing []string
	for _, f := range []struct{ name, v string }{
		{"--listen", c.Listen}, {"--host-key", c.HostKey}, {"--authorized-keys", c.AuthorizedKeys}, {"--data", c.Data},
	} {
		if f.v == "" {
			missing = append(missing, f.name)
		}
	}
	if len(missing) > 0 {
		return c, fmt.Errorf("missing %v", missing)
	}
	switch {
	case c.MaxSessions < 0:
		return c, fmt.Errorf("--max-sessions %d: allowed 1 or more", c.MaxSessions)
	case c.MaxSessions == 0:
		c.MaxSessions = DefaultMaxSessions
	}
	if c.IdleTimeout == 0 {
		c.IdleTimeout = DefaultIdleTimeout
	}
	if c.SessionWait <= 0 {
		c.SessionWait = DefaultSessionWait
	}
	if c.Log == nil {
		c.Log = slog.New(slog.DiscardHandler)
	}
	if c.Pool == nil {
		c.Pool = pool.Default()
	}
	return c, nil
}

// errClosing refuses sessions while the server stops.
var errClosing = errors.New("the lab server is stopping")
