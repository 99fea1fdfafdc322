package ui

import (
	"errors"
	"fmt"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/model"
)

// solvedMsg carries the result of one steady-state solve back to Update.
type solvedMsg struct {
	gen     int          // generation of the lever setting it solved
	params  model.Params // the setting it solved
	st      *model.Steady
	err     error
	elapsed time.Duration
}

// solveCmd solves p on the worker's solver, starting from warm. Only one
// solve runs at a time (see Model.requestSolve), so the solver is never used
// by two goroutines at once.
func solveCmd(s *model.Solver, gen int, p model.Params, warm model.Warm) tea.Cmd {
	return func() tea.Msg {
		t0 := time.Now()
		st, err := s.SteadyState(p, &warm)
		return solvedMsg{gen: gen, params: p, st: st, err: err, elapsed: time.Since(t0)}
	}
}

// requestSolve asks for the levers' setting to be solved. While a solve
// runs, it only marks the setting as wanted: when the running solve returns,
// the latest setting is solved next, so held-down keys never queue up work.
func (m *Model) requestSolve() tea.Cmd {
	if m.inflight || m.st.settled() {
		return nil
	}
	m.inflight = true
	var warm model.Warm
	if m.st.shown != nil {
		warm = m.st.shown.Warm
	}
	return solveCmd(m.solver, m.gen, m.st.target, warm)
}

// solved takes a solve's result: a settled loop goes on screen even if the
// levers have moved on since (it is the nearest thing to show); a failure of
// the latest setting puts the levers back to the loop on screen.
func (m *Model) solved(msg solvedMsg) tea.Cmd {
	m.inflight = false
	switch {
	case msg.gen < m.floor:
		// Asked for before a scenario was replaced: stale.
	case msg.err == nil:
		m.st.shown = msg.st
		if msg.gen == m.gen && m.pending != "" {
			sv, esp := msg.st.Metrics.SV, msg.st.Metrics.ESP
			m.setStatus(fmt.Sprintf("%s · SV %s mL, ESP %s mmHg", m.pending, fmtNum(sv, 1), fmtNum(esp, 1)))
			m.pending = ""
		}
	case msg.gen == m.gen:
		m.st.target = m.st.shown.Params
		m.gen++
		m.pending = ""
		m.setError(solveFailure(msg.err))
	}
	return m.requestSolve()
}

// solveFailure words a failed solve for the status line.
func solveFailure(err error) string {
	var ns *model.NotSettledError
	if errors.As(err, &ns) {
		return fmt.Sprintf("No steady beat there (%d beats, residual %.1g): kept the last settled loop and its levers", ns.Beats, ns.Residual)
	}
	return fmt.Sprintf("%v: kept the last settled loop and its levers", err)
}
