package cli

import (
	"fmt"
	"io"
	"os"
	"strings"
	"sync"
	"time"

	"golang.org/x/term"

	"pvcouple/model/sweep"
)

// Progress bar timing: the bar appears once a run has gone on for
// progressDelay and promises to take more than progressMinRun in all, and is
// redrawn at most every progressRefresh.
const (
	progressDelay   = 300 * time.Millisecond
	progressMinRun  = time.Second
	progressRefresh = 100 * time.Millisecond
)

// progressBar draws a one-line progress bar on a terminal, overwriting itself
// with carriage returns. It never writes to standard output.
type progressBar struct {
	mu    sync.Mutex
	w     io.Writer
	width int // columns of the terminal
	label string
	last  time.Time // of the last drawing
	shown bool
	now   func() time.Time
}

// newProgressBar returns a bar on env.Stderr if it is a terminal, else nil.
func newProgressBar(env *Env, label string) *progressBar {
	f, ok := env.Stderr.(*os.File)
	if !ok || !term.IsTerminal(int(f.Fd())) {
		return nil
	}
	width, _, err := term.GetSize(int(f.Fd()))
	if err != nil || width < 20 {
		width = 80
	}
	return &progressBar{w: f, width: width, label: label, now: time.Now}
}

// update draws the bar for p if the run is long enough and the last drawing
// is old enough.
func (b *progressBar) update(p sweep.Progress) {
	b.mu.Lock()
	defer b.mu.Unlock()
	if !b.shown {
		if p.Elapsed < progressDelay || p.Done >= p.Total || p.Elapsed+p.Remaining() < progressMinRun {
			return
		}
	} else if now := b.now(); now.Sub(b.last) < progressRefresh && p.Done < p.Total {
		return
	}
	b.last = b.now()
	b.shown = true
	fmt.Fprint(b.w, "\r"+b.line(p))
}

// line renders the bar to fit the width, without a newline: the label, the
// bar, the count and then, room permitting, the time left and the failures.
func (b *progressBar) line(p sweep.Progress) string {
	head := b.label + " "
	parts := []string{fmt.Sprintf(" %d/%d points %3d%%", p.Done, p.Total, int(100*p.Fraction()))}
	if r := p.Remaining(); r > 0 {
		parts = append(parts, fmt.Sprintf(", %s left", roundDuration(r)))
	}
	if p.Failed > 0 {
		parts = append(parts, fmt.Sprintf(", %d without steady state", p.Failed))
	}
	for len(parts) > 0 {
		tail := strings.Join(parts, "")
		room := b.width - 1 - len([]rune(head)) - len([]rune(tail)) - 2
		if room >= 10 {
			room = min(room, 40)
			fill := int(float64(room) * p.Fraction())
			return head + "[" + strings.Repeat("#", fill) + strings.Repeat(".", room-fill) + "]" + tail
		}
		parts = parts[:len(parts)-1]
	}
	return truncateRunes(head+fmt.Sprintf("%d/%d", p.Done, p.Total), b.width-1)
}

// finish clears the bar, if it was drawn, and leaves a one-line summary.
func (b *progressBar) finish(res *sweep.Result) {
	b.mu.Lock()
	defer b.mu.Unlock()
	if !b.shown {
		return
	}
	fmt.Fprint(b.w, "\r"+strings.Repeat(" ", b.width-1)+"\r")
	if res != nil {
		fmt.Fprintf(b.w, "%s: %d points in %s on %d workers\n", b.label, len(res.Points)-res.Count(sweep.NotRun),
			roundDuration(res.Elapsed), res.Workers)
	}
}

// roundDuration shortens a duration for people: 1.2s, 14s, 3m5s.
func roundDuration(d time.Duration) time.Duration {
	switch {
	case d < 10*time.Second:
		return d.Round(100 * time.Millisecond)
	default:
		return d.Round(time.Second)
	}
}

func truncateRunes(s string, n int) string {
	r := []rune(s)
	if n < 0 {
		n = 0
	}
	if len(r) > n {
		r = r[:n]
	}
	return string(r)
}
