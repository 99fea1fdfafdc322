package ui

import (
	"context"
	"errors"
	"fmt"
	"sync"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/internal/pool"
	"pvcouple/model"
)

// solvedMsg carries the result of one steady-state solve back to Update.
type solvedMsg struct {
	gen     int          // generation of the lever setting it solved; −1 when none was wanted
	params  model.Params // the setting it solved
	fill    bool         // solved for the filling pressure as mean LAP (closed)
	st      *model.Steady
	err     error
	elapsed time.Duration
}

// wanted is the setting the next solve is to be of. The UI goroutine sets
// it; the solve reads it only once its turn in the pool has come, so a
// setting superseded while the solve waited (keys held down, a busy
// machine) is never solved.
type wanted struct {
	mu   sync.Mutex
	ok   bool // a setting is wanted
	gen  int
	p    model.Params
	fill bool // find the volume for the filling pressure (closed)
	warm model.Warm
}

// set asks for setting p of generation gen, warm-started from warm; fill
// asks for the closed circulation's volume to be found for p's filling
// pressure.
func (w *wanted) set(gen int, p model.Params, fill bool, warm model.Warm) {
	w.mu.Lock()
	w.ok, w.gen, w.p, w.fill, w.warm = true, gen, p, fill, warm
	w.mu.Unlock()
}

// drop forgets the setting asked for: it is on screen already.
func (w *wanted) drop() {
	w.mu.Lock()
	w.ok = false
	w.mu.Unlock()
}

// take returns the setting wanted now and forgets it.
func (w *wanted) take() (gen int, p model.Params, fill bool, warm model.Warm, ok bool) {
	w.mu.Lock()
	defer w.mu.Unlock()
	gen, p, fill, warm, ok = w.gen, w.p, w.fill, w.warm, w.ok
	w.ok = false
	return
}

// solveCmd solves the setting wanted when its turn in the pool comes, on
// the worker's solver. Only one solve runs at a time (see
// Model.requestSolve), so the solver is never used by two goroutines at
// once.
func solveCmd(t *pool.Tenant, s *model.Solver, w *wanted) tea.Cmd {
	return func() tea.Msg {
		msg := solvedMsg{gen: -1}
		err := t.Do(context.Background(), pool.Interactive, func() {
			gen, p, fill, warm, ok := w.take()
			if !ok {
				return
			}
			t0 := time.Now()
			var st *model.Steady
			var err error
			if fill {
				st, err = s.SteadyStateAtFillingPressure(p, &warm)
			} else {
				st, err = s.SteadyState(p, &warm)
			}
			msg = solvedMsg{gen: gen, params: p, fill: fill, st: st, err: err, elapsed: time.Since(t0)}
		})
		if err != nil {
			msg = solvedMsg{gen: -1} // the session has ended
		}
		return msg
	}
}

// requestSolve asks for the levers' setting to be solved. While a solve
// runs or waits for its turn, it only changes the setting wanted: the
// waiting solve takes the latest, and when a running one returns, the
// latest setting is solved next, so held-down keys never queue up work.
func (m *Model) requestSolve() tea.Cmd {
	if m.st.settled() {
		m.want.drop()
		return nil
	}
	var warm model.Warm
	if m.st.shown != nil {
		warm = m.st.shown.Warm
	}
	m.want.set(m.gen, m.st.target, m.st.fill, warm)
	if m.inflight {
		return nil
	}
	m.inflight = true
	return solveCmd(m.tenant, m.solver, &m.want)
}

// solved takes a solve's result: a settled loop goes on screen even if the
// levers have moved on since (it is the nearest thing to show); a failure of
// the latest setting puts the levers back to the loop on screen.
func (m *Model) solved(msg solvedMsg) tea.Cmd {
	m.inflight = false
	switch {
	case msg.gen < m.floor:
		// Asked for before a scenario was replaced, or nothing was
		// wanted by the time the solve's turn came: stale.
	case msg.err == nil:
		m.st.shown = msg.st
		volume := ""
		if msg.gen == m.gen && msg.fill {
			// The volume found for the filling pressure becomes the levers'.
			if d := msg.st.Params.StressedVolume - m.st.target.StressedVolume; m.st.target.StressedVolume > 0 {
				volume = fmt.Sprintf(" · blood volume %s mL", fmtDelta(d, 0))
			}
			m.st.target, m.st.fill = msg.st.Params, false
		}
		if msg.gen == m.gen && m.pending != "" {
			sv, esp := msg.st.Metrics.SV, msg.st.Metrics.ESP
			m.setStatus(fmt.Sprintf("%s · SV %s mL, ESP %s mmHg%s", m.pending, fmtNum(sv, 1), fmtNum(esp, 1), volume))
			m.pending = ""
		}
	case msg.gen == m.gen:
		m.st.target, m.st.fill = m.st.shown.Params, false
		m.gen++
		m.pending = ""
		m.setError(solveFailure(msg.err))
	}
	return m.requestSolve()
}

// compute runs fn, model work the UI goroutine waits for (a scenario being
// opened, a protocol's beat), in a slot of the pool like every solve.
func (m *Model) compute(fn func()) { _ = inSlot(context.Background(), m.tenant, fn) }

// tenantKey carries an explorer's tenant in the context of a load.
type tenantKey struct{}

// inPool runs fn, model work of a load, in a slot of the tenant that ctx
// carries (see startLoadWith).
func inPool(ctx context.Context, fn func()) error {
	return inSlot(ctx, ctx.Value(tenantKey{}).(*pool.Tenant), fn)
}

// inSlot runs fn in a slot of tenant t, or at once when t is closed (the
// explorer is ending: nothing waits for a slot any more); it returns ctx's
// error, without running fn, if ctx ended while fn waited.
func inSlot(ctx context.Context, t *pool.Tenant, fn func()) error {
	if err := t.Do(ctx, pool.Interactive, fn); err != nil {
		if ctx.Err() != nil {
			return ctx.Err()
		}
		fn()
	}
	return nil
}

// solveFailure words a failed solve for the status line.
func solveFailure(err error) string {
	var ns *model.NotSettledError
	if errors.As(err, &ns) {
		return fmt.Sprintf("No steady beat there (%d beats, residual %.1g): kept the last settled loop and its levers", ns.Beats, ns.Residual)
	}
	return fmt.Sprintf("%v: kept the last settled loop and its levers", err)
}
