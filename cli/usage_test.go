package cli

import (
	"strings"
	"testing"
)

// Every command's usage line names each of its options (or says
// [options]), a command without options prints no "Options:" heading, and
// no option tells its default twice.
func TestUsageLinesNameEveryOption(t *testing.T) {
	cmds := [][]string{{"protocol", "run"}, {"protocol", "list"}, {"protocol", "show"}}
	for _, c := range commands {
		if c.name != "protocol" {
			cmds = append(cmds, []string{c.name})
		}
	}
	for _, cmd := range cmds {
		code, out, errs := runCLI(t, append(cmd, "--help")...)
		if code != 0 {
			t.Errorf("%v --help: exit %d %s", cmd, code, errs)
			continue
		}
		usage, _, _ := strings.Cut(out, "\n")
		if !strings.HasPrefix(usage, "Usage: pvcouple "+strings.Join(cmd, " ")) {
			t.Errorf("%v: usage line %q", cmd, usage)
		}
		_, opts, has := strings.Cut(out, "\nOptions:\n")
		if !has {
			if strings.Contains(out, "Options:") {
				t.Errorf("%v: an Options heading without the list:\n%s", cmd, out)
			}
			continue
		}
		lines := strings.Split(opts, "\n")
		for i, line := range lines {
			if strings.Count(line, "default") > 1 {
				t.Errorf("%v: an option tells its default twice: %q", cmd, line)
			}
			if !strings.HasPrefix(line, "  -") {
				continue
			}
			name := strings.Fields(line)[0]
			if i+1 < len(lines) && strings.Contains(lines[i+1], "the same as") {
				continue // an alias
			}
			if !strings.Contains(usage, name+" ") && !strings.Contains(usage, name+"]") && !strings.Contains(usage, "[options]") {
				t.Errorf("%v: the usage line lacks %s: %q", cmd, name, usage)
			}
		}
	}
	if _, out, _ := runCLI(t, "params", "--help"); strings.Contains(out, "Options") {
		t.Errorf("params --help has an Options heading:\n%s", out)
	}
}

// Time columns print without float noise: sums of beat periods come out as
// 18, not 18.000000000000004 (rounded to the microsecond).
func TestTimesWithoutFloatNoise(t *testing.T) {
	for _, args := range [][]string{{"protocol", "run", "rate-steps"}, {"loop"}} {
		_, out, _ := runCLI(t, args...)
		lines := strings.Split(strings.TrimSpace(out), "\n")[1:]
		col := 0
		if args[0] == "protocol" {
			col = 2
		}
		for _, l := range lines {
			v := strings.Split(l, ",")[col]
			if _, frac, _ := strings.Cut(v, "."); len(frac) > 6 {
				t.Errorf("%v: time %s", args, v)
				break
			}
		}
	}
}
