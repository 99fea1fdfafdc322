package ui

import (
	"io"
	"testing"

	"github.com/muesli/termenv"
)

// A remote terminal's colours follow its TERM and COLORTERM, and NO_COLOR
// turns them off (https://no-color.org), as termenv reads them locally.
func TestRemoteProfile(t *testing.T) {
	for _, c := range []struct {
		mode string
		env  []string
		want termenv.Profile
	}{
		{"auto", []string{"TERM=xterm-256color"}, termenv.ANSI256},
		{"auto", []string{"TERM=xterm"}, termenv.ANSI},
		{"auto", []string{"TERM=xterm-256color", "COLORTERM=truecolor"}, termenv.TrueColor},
		{"auto", []string{"TERM=xterm-256color", "NO_COLOR=1"}, termenv.Ascii},
		{"auto", []string{"TERM=dumb"}, termenv.Ascii},
		{"auto", nil, termenv.Ascii},
		{"always", []string{"TERM=dumb"}, termenv.ANSI},
		{"never", []string{"TERM=xterm-256color"}, termenv.Ascii},
		// The client's environment, not the server's: CI in the server's
		// environment must not matter, nor the last of two values.
		{"auto", []string{"TERM=vt100", "TERM=xterm-256color"}, termenv.ANSI256},
	} {
		t.Setenv("NO_COLOR", "1") // the server's own environment does not count
		got, err := RemoteProfile(c.mode, io.Discard, c.env)
		if err != nil || got != c.want {
			t.Errorf("%s %v: profile %v (%v), want %v", c.mode, c.env, got, err, c.want)
		}
	}
	if _, err := RemoteProfile("sometimes", io.Discard, nil); err == nil {
		t.Error("a bad mode was taken")
	}
}
