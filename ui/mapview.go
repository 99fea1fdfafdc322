package ui

import (
	"context"
	"errors"
	"fmt"
	"math"
	"time"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/model"
	"pvcouple/model/sweep"
)

// mapView is the coupling map: one metric over two levers around the levers'
// setting, solved in the background by model/sweep and drawn as it fills in,
// with the setting marked. The map stays while only its own two levers move
// and the setting stays on it (the marker moves); any other change, or a
// setting off the map, cancels the job and solves a new map around the
// setting. The job runs only while the view is on screen.
type mapView struct {
	s    *Styles
	ms   mapStyles
	keys KeyMap
	w, h int

	metric int // index of the metric in sweep.MapMetrics
	kx, ky int // indices in model.Levers of the column (x) and row (y) levers

	grid     sweep.Grid
	job      *sweep.Job // nil when no map is being solved or kept
	jobID    int        // numbers the jobs, so ticks of an old one are dropped
	started  int        // jobs started, for the tests
	lastJob  *sweep.Job // the job started last, for the tests
	finished bool       // every point of job is solved
	vals     []float64  // the metric, ny rows of nx, NaN where not known
	stat     []sweep.Status
	prog     sweep.Progress
	err      error        // why no map could be made for failedAt
	failedAt model.Params // the setting err belongs to
	closed   bool
	gate     sweep.Gate // the explorer's share of the pool, for the map's points
}

// Default levers and metric of the map: stroke work over systemic
// resistance and Ees, the classic picture of ventricular–arterial coupling.
const (
	mapDefaultX      = "resistance_mmhg_s_per_ml"
	mapDefaultY      = "ees_mmhg_per_ml"
	mapDefaultMetric = "sw_mmhg_ml"
)

// mapTick is how often a map being solved is redrawn: often enough to watch
// it fill in, seldom enough to keep the bytes on a slow link down.
const mapTick = 100 * time.Millisecond

// mapTickMsg asks the map view to read the job with this id again.
type mapTickMsg struct{ id int }

func newMapView(s *Styles) *mapView {
	v := &mapView{s: s, ms: newMapStyles(s), keys: DefaultKeyMap()}
	for i, l := range model.Levers {
		switch l.Key {
		case mapDefaultX:
			v.kx = i
		case mapDefaultY:
			v.ky = i
		}
	}
	for i, k := range sweep.MapMetrics {
		if k == mapDefaultMetric {
			v.metric = i
		}
	}
	return v
}

// Name implements view.
func (v *mapView) Name() string { return "Coupling map" }

// SetSize implements view; a size that changes the grid's dimensions makes
// Follow solve a new map.
func (v *mapView) SetSize(w, h int) { v.w, v.h = w, h }

// Refit implements view: the map's axes are its grid's, so there is nothing
// to refit.
func (v *mapView) Refit() {}

// Close stops the job for good.
func (v *mapView) Close() {
	v.closed = true
	v.cancel()
}

// cancel stops the job, if one runs, and forgets the map.
func (v *mapView) cancel() {
	if v.job != nil {
		v.job.Cancel()
		v.job = nil
	}
}

// Follow implements follower: off screen, an unfinished map is cancelled;
// on screen, a map is solved whenever the one held does not describe the
// levers' setting.
func (v *mapView) Follow(st *state, onScreen bool) tea.Cmd {
	if v.closed {
		return nil
	}
	if !onScreen {
		if !v.finished {
			v.cancel()
		}
		return nil
	}
	nx, ny := v.dims()
	if nx < mapMinN || ny < mapMinN {
		v.cancel()
		return nil
	}
	if v.job != nil && v.holds(st.target, nx, ny) {
		return nil
	}
	if v.err != nil && v.failedAt == st.target {
		return nil
	}
	return v.start(st.target, nx, ny)
}

// holds reports whether the map held describes setting p at nx × ny: the
// same levers and size, every other parameter unchanged, and p on the map.
func (v *mapView) holds(p model.Params, nx, ny int) bool {
	ay, ax := v.grid.Axes[0], v.grid.Axes[1]
	if ax.Key != model.Levers[v.kx].Key || ay.Key != model.Levers[v.ky].Key || ax.N != nx || ay.N != ny {
		return false
	}
	if !v.grid.Matches(p) {
		return false
	}
	x := ax.Position(model.Levers[v.kx].Spec().Get(p))
	y := ay.Position(model.Levers[v.ky].Spec().Get(p))
	const slack = 1e-9 // a setting on the edge is on the map
	return x >= -slack && x <= float64(nx-1)+slack && y >= -slack && y <= float64(ny-1)+slack
}

