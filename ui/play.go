package ui

import (
	"context"
	"errors"
	"fmt"
	"io"
	"time"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/internal/safefile"
	"pvcouple/presets"
)

// playTickMsg asks for the next beat of the protocol run with id run, in
// the run's tick chain seq. Each tick computes (or shows) one beat on the UI
// goroutine, about half a millisecond of work, and asks for the next; a
// pause, a step, a change of speed or a new run starts a new chain, so a
// tick still on its way when that happens finds itself stale and does
// nothing. No goroutine outlives its tick.
type playTickMsg struct{ run, seq int }

// startProtocol plays pr from the levers now, on the protocol view. A
// protocol that does not fit the levers (a step would leave a lever's
// range) changes nothing and says where in the file.
func (m *Model) startProtocol(pr *presets.Protocol) tea.Cmd {
	var r *playRun
	var err error
	m.compute(func() {
		if r, err = newPlayRun(m.runs+1, pr, m.st.target); err == nil {
			err = r.next()
		}
	})
	if err != nil {
		m.setError(err.Error()) // it names the protocol file first
		return nil
	}
	m.runs++
	v := m.play
	v.setRun(r)
	for i, w := range m.views {
		if w == view(v) {
			m.cur = i
		}
	}
	m.setStatus(fmt.Sprintf("Playing %s (%d beats) from the levers now. Space pauses · . and , step · + and - set the speed.", pr.Name, r.total()))
	return m.nextTick()
}

// protocolLoad reads a protocol file off the update loop; it plays from the
// levers as they are when it has been read.
var protocolLoad = fileLoad{
	what: "protocol",
	then: "Checking",
	read: func(_ context.Context, f *safefile.File, path string) (any, error) {
		return presets.ReadProtocol(f, path)
	},
	apply: func(m *Model, path string, res any) tea.Cmd {
		m.lastProtocolPath = path
		return m.startProtocol(res.(*presets.Protocol))
	},
}

// playFile reads the protocol file at path in the background and plays it.
func (m *Model) playFile(path string) tea.Cmd { return m.startLoad(protocolLoad, path) }

// nextTick asks for the next beat after the beat on screen has shown for
// its period at the playing speed.
func (m *Model) nextTick() tea.Cmd {
	v := m.play
	var d time.Duration
	if f := playSpeeds[v.speed].factor; f > 0 {
		d = time.Duration(float64(time.Second) * v.beat().Period / f)
	}
	return m.after(d, playTickMsg{run: v.run.id, seq: v.seq})
}

// playTick shows the next beat, if the tick is of the run and chain that
// play now.
func (m *Model) playTick(msg playTickMsg) tea.Cmd {
	v := m.play
	if v.run == nil || msg.run != v.run.id || msg.seq != v.seq || !v.playing {
		return nil // stale: of a run replaced, stopped or paused since
	}
	if !m.advance() || v.atEnd() {
		v.pause()
		return nil
	}
	return m.nextTick()
}

// advance puts the next beat on screen, computing it if it is new. At the
// end of the run, or when a beat fails, it says so and reports false.
func (m *Model) advance() bool {
	v := m.play
	r := v.run
	if v.cur+1 < len(r.beats) {
		v.cur++
	} else {
		var err error
		m.compute(func() { err = r.next() })
		switch {
		case errors.Is(err, io.EOF):
			m.setStatus(m.endText())
			return false
		case err != nil:
			m.setError(fmt.Sprintf("%s stopped: %v. The beats before it stay on screen.", r.pr.Name, err))
			return false
		}
		v.cur++
	}
	if v.atEnd() && r.err == nil {
		m.setStatus(m.endText())
	}
	return true
}

// endText sums up a run at its end.
func (m *Model) endText() string {
	r := m.play.run
	s := fmt.Sprintf("End of %s, %d beats", r.pr.Name, len(r.beats))
	if f := r.fitReadout(len(r.beats) - 1); f.ok {
		s += fmt.Sprintf(": fitted Ees %s mmHg/mL, V0 %s mL (model %s, %s)",
			fmtNum(f.ees, 2), fmtNum(f.v0, 1), fmtNum(f.modelEes, 2), fmtNum(f.modelV0, 1))
	}
	return s + ". Space plays it again, R runs it anew from the levers now."
}

