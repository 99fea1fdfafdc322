package cli

import (
	"flag"
	"fmt"
	"io"
	"strings"

	"pvcouple/presets"
)

// flagSet is a subcommand's flags with its help text.
type flagSet struct {
	*flag.FlagSet
	help func() error // prints the help; reports a failed write
}

// newFlags returns a flag set for a subcommand whose help text lists its
// synopsis and options.
func newFlags(env *Env, name, synopsis, about string) *flagSet {
	fs := &flagSet{FlagSet: flag.NewFlagSet(name, flag.ContinueOnError)}
	fs.SetOutput(io.Discard)
	fs.Usage = func() {} // errors are reported by parse, help only on --help
	fs.help = func() error {
		w := newStdout(env)
		fmt.Fprintf(w, "Usage: pvcouple %s\n\n%s\n", synopsis, about)
		heading := "\nOptions:"
		fs.VisitAll(func(f *flag.Flag) {
			if heading != "" { // only above options: a command may have none
				fmt.Fprintln(w, heading)
				heading = ""
			}
			name, usage := flag.UnquoteUsage(f)
			if name != "" {
				name = " " + name
			}
			// Short options read better with one dash: -o FILE.
			fmt.Fprintf(w, "  %s%s\n      %s", dashed(f.Name), name, usage)
			// A usage that tells its default itself keeps the flag's zero
			// value (which stands for that default) out of sight.
			if f.DefValue != "" && f.DefValue != "[]" && f.DefValue != "false" && !strings.Contains(usage, "default") {
				fmt.Fprintf(w, " (default %s)", f.DefValue)
			}
			fmt.Fprintln(w)
		})
		return flushStdout(w)
	}
	return fs
}

// parse parses flags and positional arguments in any order. --help prints the
// usage and returns flag.ErrHelp; a bad flag is a usage error.
func parse(fs *flagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if err == flag.ErrHelp {
				if herr := fs.help(); herr != nil {
					return nil, herr
				}
				return nil, err
			}
			return nil, usagef("%s: %v", fs.Name(), err)
		}
		if fs.NArg() == 0 {
			return pos, nil
		}
		rest := fs.Args()
		if rest[0] == "--" {
			return append(pos, rest[1:]...), nil
		}
		pos = append(pos, rest[0])
		args = rest[1:]
	}
}

// listFlag collects a repeated flag.
type listFlag []string

func (l *listFlag) String() string     { return strings.Join(*l, ",") }
func (l *listFlag) Set(s string) error { *l = append(*l, s); return nil }

// choice checks a --format style value against the allowed ones.
func choice(flagName, value string, allowed ...string) error {
	for _, a := range allowed {
		if value == a {
			return nil
		}
	}
	return usagef("--%s %s is not one of: %s", flagName, presets.QuoteShort(value), strings.Join(allowed, ", "))
}
