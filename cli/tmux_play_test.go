package cli

import (
	"fmt"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"pvcouple/presets"
)

// TestPlayInTmux plays protocols in the real binary: preload-reduction at
// the fastest speed without colour at 120×40, to the end and a step back;
// afterload-challenge in colour at 80×24, paused, stepped and stopped. It
// skips without tmux and with -short.
func TestPlayInTmux(t *testing.T) {
	bin := buildForTmux(t)

	p := startTmux(t, bin, 120, 40, "NO_COLOR=1 TERM=xterm-256color")
	p.waitFor("[1 PV plane]", "SW/PVA")
	p.keys("3")
	p.waitFor("[3 Protocol]", "preload-reduction", "P picks a protocol")
	p.keys("+", "+", "+")
	p.waitFor("Speed: as fast as it computes.")
	p.keys("P")
	p.waitFor("Play a protocol")
	var down []string
	for _, n := range presets.ProtocolNames() {
		if n == "preload-reduction" {
			break
		}
		down = append(down, "Down")
	}
	p.keys(append(down, "Enter")...)
	s := p.waitFor("End of preload-reduction, 25 beats: fitted Ees 2.50 mmHg/mL", "beat 25 of 25 · recovery", "fitted to 25 loops")
	if strings.Contains(p.screen(true), "\x1b[38") {
		t.Errorf("NO_COLOR: the screen has colour:\n%s", s)
	}
	p.keys(",")
	p.waitFor("beat 24 of 25", "fitted to 24 loops")
	p.keys("q")
	if !p.gone() {
		t.Errorf("q did not quit:\n%s", p.screen(false))
	}

	p = startTmux(t, bin, 80, 24, "TERM=xterm-256color", "--color", "always")
	p.waitFor("SW/PVA")
	p.keys("P")
	p.waitFor("afterload-challenge")
	p.keys("Enter", "Space")
	m := regexp.MustCompile(`Paused at beat (\d+) of 25`).FindStringSubmatch(p.waitFor("Paused at beat"))
	if m == nil {
		t.Fatalf("no beat in the pause message:\n%s", p.screen(false))
	}
	n, _ := strconv.Atoi(m[1])
	p.keys(".", ".")
	beat := fmt.Sprintf("beat %d of 25", n+2)
	p.waitFor("B"+beat[1:], beat+" · baseline")
	p.keys("x")
	p.waitFor("Stopped afterload-challenge at "+beat, "Space plays afterload-challenge again")
	p.keys("C-c")
	if !p.gone() {
		t.Errorf("Ctrl-C did not quit:\n%s", p.screen(false))
	}
}
