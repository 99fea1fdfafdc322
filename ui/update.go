package ui

import (
	"errors"
	"fmt"
	"strconv"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/model"
)

// update handles one message (Update in follow.go wraps it).
func (m *Model) update(msg tea.Msg) (tea.Model, tea.Cmd) {
	switch msg := msg.(type) {
	case tea.WindowSizeMsg:
		m.resize(msg.Width, msg.Height)
		return m, nil
	case solvedMsg:
		return m, m.solved(msg)
	case playTickMsg:
		return m, m.playTick(msg)
	case loadedMsg:
		return m, m.loaded(msg)
	case loadTickMsg:
		return m, m.loadProgress(msg)
	case tea.KeyMsg:
		// Esc and a key typed quickly after it (or sent together over a
		// slow link) arrive as Alt and the key: take them as both.
		if msg.Alt && msg.Type == tea.KeyRunes {
			c1 := m.key(tea.KeyMsg{Type: tea.KeyEsc})
			msg.Alt = false
			_, c2 := m.Update(msg)
			return m, tea.Batch(c1, c2)
		}
		// Keys typed faster than they are read arrive as one message with
		// several runes ("kkk" from a held-down k); outside the path prompt
		// each is a key of its own.
		if msg.Type == tea.KeyRunes && len(msg.Runes) > 1 && !msg.Paste && m.mode != modePrompt {
			var cmds []tea.Cmd
			for _, r := range msg.Runes {
				cmds = append(cmds, m.key(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{r}}))
			}
			return m, tea.Batch(cmds...)
		}
		return m, m.key(msg)
	}
	return m, m.views[m.cur].Update(msg, &m.st)
}

// key handles a key press in the current mode.
func (m *Model) key(msg tea.KeyMsg) tea.Cmd {
	switch m.mode {
	case modeHelp:
		return m.helpKey(msg)
	case modePicker:
		return m.pickerKey(msg)
	case modePrompt:
		return m.promptKey(msg)
	case modeConfirm:
		return m.confirmKey(msg)
	case modeProtocols:
		return m.protocolsKey(msg)
	case modeFiles:
		return m.filesKey(msg)
	}
	k := m.keys
	switch {
	case key.Matches(msg, k.Quit):
		m.Close() // no background work outlives the program
		return tea.Quit
	case key.Matches(msg, k.Help):
		m.mode = modeHelp
	case m.loading != nil && key.Matches(msg, k.Cancel):
		m.cancelLoad()
	case m.tooSmall():
		// Only quitting and help work until the window is large enough.
	case key.Matches(msg, k.Up):
		return m.nudge(1, false)
	case key.Matches(msg, k.Down):
		return m.nudge(-1, false)
	case key.Matches(msg, k.BigUp):
		return m.nudge(1, true)
	case key.Matches(msg, k.BigDown):
		return m.nudge(-1, true)
	case key.Matches(msg, k.Next):
		m.selectLever(m.selected() + 1)
	case key.Matches(msg, k.Prev):
		m.selectLever(m.selected() - 1)
	case key.Matches(msg, k.Pin):
		m.pin()
	case key.Matches(msg, k.Revert):
		m.revert()
	case key.Matches(msg, k.Undo):
		return m.undo()
	case key.Matches(msg, k.Redo):
		return m.redo()
	case key.Matches(msg, k.Fit):
		m.views[m.cur].Refit()
		m.setStatus("Axes fitted to the loops again.")
	case key.Matches(msg, k.Preset):
		m.openPicker()
	case key.Matches(msg, k.Circulation):
		return m.switchCirculation()
	case key.Matches(msg, k.Devices):
		m.toggleDevices()
	case key.Matches(msg, k.Protocol):
		m.openProtocols()
	case key.Matches(msg, k.Save):
		return m.openPrompt(promptSave)
	case key.Matches(msg, k.Open):
		return m.openPrompt(promptOpen)
	case key.Matches(msg, k.NextView):
		m.showView(m.cur + 1)
	case key.Matches(msg, k.GoView):
		if i := int(msg.Runes[0] - '1'); i < len(m.views) {
			m.showView(i)
		} else {
			m.setError(fmt.Sprintf("There is no view %c: views 1 to %d.", msg.Runes[0], len(m.views)))
		}
	// Recording overlay (overlay.go).
	case key.Matches(msg, k.OpenRecording):
		return m.openPrompt(promptRecording)
	case key.Matches(msg, k.ClearRecording):
		m.clearRecording()
	// x stops a run in the protocol view; elsewhere it is the map's.
	case key.Matches(msg, k.Stop) && m.onPlay():
		cmd, _ := m.playKey(msg)
		return cmd
	// Coupling map (mapview.go).
	case key.Matches(msg, k.MapMetric, k.MapX, k.MapY):
		return m.mapKey(msg)
	default:
		if cmd, ok := m.playKey(msg); ok {
			return cmd
		}
		return m.views[m.cur].Update(msg, &m.st)
	}
	return nil
}

// selectLever selects lever i, wrapping around.
func (m *Model) selectLever(i int) {
	n := len(m.leverList())
	m.sel = (i%n + n) % n
	l := m.lever()
	s := l.Spec()
	m.setStatus(fmt.Sprintf("%s: %s, %s (%s).", l.Name, s.Meaning, l.Format(s.Get(m.st.target))+" "+s.Unit, s.RangeText()))
}

// showView puts view i on screen, wrapping around. A protocol playing in
// the view that leaves pauses.
func (m *Model) showView(i int) {
	i = (i%len(m.views) + len(m.views)) % len(m.views)
	note := ""
	if i != m.cur && m.onPlay() {
		note = m.leavePlay()
	}
	m.cur = i
	m.setStatus("View: " + m.views[m.cur].Name() + "." + note)
}

