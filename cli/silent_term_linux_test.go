package cli

import (
	"os/exec"
	"strings"
	"testing"
	"time"
)

// terminalQueries are the requests a program sends a terminal and then
// waits for an answer to (ECMA-48 and xterm's control sequences): the
// background and foreground colours (OSC 10/11), the cursor position
// (DSR 6), the device attributes (DA1).
var terminalQueries = []string{"\x1b]10;?", "\x1b]11;?", "\x1b[6n", "\x1b[c", "\x1b[0c"}

// askedTerminal returns the first query in out, or "".
func askedTerminal(out string) string {
	for _, q := range terminalQueries {
		if strings.Contains(out, q) {
			return q
		}
	}
	return ""
}

// A terminal that never answers delays no command: solve on a silent
// terminal sends no query and takes at most 100 ms longer than with its
// output on a pipe (the best of three runs each, as the machine is shared).
func TestSilentTerminalDoesNotDelaySolve(t *testing.T) {
	bin := buildBinary(t)
	best := func(run func() time.Duration) time.Duration {
		b := time.Hour
		for range 3 {
			b = min(b, run())
		}
		return b
	}
	piped := best(func() time.Duration {
		start := time.Now()
		if out, err := exec.Command(bin, "solve").CombinedOutput(); err != nil {
			t.Fatalf("solve: %v\n%s", err, out)
		}
		return time.Since(start)
	})
	onTTY := best(func() time.Duration {
		p := startPTY(t, bin, 100, 30, nil, "solve")
		d := p.exited(10 * time.Second)
		if p.err != nil {
			t.Fatalf("solve on a terminal: %v\n%s", p.err, p.output())
		}
		if q := askedTerminal(p.output()); q != "" {
			t.Fatalf("solve sent the terminal the query %q", q)
		}
		if !strings.Contains(p.output(), "MEASUREMENT") {
			t.Fatalf("no table on the terminal:\n%q", p.output())
		}
		return d
	})
	t.Logf("solve: %v with output on a pipe, %v on a silent terminal", piped, onTTY)
	if onTTY-piped > 100*time.Millisecond {
		t.Errorf("a silent terminal delays solve by %v (limit 100 ms)", onTTY-piped)
	}
}

// The explorer on a silent terminal draws its first frame without a query
// and without waiting, and a key typed at once is not lost: q typed as it
// starts quits it.
func TestSilentTerminalExplorerStart(t *testing.T) {
	bin := buildBinary(t)
	p := startPTY(t, bin, 120, 40, []string{"NO_COLOR=1"})
	first := p.waitFor("Filling pressure", 10*time.Second)
	if q := askedTerminal(p.output()); q != "" {
		t.Fatalf("the explorer sent the terminal the query %q", q)
	}
	p.send("q")
	p.exited(2 * time.Second)
	t.Logf("first frame after %v", first)
	if first > time.Second {
		t.Errorf("first frame after %v on a silent terminal", first)
	}

	p = startPTY(t, bin, 120, 40, []string{"NO_COLOR=1"})
	p.send("q") // before the program has read anything
	if d := p.exited(3 * time.Second); d > time.Second {
		t.Errorf("q typed at start quit only after %v", d)
	}
}
