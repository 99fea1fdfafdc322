package cli

import (
	"strings"
	"testing"
)

// Without a terminal the explorer refuses, names the reason and points to
// the commands for scripts; bad options are reported first.
func TestExploreNeedsTerminal(t *testing.T) {
	checkRefusals(t, []refusal{
		{[]string{"explore"}, 1, []string{"needs a terminal", "pvcouple solve"}},
		{[]string{"explore", "--color", "never", "--preset", "hfref"}, 1, []string{"needs a terminal"}},
		{[]string{"explore", "--color", "pink"}, 2, []string{"--color", "pink", "auto, always, never"}},
		{[]string{"explore", "--preset", "athlete"}, 2, []string{`unknown preset "athlete"`}},
		{[]string{"explore", "--set", "heart_rate_bpm=500"}, 2, []string{"allowed 30 to 180 bpm"}},
		{[]string{"explore", "extra"}, 2, []string{"no arguments"}},
		{[]string{"--preset", "hfref"}, 1, []string{"needs a terminal"}}, // options without a command open the explorer
	})
}

// pvcouple with no arguments opens the explorer; in a pipe it prints the
// usage instead and says why on stderr.
func TestNoArgumentsWithoutTerminal(t *testing.T) {
	code, out, errs := runCLI(t)
	if code != 0 || !strings.Contains(out, "explore") || !strings.Contains(out, "Commands:") {
		t.Errorf("exit %d, stdout %q", code, out)
	}
	if !strings.Contains(errs, "needs a terminal") || !strings.Contains(errs, "pvcouple solve") {
		t.Errorf("stderr %q", errs)
	}
}

func TestExploreHelp(t *testing.T) {
	code, out, _ := runCLI(t, "explore", "--help")
	for _, w := range []string{"--preset", "--scenario", "--set", "--color", "not for treating patients"} {
		if code != 0 || !strings.Contains(out, w) {
			t.Errorf("explore --help lacks %q:\n%s", w, out)
		}
	}
}
