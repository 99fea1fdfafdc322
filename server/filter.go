package server

import (
	"strings"

	"github.com/charmbracelet/ssh"
	gossh "golang.org/x/crypto/ssh"
)

// Limits on what a session channel may ask for.
const (
	maxEnv      = 64   // environment variables a session may set
	maxEnvValue = 1024 // bytes of one variable's name and value
)

// refusedRequest names what a request on a session channel asks for when
// the server refuses it, or "" when it may go on to the session: only a
// terminal, its size, a shell (the explorer), signals, breaks and a bounded
// environment go on.
func refusedRequest(r *gossh.Request, envs *int) string {
	switch r.Type {
	case "exec":
		return "exec"
	case "subsystem":
		var p struct{ Name string }
		if gossh.Unmarshal(r.Payload, &p) == nil && len(p.Name) <= 64 {
			return "subsystem " + strings.ToValidUTF8(p.Name, "?")
		}
		return "subsystem"
	case "auth-agent-req@openssh.com":
		return "agent forwarding"
	case "x11-req":
		return "X11 forwarding"
	case "env":
		*envs++
		if *envs > maxEnv || len(r.Payload) > maxEnvValue {
			return "environment beyond its limit"
		}
	}
	return ""
}

// filteredChannel is a new session channel whose requests pass refusedRequest
// before the SSH library sees them.
type filteredChannel struct {
	gossh.NewChannel
	refused func(what string)
}

// Accept implements gossh.NewChannel.
func (c filteredChannel) Accept() (gossh.Channel, <-chan *gossh.Request, error) {
	ch, in, err := c.NewChannel.Accept()
	if err != nil {
		return ch, in, err
	}
	out := make(chan *gossh.Request)
	go func() {
		defer close(out)
		envs := 0
		for r := range in {
			if what := refusedRequest(r, &envs); what != "" {
				c.refused(what) // logged before the client hears of it
				if r.WantReply {
					_ = r.Reply(false, nil)
				}
				continue
			}
			out <- r
		}
	}()
	return ch, out, nil
}

// sessionChannel handles a new session channel with its requests filtered.
func (s *Server) sessionChannel(srv *ssh.Server, conn *gossh.ServerConn, nc gossh.NewChannel, ctx ssh.Context) {
	ssh.DefaultSessionHandler(srv, conn, filteredChannel{nc, func(what string) { s.refused(ctx, what) }}, ctx)
}

// otherChannel refuses any channel but a session: port forwarding
// (direct-tcpip), X11, agent and anything else.
func (s *Server) otherChannel(_ *ssh.Server, _ *gossh.ServerConn, nc gossh.NewChannel, ctx ssh.Context) {
	what := "channel " + strings.ToValidUTF8(nc.ChannelType(), "?")
	if nc.ChannelType() == "direct-tcpip" {
		what = "port forwarding"
	}
	s.refused(ctx, what)
	_ = nc.Reject(gossh.Prohibited, "pvcouple serves the explorer only")
}

// globalRequest refuses requests on the connection: forwarding a port from
// the server (tcpip-forward) and the like. Keep-alives are answered as
// OpenSSH answers unknown ones, without a log line.
func (s *Server) globalRequest(ctx ssh.Context, _ *ssh.Server, r *gossh.Request) (bool, []byte) {
	switch {
	case strings.HasPrefix(r.Type, "keepalive@"), r.Type == "no-more-sessions@openssh.com",
		r.Type == "hostkeys-prove-00@openssh.com":
	case r.Type == "tcpip-forward", r.Type == "streamlocal-forward@openssh.com":
		s.refused(ctx, "remote port forwarding")
	default:
		if len(r.Type) <= 64 {
			s.refused(ctx, "request "+strings.ToValidUTF8(r.Type, "?"))
		}
	}
	return false, nil
}
