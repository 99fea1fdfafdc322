package cli

import (
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"os"
	"os/signal"
	"syscall"
	"time"

	"github.com/charmbracelet/ssh"

	"pvcouple/server"
)

func init() {
	register(command{"serve", "serve the explorer over SSH to the fellows of a lab", runServe})
}

// drainWait is how long a stopping server waits for its sessions to close.
const drainWait = 5 * time.Second

// serveSetup is printed by `serve` with nothing configured: the two commands
// that set a lab server up.
const serveSetup = `pvcouple serve: nothing configured. To serve the explorer to a lab over SSH, on the lab host:

  mkdir -p /srv/pvcouple/data && sed 's/^/name="alice" /' alice.pub >> /srv/pvcouple/authorized_keys
  pvcouple serve --listen :2222 --host-key /srv/pvcouple/host_key --authorized-keys /srv/pvcouple/authorized_keys --data /srv/pvcouple/data

The first adds the fellow alice by her public key (repeat it for each fellow, with
each one's name and key); the second creates the host key and serves. Then each
fellow runs: ssh -p 2222 lab-host
`

func runServe(env *Env, args []string) error {
	fs := newFlags(env, "serve", "serve --listen ADDR --host-key FILE --authorized-keys FILE --data DIR "+
		"[--max-sessions N] [--idle-timeout DUR] [--log FILE]",
		"Serves the explorer over SSH: `ssh -p PORT lab-host` opens it, one explorer per session.\n"+
			"Only keys in the authorized-keys file (OpenSSH's format) get in; each line names its fellow\n"+
			"by a name=\"NAME\" option before the key, or by the key's comment (1-32 of a-z 0-9 . _ -).\n"+
			"A fellow's files live in DIR/users/NAME; DIR/shared holds the lab's files, read only.\n"+
			"No password login, shell, commands, forwarding or SFTP. SIGHUP re-reads the keys;\n"+
			"SIGTERM closes every session (waiting up to 5 s) and stops.\n"+
			"A model for research and education planning, not for treating patients.")
	listen := fs.String("listen", "", "TCP `ADDR` to listen on, as :2222 or 127.0.0.1:2222")
	hostKey := fs.String("host-key", "", "the server's private key `FILE`; created (mode 0600) if missing, then reused")
	keys := fs.String("authorized-keys", "", "the fellows' public keys `FILE`, one a line")
	data := fs.String("data", "", "the folder `DIR` of users/ and shared/ (created inside it if missing)")
	maxSessions := fs.Int("max-sessions", server.DefaultMaxSessions, "sessions served at once, `N` ≥ 1")
	idle := fs.Duration("idle-timeout", server.DefaultIdleTimeout, "close a session after `DUR` without a key pressed (0: never)")
	logFile := fs.String("log", "", "append the log to `FILE` instead of standard error")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usagef("serve takes no arguments, got %q", pos[0])
	}
	if len(args) == 0 {
		fmt.Fprint(env.Stderr, serveSetup)
		return usagef("serve: nothing configured")
	}
	if *maxSessions < 1 {
		return usagef("--max-sessions %d: allowed 1 or more", *maxSessions)
	}
	if *idle < 0 {
		return usagef("--idle-timeout %s: allowed 0 (never) or more", *idle)
	}
	if *idle == 0 {
		*idle = -1 // never
	}
	for _, f := range []struct{ name, v string }{
		{"--listen", *listen}, {"--host-key", *hostKey}, {"--authorized-keys", *keys}, {"--data", *data},
	} {
		if f.v == "" {
			return usagef("serve: %s is missing (run pvcouple serve without options for an example)", f.name)
		}
	}
	logw, closeLog, err := openLog(env, *logFile)
	if err != nil {
		return err
	}
	defer closeLog()
	cfg := server.Config{Listen: *listen, HostKey: *hostKey, AuthorizedKeys: *keys, Data: *data,
		MaxSessions: *maxSessions, IdleTimeout: *idle, Log: slog.New(slog.NewTextHandler(logw, nil))}
	srv, err := server.New(cfg)
	if err != nil {
		return err
	}
	if srv.HostKeyCreated() {
		cfg.Log.Info("host key created", "file", *hostKey)
	}
	ln, err := net.Listen("tcp", *listen)
	if err != nil {
		return fmt.Errorf("cannot listen on %s: %w", *listen, err)
	}
	return serveUntilSignal(srv, ln, cfg.Log)
}

// serveUntilSignal serves on ln until SIGTERM or SIGINT, re-reading the
// keys on SIGHUP.
func serveUntilSignal(srv *server.Server, ln net.Listener, log *slog.Logger) error {
	sigs := make(chan os.Signal, 4)
	signal.Notify(sigs, syscall.SIGHUP, syscall.SIGTERM, syscall.SIGINT)
	defer signal.Stop(sigs)
	served := make(chan error, 1)
	go func() { served <- srv.Serve(ln) }()
	for {
		select {
		case err := <-served:
			return fmt.Errorf("serving stopped: %w", err)
		case sig := <-sigs:
			if sig == syscall.SIGHUP {
				_ = srv.Reload() // logged; the keys in use stay on failure
				continue
			}
			log.Info("signal", "signal", sig.String())
			ctx, cancel := context.WithTimeout(context.Background(), drainWait)
			err := srv.Shutdown(ctx)
			cancel()
			if serr := <-served; serr != nil && !errors.Is(serr, ssh.ErrServerClosed) {
				return fmt.Errorf("serving stopped: %w", serr)
			}
			if err != nil {
				log.Warn("stopped with sessions open", "error", err.Error())
			}
			return nil
		}
	}
}

// openLog opens the log: the file named (appended to, created 0640) or
// standard error.
func openLog(env *Env, name string) (io.Writer, func(), error) {
	if name == "" {
		return env.Stderr, func() {}, nil
	}
	f, err := os.OpenFile(name, os.O_WRONLY|os.O_APPEND|os.O_CREATE, 0o640)
	if err != nil {
		return nil, nil, fmt.Errorf("--log: %w", err)
	}
	return f, func() { f.Close() }, nil
}
