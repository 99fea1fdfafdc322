package cli

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"text/tabwriter"

	"pvcouple/internal/safetext"
	"pvcouple/model"
	"pvcouple/presets"
)

func init() {
	register(command{"protocol", "run a study protocol beat by beat; list and show the built-in protocols", runProtocol})
}

const protocolAbout = `A protocol is a YAML file of labelled steps; the levers change between beats:

  version: 1
  name: my-occlusion
  steps:
    - label: baseline
      hold: 5                                # leave the levers alone for 5 beats
    - label: occlusion
      circulation: held                      # this step runs in a held circulation only
      ramp:
        filling_pressure_mmhg: {factor: 0.4} # in equal parts to 40 % of the value at the
      beats: 12                              # step's start, reached on the 12th beat
    - label: caval occlusion
      circulation: closed                    # and this one in a closed circulation only
      set: {caval_occlusion_pct: 70}         # jump at once; keep for 'beats' (default 1)
      beats: 12
    - label: pressor
      scale: {resistance_mmhg_s_per_ml: 1.5} # multiply at once; both circulations
    - label: release
      circulation: held
      set: {filling_pressure_mmhg: initial}
      beats: 5
    - label: release
      circulation: closed
      set: {caval_occlusion_pct: initial}
      beats: 5

A set or ramp target is a value in the key's unit or ` + "`initial`" + ` (its value before the
protocol); a ramp also takes {factor: F}. At most 500 beats in all. A closed run never sets
the filling pressure (the blood volume sets preload: caval_occlusion_pct, stressed_volume_ml),
and no step may move a lever of the other circulation.
Start from a built-in: pvcouple protocol show preload-reduction > my-protocol.yaml`

func runProtocol(env *Env, args []string) error {
	if len(args) == 0 {
		return usagef("protocol needs a subcommand: run, list or show (see `pvcouple protocol --help`)")
	}
	switch args[0] {
	case "run":
		return runProtocolRun(env, args[1:])
	case "list":
		return runProtocolList(env, args[1:])
	case "show":
		return runProtocolShow(env, args[1:])
	case "-h", "-help", "--help", "help":
		_, err := fmt.Fprintf(env.Stdout, `Usage:
  pvcouple protocol run NAME|FILE [--preset NAME | --scenario FILE] [--set KEY=VALUE]...
                                  [--format csv|json] [--samples FILE.csv [--force]]
  pvcouple protocol list
  pvcouple protocol show NAME

Runs a study protocol on a scenario as a transient, beat by beat, starting from the
scenario's steady state, and prints one row per beat.

%s

Run 'pvcouple protocol run --help' for the options of run.
`, protocolAbout)
		return outputErr(err)
	}
	return usagef("unknown protocol subcommand %q; use run, list or show", args[0])
}

// loadProtocol finds a protocol by built-in name or file path. A built-in
// name wins over a file of the same name in the working directory; a path
// with a directory or a .yaml/.yml ending is always a file.
func loadProtocol(arg string) (*presets.Protocol, error) {
	for _, n := range presets.ProtocolNames() {
		if n == arg {
			return presets.GetProtocol(arg)
		}
	}
	ext := strings.ToLower(filepath.Ext(arg))
	if ext == ".yaml" || ext == ".yml" || strings.ContainsRune(arg, os.PathSeparator) || strings.Contains(arg, "/") {
		return presets.LoadProtocol(arg)
	}
	if fi, err := os.Stat(arg); err == nil && fi.Mode().IsRegular() {
		return presets.LoadProtocol(arg)
	}
	return nil, fmt.Errorf("unknown protocol %q; built-in protocols: %s (or give a file, e.g. my-protocol.yaml)",
		arg, strings.Join(presets.ProtocolNames(), ", "))
}

func runProtocolList(env *Env, args []string) error {
	fs := newFlags(env, "protocol list", "protocol list", "Lists the built-in protocols (our own invented ones) with their length and a one-line description.")
	if pos, err := parse(fs, args); err != nil {
		return err
	} else if len(pos) > 0 {
		return usagef("protocol list takes no arguments")
	}
	out := newStdout(env)
	fmt.Fprintln(out, "Built-in protocols: invented by us, labelled so in their notes; for research and education planning.")
	w := tabwriter.NewWriter(out, 0, 0, 2, ' ', 0)
	fmt.Fprintln(w, "NAME\tBEATS HELD\tBEATS CLOSED\tDESCRIPTION")
	for _, n := range presets.ProtocolNames() {
		pr, err := presets.GetProtocol(n)
		if err != nil {
			return err
		}
		fmt.Fprintf(w, "%s\t%d\t%d\t%s\n", n, pr.TotalBeats(model.Held), pr.TotalBeats(model.Closed), safetext.Line(pr.Description))
	}
	w.Flush()
	return flushStdout(out)
}

func runProtocolShow(env *Env, args []string) error {
	fs := newFlags(env, "protocol show", "protocol show NAME",
		"Prints a built-in protocol's YAML, comments included, to start a protocol of your own:\n  pvcouple protocol show preload-reduction > my-protocol.yaml")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("protocol show takes one built-in protocol name: %s", strings.Join(presets.ProtocolNames(), ", "))
	}
	src, err := presets.ProtocolSource(pos[0])
	if err != nil {
		return err
	}
	_, err = env.Stdout.Write(src)
	return outputErr(err)
}

// errNoProtocol is the usage error of a run without a protocol.
var errNoProtocol = errors.New("protocol run needs one protocol: a built-in name (see `pvcouple protocol list`) or a file")