// playKey handles the keys of playback; ok is false for other keys.
func (m *Model) playKey(msg tea.KeyMsg) (cmd tea.Cmd, ok bool) {
	k, v := m.keys, m.play
	if !key.Matches(msg, k.PlayPause, k.StepFwd, k.StepBack, k.Faster, k.Slower, k.Restart, k.Stop) {
		return nil, false
	}
	if !m.onPlay() {
		name := msg.String()
		if key.Matches(msg, k.PlayPause) {
			name = k.PlayPause.Help().Key
		}
		m.setError(fmt.Sprintf("%s acts on protocols in view %d (%s); P picks one.", name, m.playIndex()+1, v.Name()))
		return nil, true
	}
	switch {
	case key.Matches(msg, k.Faster, k.Slower):
		return m.changeSpeed(key.Matches(msg, k.Faster)), true
	case key.Matches(msg, k.Restart):
		pr := v.last
		if v.run != nil {
			pr = v.run.pr
		}
		if pr == nil {
			m.setError("No protocol to restart: P picks one.")
			return nil, true
		}
		return m.startProtocol(pr), true
	case v.run == nil && key.Matches(msg, k.PlayPause) && v.last != nil:
		return m.startProtocol(v.last), true
	case v.run == nil && key.Matches(msg, k.PlayPause):
		m.openProtocols()
		return nil, true
	case v.run == nil:
		m.setError("No protocol is playing: P picks one.")
		return nil, true
	}
	r := v.run
	switch {
	case key.Matches(msg, k.PlayPause):
		if v.playing {
			v.pause()
			m.setStatus(fmt.Sprintf("Paused at beat %d of %d. Space plays on · . and , step.", v.cur+1, r.total()))
			return nil, true
		}
		if v.atEnd() {
			v.cur = 0 // play the beats again from the first
		}
		v.playing = true
		v.seq++
		m.setStatus(fmt.Sprintf("Playing %s from beat %d, %s.", r.pr.Name, v.cur+1, playSpeeds[v.speed].name))
		return m.nextTick(), true
	case key.Matches(msg, k.StepFwd):
		v.pause()
		switch {
		case v.atEnd() && r.err != nil:
			m.setError(fmt.Sprintf("%s stopped: %v.", r.pr.Name, r.err))
		case v.atEnd():
			m.setStatus(m.endText())
		case m.advance() && !v.atEnd():
			m.setStatus(fmt.Sprintf("Beat %d of %d. . steps on, , back, Space plays.", v.cur+1, r.total()))
		}
	case key.Matches(msg, k.StepBack):
		v.pause()
		if v.cur == 0 {
			m.setError("This is the first beat of the run.")
			return nil, true
		}
		v.cur--
		m.setStatus(fmt.Sprintf("Beat %d of %d. , steps back, . on, Space plays.", v.cur+1, r.total()))
	case key.Matches(msg, k.Stop):
		v.pause()
		m.setStatus(fmt.Sprintf("Stopped %s at beat %d of %d. Space plays it again from the levers now.", r.pr.Name, v.cur+1, r.total()))
		v.last, v.run, v.intro, v.cache = r.pr, nil, "", ""
	}
	return nil, true
}

// changeSpeed steps the playing speed up or down; a run that plays goes on
// at the new speed from now.
func (m *Model) changeSpeed(up bool) tea.Cmd {
	v := m.play
	n := v.speed - 1
	if up {
		n = v.speed + 1
	}
	if n < 0 || n >= len(playSpeeds) {
		m.setError(fmt.Sprintf("Already at the %s speed: %s.", map[bool]string{true: "highest", false: "lowest"}[up], playSpeeds[v.speed].name))
		return nil
	}
	v.speed = n
	m.setStatus("Speed: " + playSpeeds[n].name + ".")
	if v.run == nil || !v.playing {
		return nil
	}
	v.seq++ // the tick on its way was timed for the old speed
	return m.nextTick()
}

// playIndex is the index of the protocol view in views.
func (m *Model) playIndex() int {
	for i, w := range m.views {
		if w == view(m.play) {
			return i
		}
	}
	return 0
}

// onPlay reports whether the protocol view is on screen.
func (m *Model) onPlay() bool { return m.views[m.cur] == view(m.play) }

// leavePlay pauses a playing run as its view leaves the screen: nothing
// plays unseen.
func (m *Model) leavePlay() string {
	v := m.play
	if v.run == nil || !v.playing {
		return ""
	}
	v.pause()
	return fmt.Sprintf(" %s paused at beat %d of %d.", v.run.pr.Name, v.cur+1, v.run.total())
}
