package cli

import (
	"errors"
	"fmt"

	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/presets"
	"pvcouple/ui"
)

func init() {
	register(command{"explore", "open the full-screen explorer (the default without a command)", runExplore})
	defaultCommand = runDefault
}

// errNoTerminal is returned when the explorer is started without a terminal.
var errNoTerminal = errors.New("the explorer needs a terminal on standard input and output; " +
	"for scripts and pipes use `pvcouple solve` (or `pvcouple loop`)")

// runDefault opens the explorer; without a terminal it prints the usage,
// since that is what a pipe or a script wants, and says why.
func runDefault(env *Env, args []string) error {
	if len(args) == 0 && !env.IsTerminal() {
		if err := usage(env); err != nil {
			return err
		}
		fmt.Fprintf(env.Stderr, "pvcouple: not opening the explorer: %v\n", errNoTerminal)
		return nil
	}
	return runExplore(env, args)
}

func runExplore(env *Env, args []string) error {
	fs := newFlags(env, "explore", "explore [--preset NAME | --scenario FILE] [--set KEY=VALUE]... [--color auto|always|never]",
		"Opens the full-screen explorer on a scenario: the steady pressure–volume loop against its\n"+
			"baseline, the coupling readouts and the levers. Press ? inside for every key.\n"+
			"A model for research and education planning, not for treating patients.")
	var sel selection
	sel.addFlags(fs)
	color := fs.String("color", "auto", "colour `MODE`: auto (follows the terminal and NO_COLOR), always or never")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usagef("explore takes no arguments, got %q", pos[0])
	}
	if err := choice("color", *color, ui.ColorModes...); err != nil {
		return err
	}
	sc, err := sel.resolve()
	if err != nil {
		return err
	}
	if !env.IsTerminal() {
		return errNoTerminal
	}
	origin := "preset " + sc.Name
	if sel.scenario != "" {
		origin = sel.scenario
	} else if sel.preset == "" {
		origin = "preset " + presets.Default
	}
	if len(sel.sets) > 0 {
		origin += " with --set"
	}
	profile, err := ui.Profile(*color, env.Stdout)
	if err != nil {
		return usagef("%v", err)
	}
	styles := ui.NewStyles(ui.NewRenderer(env.Stdout, profile))
	m, err := ui.New(sc, origin, styles)
	if err != nil {
		return err
	}
	defer m.Close() // no background work (a map being solved) outlives the program
	p := ui.NewProgram(m, tea.WithInput(env.Stdin), tea.WithOutput(env.Stdout))
	if _, err := p.Run(); err != nil {
		return fmt.Errorf("explorer: %w", err)
	}
	return nil
}
