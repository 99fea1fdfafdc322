package cli

import (
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// tmuxPane drives the real binary in a tmux pane on a private tmux server
// whose socket is in the test's temporary folder, so that nothing is left
// in /tmp.
type tmuxPane struct {
	t      *testing.T
	socket string // path
}

func (p *tmuxPane) run(args ...string) (string, error) {
	out, err := exec.Command("tmux", append([]string{"-S", p.socket}, args...)...).CombinedOutput()
	return string(out), err
}

func (p *tmuxPane) keys(keys ...string) {
	p.t.Helper()
	if out, err := p.run(append([]string{"send-keys", "-t", "x"}, keys...)...); err != nil {
		p.t.Fatalf("send-keys %v: %v %s", keys, err, out)
	}
}

func (p *tmuxPane) screen(escapes bool) string {
	args := []string{"capture-pane", "-p", "-t", "x"}
	if escapes {
		args = append(args, "-e")
	}
	out, _ := p.run(args...)
	return out
}

// waitFor polls the screen until it holds every string, or fails.
func (p *tmuxPane) waitFor(what ...string) string {
	p.t.Helper()
	deadline := time.Now().Add(10 * time.Second)
	for {
		s := p.screen(false)
		ok := true
		for _, w := range what {
			ok = ok && strings.Contains(s, w)
		}
		if ok {
			return s
		}
		if time.Now().After(deadline) {
			p.t.Fatalf("screen lacks %q:\n%s", what, s)
		}
		time.Sleep(50 * time.Millisecond)
	}
}

// gone waits for the program, and so the session, to end.
func (p *tmuxPane) gone() bool {
	for range 100 {
		if _, err := p.run("has-session", "-t", "x"); err != nil {
			return true
		}
		time.Sleep(50 * time.Millisecond)
	}
	return false
}

// startTmux builds pvcouple and starts it in a w × h tmux pane with the
// given environment and arguments.
func startTmux(t *testing.T, bin string, w, h int, env string, args ...string) *tmuxPane {
	t.Helper()
	p := &tmuxPane{t: t, socket: filepath.Join(t.TempDir(), "tmux")}
	cmd := fmt.Sprintf("env %s %s %s", env, bin, strings.Join(args, " "))
	if out, err := p.run("-f", "/dev/null", "new-session", "-d", "-s", "x", "-x", fmt.Sprint(w), "-y", fmt.Sprint(h), cmd); err != nil {
		t.Fatalf("tmux: %v %s", err, out)
	}
	t.Cleanup(func() {
		_, _ = p.run("kill-server")
		os.Remove(p.socket)
	})
	return p
}

// TestExploreInTmux drives the real binary in tmux: it opens, nudges,
// shows the change, asks for a larger window, redraws after a resize, shows
// the help, and quits on q. It skips without tmux and with -short.
func TestExploreInTmux(t *testing.T) {
	bin := buildForTmux(t)

	p := startTmux(t, bin, 120, 40, "NO_COLOR=1 TERM=xterm-256color")
	p.waitFor("[1 PV plane]", "SW/PVA", "Filling pressure", "ESPVR")
	if s := p.screen(true); strings.Contains(s, "\x1b[38") || strings.Contains(s, "\x1b[3") && strings.Contains(s, ";5;") {
		t.Errorf("NO_COLOR: the screen has colour:\n%q", s)
	}
	p.keys("k", "k", "k")
	s := p.waitFor("Filling pressure 12 → 13 mmHg · SV")
	for _, label := range []string{"SV", "ESP"} {
		if f := readoutFields(s, label); len(f) < 6 || !strings.HasPrefix(f[len(f)-2], "+") {
			t.Errorf("%s did not rise on screen: %q", label, f)
		}
	}
	p.run("resize-window", "-t", "x", "-x", "60", "-y", "20")
	p.waitFor("Enlarge the window", "80×24", "60×20")
	p.run("resize-window", "-t", "x", "-x", "80", "-y", "24")
	p.waitFor("SW/PVA", "Fill P")
	p.keys("?")
	p.waitFor("not for treating patients", "licensed clinical judgement")
	p.keys("Escape", "2")
	p.waitFor("[2 Beat traces]", "t ms")
	p.keys("q")
	if !p.gone() {
		t.Errorf("q did not quit:\n%s", p.screen(false))
	}

	// Colour forced on a 16-colour terminal, Ctrl-C to quit.
	p = startTmux(t, bin, 80, 24, "TERM=xterm", "--color", "always", "--preset", "hfref")
	s = p.waitFor("4 Coupling map", "SW/PVA")
	// At 80 cells the four views leave room for the scenario's name only.
	if top := strings.SplitN(s, "\n", 2)[0]; !strings.HasSuffix(strings.TrimRight(top, " "), " hfref") {
		t.Errorf("the top bar does not name the scenario: %q", top)
	}
	if s := p.screen(true); !strings.Contains(s, "\x1b[") {
		t.Errorf("--color always: no colour on screen")
	}
	p.keys("C-c")
	if !p.gone() {
		t.Errorf("Ctrl-C did not quit:\n%s", p.screen(false))
	}
}

// readoutFields returns the fields of the readout row labelled label.
func readoutFields(screen, label string) []string {
	for _, line := range strings.Split(screen, "\n") {
		if i := strings.Index(line, " "+label+" "); i >= 0 {
			if f := strings.Fields(line[i:]); len(f) >= 5 && f[0] == label {
				return f
			}
		}
	}
	return nil
}

// buildForTmux skips the test without tmux or with -short, and otherwise
// builds the binary and returns its path.
func buildForTmux(t *testing.T) string {
	t.Helper()
	if _, err := exec.LookPath("tmux"); err != nil {
		t.Skip("no tmux")
	}
	return buildBinary(t)
}
