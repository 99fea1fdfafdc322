package cli

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"sort"
	"strings"

	"pvcouple/internal/safetext"
)

// Version is the program version printed by --version.
var Version = "0.1.0"

// Env is what a command reads and writes.
type Env struct {
	Stdin          io.Reader
	Stdout, Stderr io.Writer
	// IsTerminal reports whether stdin and stdout are terminals (for the TUI
	// and progress bars).
	IsTerminal func() bool
}

// command is one subcommand of pvcouple.
type command struct {
	name    string
	summary string
	run     func(env *Env, args []string) error
}

// commands lists the subcommands in the order of the help text.
var commands []command

// commandOrder is the order of the commands in the help text; commands not
// named here follow in the order they registered.
var commandOrder = []string{"explore", "solve", "loop", "protocol", "sweep", "analyze", "fit", "calibrate", "figure", "serve", "presets", "params"}

// register adds a subcommand; each command's file registers itself.
func register(c command) {
	commands = append(commands, c)
	rank := func(name string) int {
		for i, n := range commandOrder {
			if n == name {
				return i
			}
		}
		return len(commandOrder)
	}
	sort.SliceStable(commands, func(i, j int) bool { return rank(commands[i].name) < rank(commands[j].name) })
}

// defaultCommand runs when pvcouple is started without arguments.
var defaultCommand = func(env *Env, _ []string) error { return usage(env) }

// usageError marks an error in how the program was called (exit code 2).
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

func usagef(format string, a ...any) error { return &usageError{fmt.Sprintf(format, a...)} }

// Main runs pvcouple with the arguments after the program name and returns
// the exit code.
func Main(args []string, env *Env) int {
	err := run(args, env)
	switch {
	case err == nil:
		return 0
	case errors.Is(err, flag.ErrHelp):
		return 0
	default:
		fmt.Fprintf(env.Stderr, "pvcouple: %s\n", safetext.Text(err.Error()))
		var ue *usageError
		if errors.As(err, &ue) {
			fmt.Fprintln(env.Stderr, "Run `pvcouple --help` for usage.")
			return 2
		}
		return 1
	}
}

func run(args []string, env *Env) error {
	if len(args) == 0 {
		return defaultCommand(env, nil)
	}
	switch args[0] {
	case "-h", "-help", "--help", "help":
		if len(args) > 1 && args[0] == "help" {
			return run([]string{args[1], "--help"}, env)
		}
		return usage(env)
	case "-version", "--version", "version":
		_, err := fmt.Fprintf(env.Stdout, "pvcouple %s\n", Version)
		return outputErr(err)
	}
	for _, c := range commands {
		if c.name == args[0] {
			return c.run(env, args[1:])
		}
	}
	if strings.HasPrefix(args[0], "-") {
		// Options without a command belong to the default command.
		return defaultCommand(env, args)
	}
	return usagef("unknown command %q; commands: %s", args[0], commandNames())
}

func commandNames() string {
	var n []string
	for _, c := range commands {
		n = append(n, c.name)
	}
	return strings.Join(n, ", ")
}

func usage(env *Env) error {
	w := newStdout(env)
	fmt.Fprintf(w, `pvcouple %s: what-if explorer of left ventricle–arterial coupling

A lumped model (time-varying elastance ventricle, three-element Windkessel)
solved to periodic steady state, with the measurements of a pressure–volume
catheter study. For research and education planning only: not for treating
patients; local protocols and licensed clinical judgement come first.

Usage:
  pvcouple [command] [options]

Commands:
`, Version)
	for _, c := range commands {
		fmt.Fprintf(w, "  %-10s %s\n", c.name, c.summary)
	}
	fmt.Fprint(w, `
Run 'pvcouple COMMAND --help' for a command's options.
  --help      this text
  --version   print the version
`)
	return flushStdout(w)
}

// StdEnv is the environment of the running process.
func StdEnv() *Env {
	return &Env{Stdin: os.Stdin, Stdout: os.Stdout, Stderr: os.Stderr, IsTerminal: stdIsTerminal}
}