// start cancels the job held and starts solving a map around p.
func (v *mapView) start(p model.Params, nx, ny int) tea.Cmd {
	v.cancel()
	v.finished, v.err = false, nil
	g, err := sweep.MapAround(p, model.Levers[v.kx].Key, model.Levers[v.ky].Key, nx, ny)
	var job *sweep.Job
	if err == nil {
		job, err = sweep.Start(context.Background(), g, sweep.Options{Gate: v.gate})
	}
	if err != nil {
		v.err, v.failedAt = err, p
		return nil
	}
	v.grid, v.job, v.lastJob = g, job, job
	v.jobID++
	v.started++
	v.vals = v.vals[:0]
	for range nx * ny {
		v.vals = append(v.vals, math.NaN())
	}
	v.stat = v.stat[:0]
	v.prog = sweep.Progress{Total: nx * ny}
	return v.tick()
}

// tick asks for the job to be read again after mapTick.
func (v *mapView) tick() tea.Cmd {
	id := v.jobID
	return tea.Tick(mapTick, func(time.Time) tea.Msg { return mapTickMsg{id} })
}

// poll reads the job's progress and the metric solved so far; it reports
// whether the job is still running.
func (v *mapView) poll() bool {
	if v.job == nil {
		return false
	}
	running := true
	select {
	case <-v.job.Done():
		running = false
		_, err := v.job.Wait()
		v.finished = err == nil
		if err != nil && !errors.Is(err, context.Canceled) {
			v.err, v.failedAt = err, v.grid.Base
		}
	default:
	}
	v.prog = v.job.Progress()
	v.stat = v.job.Statuses(v.stat)
	v.vals, _ = v.job.Field(sweep.MapMetrics[v.metric])
	return running
}

// Update implements view: the job's ticks and the map's keys.
func (v *mapView) Update(msg tea.Msg, st *state) tea.Cmd {
	switch msg := msg.(type) {
	case mapTickMsg:
		if msg.id != v.jobID || v.job == nil {
			return nil // a job replaced since
		}
		if v.poll() {
			return v.tick()
		}
	case tea.KeyMsg:
		k := v.keys
		step := 1
		if s := msg.String(); s == "M" || s == "X" || s == "Y" { // shifted: the other way
			step = -1
		}
		switch {
		case key.Matches(msg, k.MapMetric):
			n := len(sweep.MapMetrics)
			v.metric = ((v.metric+step)%n + n) % n
			if v.job != nil {
				v.vals, _ = v.job.Field(sweep.MapMetrics[v.metric])
			}
		case key.Matches(msg, k.MapX):
			v.kx, v.err = nextLever(v.kx, v.ky, step), nil
		case key.Matches(msg, k.MapY):
			v.ky, v.err = nextLever(v.ky, v.kx, step), nil
		}
	}
	return nil
}

// nextLever is the lever after (or before, step −1) i that is not other.
func nextLever(i, other, step int) int {
	n := len(model.Levers)
	for {
		i = ((i+step)%n + n) % n
		if i != other {
			return i
		}
	}
}

// mapKey hands a key of the map to the map view when it is on screen and
// says what the map now shows; elsewhere it says where the map is (in the
// protocol view, where x stops the run, that m, X and y are the map's).
func (m *Model) mapKey(msg tea.KeyMsg) tea.Cmd {
	v, ok := m.views[m.cur].(*mapView)
	if !ok {
		keys, here := "m, x and y", ""
		if m.onPlay() {
			keys, here = "m, X and y", " (here x stops the run)"
		}
		for i, w := range m.views {
			if _, ok := w.(*mapView); ok {
				m.setStatus(fmt.Sprintf("%s choose what the coupling map shows: view %d shows it%s.", keys, i+1, here))
			}
		}
		return nil
	}
	cmd := v.Update(msg, &m.st)
	spec, _ := model.MetricByKey(sweep.MapMetrics[v.metric])
	m.setStatus(fmt.Sprintf("Map of %s (%s) over %s and %s.", spec.Label, spec.Meaning,
		model.Levers[v.kx].Name, model.Levers[v.ky].Name))
	return cmd
}
