package cli

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pvcouple/internal/safetext"
)

// Nothing that came from a file or an argument reaches the terminal as
// control characters: an OSC title sequence, a screen clear or an 8-bit CSI
// in a --set value or key, a scenario or protocol, a CSV header or a path
// comes out escaped on stdout and stderr alike, and a long value is echoed
// once, cut short.
func TestHostileTextComesOutEscaped(t *testing.T) {
	dir := t.TempDir()
	osc := "\x1b]0;owned\x07"
	write := func(name, data string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(data), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	scen := write("s.yaml", "version: 1\nbase: normal\nname: \"\\e]0;owned\\a\"\nparams: {}\n")
	key := write("k.yaml", "version: 1\nbase: normal\nparams:\n  \"\\e[2Jheart\": 80\n")
	proto := write("p.yaml", "version: 1\nsteps:\n  - label: \"a\\e]0;x\\a\"\n    hold: 2\n")
	rec := writeRecording(t, 10, 0)
	data, _ := os.ReadFile(rec)
	lines := strings.SplitN(string(data), "\n", 2)
	headed := write("h.csv", lines[0]+",\"x"+osc+"\\u009b\"\n"+strings.ReplaceAll(lines[1], "\n", ",1\n"))
	named := write("rec"+osc+".csv", string(data))
	long := strings.Repeat("9", 100_000)
	for _, c := range []struct {
		args []string
		code int
	}{
		{[]string{"solve", "--set", "heart_rate_bpm=" + osc}, 2},
		{[]string{"solve", "--set", osc + "=1"}, 2},
		{[]string{"solve", "--set", "heart_rate_bpm=\u009b31m"}, 2},
		{[]string{"solve", "--scenario", scen}, 1},
		{[]string{"solve", "--scenario", key}, 1},
		{[]string{"solve", "--scenario", filepath.Join(dir, osc+".yaml")}, 1},
		{[]string{"protocol", "run", proto}, 1},
		{[]string{"analyze", headed, "--pressure-col", "x" + osc}, 1},
		{[]string{"analyze", headed}, 1}, // control characters in a column name are refused, the message escaped
		{[]string{"analyze", headed, "--format", "json"}, 1},
		{[]string{"analyze", named}, 0},
		{[]string{"analyze", named, "--format", "json"}, 0},
		{[]string{"figure", "-o", filepath.Join(dir, "f.svg"), "--title", osc}, 2},
		{[]string{"solve", "--format", osc}, 2},
		{[]string{"solve", "--set", "heart_rate_bpm=" + long}, 2},
	} {
		code, out, errs := runCLI(t, c.args...)
		if code != c.code {
			t.Errorf("%.80q: exit %d, want %d: %.300s", c.args, code, c.code, errs)
		}
		for _, s := range []string{out, errs} {
			for _, r := range s {
				if safetext.Unsafe(r) && r != '\n' && r != '\t' {
					t.Errorf("%.80q: output holds %U:\n%.300q", c.args, r, s)
					break
				}
			}
		}
		if len(errs) > 2000 {
			t.Errorf("%.80q: %d bytes of error", c.args, len(errs))
		}
	}
}