// nudge moves the selected lever one step and asks for a solve. A step past
// the lever's range stops at the limit; a setting the model refuses (say, a
// ventricle that would not fill) is not taken.
//
// In a closed circulation the filling pressure lever starts from the mean LAP
// on screen and is a fluid challenge: the volume is found that gives the new
// mean LAP. The other levers act at a fixed blood volume.
func (m *Model) nudge(dir int, big bool) tea.Cmd {
	l := m.lever()
	s := l.Spec()
	fill := l.Key == "filling_pressure_mmhg" && m.st.target.Circulation == model.Closed
	old := s.Get(m.st.target)
	if fill {
		old, _ = strconv.ParseFloat(l.Format(m.st.fillingPressure(m.st.target, m.st.shown)), 64)
	}
	v, limErr := l.Nudge(old, dir, big)
	if v == old {
		m.setError(limErr.Error() + ".")
		return nil
	}
	p := m.st.target
	s.Set(&p, v)
	if err := p.Validate(); err != nil {
		var pe *model.ParamError
		if errors.As(err, &pe) {
			m.setError(fmt.Sprintf("%s stays at %s %s: %s.", l.Name, l.Format(old), s.Unit, pe.Reason))
		} else {
			m.setError(fmt.Sprintf("%s stays at %s %s: %v.", l.Name, l.Format(old), s.Unit, err))
		}
		return nil
	}
	m.hist.push(m.snapshot())
	m.st.target = p
	m.st.fill = m.st.fill || fill
	m.gen++
	m.pending = fmt.Sprintf("%s %s → %s %s", l.Name, l.Format(old), l.Format(v), s.Unit)

	if limErr != nil {
		m.setError(limErr.Error() + ".")
		m.pending = ""
	} else {
		m.setStatus(m.pending)
	}
	return m.requestSolve()
}

// switchCirculation moves the levers to the other circulation at the same
// mean left-atrial pressure: into the closed one, blood volume is found that
// gives the filling pressure as mean LAP; into the held one, the mean LAP on
// screen becomes the held filling pressure. The baseline stays as it was.
func (m *Model) switchCirculation() tea.Cmd {
	p := m.st.target
	lap := m.st.fillingPressure(p, m.st.shown)
	fill := false
	if p.Circulation == model.Closed {
		p.Circulation, p.FillingPressure, p.StressedVolume = model.Held, lap, 0
	} else {
		p.Circulation, fill = model.Closed, true
	}
	m.hist.push(m.snapshot())
	m.st.target, m.st.fill = p, fill
	m.gen++
	lapText := fmtNum(lap, 1)
	if p.Circulation == model.Closed {
		m.pending = "Closed circulation: blood volume set for a mean LAP of " + lapText + " mmHg"
	} else {
		m.pending = "Held circulation: the filling pressure held at the mean LAP, " + lapText + " mmHg"
	}
	m.setStatus(m.pending)
	return m.requestSolve()
}

// pin makes the loop on screen the baseline.
func (m *Model) pin() {
	if m.st.base == m.st.shown {
		m.setStatus("The loop on screen is already the baseline.")
		return
	}
	m.hist.push(m.snapshot())
	m.st.base = m.st.shown
	m.setStatus("Pinned the loop on screen as the baseline: Δ and % now count from here.")
}

// revert puts the levers back to the baseline.
func (m *Model) revert() {
	if m.st.shown == m.st.base && m.st.settled() {
		m.setStatus("Already at the baseline.")
		return
	}
	m.hist.push(m.snapshot())
	m.st.target, m.st.shown, m.st.fill = m.st.base.Params, m.st.base, false
	m.gen++
	m.floor, m.pending = m.gen, ""
	m.want.drop()
	m.setStatus("Back to the baseline.")
}

// restore puts a snapshot on screen and asks for its solve.
func (m *Model) restore(s snapshot) tea.Cmd {
	if s.name != m.st.name || s.origin != m.st.origin {
		for _, v := range m.views {
			v.Refit() // another scenario: fit its loops afresh
		}
	}
	m.st.name, m.st.origin, m.st.target, m.st.base, m.st.fill = s.name, s.origin, s.target, s.base, false
	m.gen++
	m.pending = ""
	if s.target == s.base.Params {
		m.st.shown = s.base
		m.floor = m.gen
	}
	return m.requestSolve()
}

// undo steps back one change of the levers or the baseline.
func (m *Model) undo() tea.Cmd {
	s, ok := m.hist.back(m.snapshot())
	if !ok {
		m.setError("Nothing to undo.")
		return nil
	}
	m.setStatus(fmt.Sprintf("Undone (%d more to undo, %d to redo).", len(m.hist.undo), len(m.hist.redo)))
	return m.restore(s)
}

// redo steps forward again after an undo.
func (m *Model) redo() tea.Cmd {
	s, ok := m.hist.forward(m.snapshot())
	if !ok {
		m.setError("Nothing to redo.")
		return nil
	}
	m.setStatus(fmt.Sprintf("Redone (%d more to redo).", len(m.hist.redo)))
	return m.restore(s)
}

// helpKey handles keys while the help is open: any of ?, Esc, q closes it;
// Ctrl-C quits.
func (m *Model) helpKey(msg tea.KeyMsg) tea.Cmd {
	if msg.String() == "ctrl+c" {
		return tea.Quit
	}
	if key.Matches(msg, m.keys.Help, m.keys.Cancel, m.keys.Quit, m.keys.Confirm) {
		m.mode = modeMain
	}
	return nil
}
