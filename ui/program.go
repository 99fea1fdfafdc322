package ui

import (
	"fmt"
	"io"
	"strings"

	// Declares the background dark before Bubble Tea's init can ask the
	// terminal (see the package's comment).
	_ "early.invalid/quietterm"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/muesli/termenv"
)

// ColorModes are the values of the --color flag.
var ColorModes = []string{"auto", "always", "never"}

// Profile returns the colour profile for a --color mode on output w: "auto"
// detects it from the terminal and the environment (NO_COLOR turns colour
// off), "always" uses colour even where auto would not (at least 16
// colours), "never" uses none.
func Profile(mode string, w io.Writer) (termenv.Profile, error) {
	return profile(mode, w)
}

// RemoteProfile is Profile for a terminal at the other end of a connection,
// such as an SSH session's: environ is the client's environment ("KEY=value",
// with its TERM), which stands for the terminal's, and w is taken to be a
// terminal.
func RemoteProfile(mode string, w io.Writer, environ []string) (termenv.Profile, error) {
	return profile(mode, w, termenv.WithEnvironment(envList(environ)), termenv.WithTTY(true))
}

// profile detects the colour profile of output w with the options given.
func profile(mode string, w io.Writer, opts ...termenv.OutputOption) (termenv.Profile, error) {
	switch mode {
	case "auto":
		return termenv.NewOutput(w, opts...).EnvColorProfile(), nil
	case "always":
		p := termenv.NewOutput(w, append(opts, termenv.WithTTY(true))...).ColorProfile()
		if p == termenv.Ascii {
			p = termenv.ANSI
		}
		return p, nil
	case "never":
		return termenv.Ascii, nil
	}
	return termenv.Ascii, fmt.Errorf("--color %q is not one of: auto, always, never", mode)
}

// envList is an environment given as "KEY=value" strings.
type envList []string

// Environ implements termenv.Environ.
func (e envList) Environ() []string { return e }

// Getenv implements termenv.Environ: the last value given for k counts.
func (e envList) Getenv(k string) string {
	v := ""
	for _, kv := range e {
		if name, val, ok := strings.Cut(kv, "="); ok && name == k {
			v = val
		}
	}
	return v
}

// NewRenderer returns a lipgloss renderer on w with colour profile p. The
// background is declared dark rather than asked for: the styles use no
// adaptive colours, and a background query can stall a remote terminal.
func NewRenderer(w io.Writer, p termenv.Profile) *lipgloss.Renderer {
	r := lipgloss.NewRenderer(w)
	r.SetColorProfile(p)
	r.SetHasDarkBackground(true)
	return r
}

// NewProgram returns the Bubble Tea program of the explorer m (a *Model, or
// a model that wraps one): full screen, no mouse. Extra options (input,
// output) follow the defaults.
func NewProgram(m tea.Model, opts ...tea.ProgramOption) *tea.Program {
	return tea.NewProgram(m, append([]tea.ProgramOption{tea.WithAltScreen()}, opts...)...)
}
