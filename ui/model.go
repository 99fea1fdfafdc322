package ui

import (
	"fmt"
	"time"

	"github.com/charmbracelet/bubbles/help"
	"github.com/charmbracelet/bubbles/textinput"
	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/internal/pool"
	"pvcouple/internal/safetext"
	"pvcouple/model"
	"pvcouple/presets"
)

// mode is what the keys act on.
type mode int

const (
	modeMain      mode = iota // the levers
	modeHelp                  // the help overlay
	modePicker                // the preset picker
	modePrompt                // a file path prompt (see promptKind)
	modeConfirm               // overwrite an existing file?
	modeProtocols             // the protocol picker
	modeFiles                 // a lab server's files to open (filepicker.go)
)

// Model is the explorer's root Bubble Tea model.
type Model struct {
	keys   KeyMap
	styles *Styles
	help   help.Model

	w, h int // window size; 0 until the first WindowSizeMsg
	lay  layout

	st       state
	views    []view
	cur      int // index of the view on screen
	readouts *readoutPanel
	levers   *leverPanel
	sel      int // index of the selected lever in leverList()
	// showDevices lists the lesion and support levers even while all are
	// off (devices.go).
	showDevices bool

	solver     *model.Solver // the worker's: used by one solve at a time
	syncSolver *model.Solver // the UI goroutine's, for loading scenarios
	tenant     *pool.Tenant  // this explorer's share of the machine (solve.go)
	want       wanted        // the setting the next solve is to be of
	inflight   bool          // a solve is running or waiting for its turn
	gen        int           // generation of the levers' setting
	floor      int           // results of generations below this are stale
	pending    string        // status of the nudge awaiting its solve

	hist history

	status    string
	statusErr bool

	mode      mode
	picker    picker
	prompt    textinput.Model
	promptFor promptKind // what the path prompt is for
	lastPath  string     // the scenario path last saved or opened
	folders   Folders    // a lab server's files, or nil for paths (filepicker.go)
	fileKind  FileKind   // what the file list is for
	files     []File     // the file list, as in picker
	confirm   string     // the path to overwrite when confirmed

	play             *playView // the protocol view, also in views
	runs             int       // protocol runs started; the id of the latest
	lastProtocolPath string    // the protocol file last played
	// after returns a command that delivers msg after d: tea.Tick, or in
	// tests a recorder that lets them hand each tick over themselves.
	after func(d time.Duration, msg tea.Msg) tea.Cmd

	// Recording overlay and background work (overlay.go, follow.go).
	lastRecPath string // the recording last opened
	closed      bool   // Close was called: no more background work

	// Files read off the update loop (load.go).
	loading  *loading             // the load in progress, nil when none
	loads    int                  // loads started; the id of the latest
	loadTick func(id int) tea.Cmd // the progress tick (defaultLoadTick)
}

// Options are what an explorer shares with others in the same process.
type Options struct {
	// Pool is the machine's solve capacity, shared with the other
	// explorers of the process; nil means pool.Default().
	Pool *pool.Pool
	// Folders, if not nil, are the only files the explorer may open and
	// save, picked from lists (a lab server's session); nil means paths
	// typed at a prompt (a local terminal).
	Folders Folders
}

// New returns the explorer on scenario sc, solved to steady state (the
// baseline is the scenario's, or its parameters). origin says where the
// scenario came from, e.g. "preset normal" or a file name.
func New(sc *presets.Scenario, origin string, styles *Styles) (*Model, error) {
	return NewWithOptions(sc, origin, styles, Options{})
}

// NewWithOptions is New with options: a lab server gives each session's
// explorer the server's pool.
func NewWithOptions(sc *presets.Scenario, origin string, styles *Styles, opt Options) (*Model, error) {
	if opt.Pool == nil {
		opt.Pool = pool.Default()
	}
	m := &Model{
		keys:       DefaultKeyMap(),
		styles:     styles,
		solver:     model.NewSolver(),
		syncSolver: model.NewSolver(),
		tenant:     opt.Pool.Tenant(),
		folders:    opt.Folders,
		views:      newViews(styles),
		readouts:   newReadoutPanel(styles),
		levers:     newLeverPanel(styles),
		loadTick:   defaultLoadTick,
	}
	for _, v := range m.views {
		switch v := v.(type) {
		case *playView:
			m.play = v
		case *mapView:
			v.gate = m.tenant.Gate(pool.Background)
		}
	}
	m.after = func(d time.Duration, msg tea.Msg) tea.Cmd {
		return tea.Tick(d, func(time.Time) tea.Msg { return msg })
	}
	m.help = newHelp(styles)
	m.prompt = newPrompt(styles)
	if err := m.load(sc, origin); err != nil {
		return nil, err
	}
	m.hist = history{}
	m.setStatus(fmt.Sprintf("Opened %s. ↑/↓ nudge the selected lever, ←/→ choose another, ? for every key.", origin))
	return m, nil
}

// Init implements tea.Model.
func (m *Model) Init() tea.Cmd { return nil }

// load solves scenario sc and its baseline and, when both settle, puts them
// on screen as the levers and the baseline; on failure nothing changes.
func (m *Model) load(sc *presets.Scenario, origin string) error {
	var cur, base *model.Steady
	var err error
	m.compute(func() { cur, base, err = solveScenario(m.syncSolver, sc, origin) })
	if err != nil {
		return err
	}
	m.show(sc, origin, cur, base)
	return nil
}

// solveScenario solves scenario sc and its baseline on s.
func solveScenario(s *model.Solver, sc *presets.Scenario, origin string) (cur, base *model.Steady, err error) {
	cur, err = s.SteadyState(sc.Params, nil)
	if err != nil {
		return nil, nil, fmt.Errorf("%s: %w", origin, err)
	}
	base = cur
	if sc.Baseline != nil && *sc.Baseline != sc.Params {
		if base, err = s.SteadyState(*sc.Baseline, nil); err != nil {
			return nil, nil, fmt.Errorf("%s: baseline: %w", origin, err)
		}
	}
	return cur, base, nil
}

// show puts a solved scenario on screen as the levers and the baseline.
func (m *Model) show(sc *presets.Scenario, origin string, cur, base *model.Steady) {
	if m.st.shown != nil {
		m.hist.push(m.snapshot())
	}
	m.st = state{name: safetext.Line(sc.Name), origin: origin, target: sc.Params, shown: cur, base: base}
	m.gen++
	m.floor = m.gen
	m.pending = ""
	m.want.drop()
	for _, v := range m.views {
		v.Refit()
	}
}

// snapshot is the state undo returns to.
func (m *Model) snapshot() snapshot {
	return snapshot{name: m.st.name, origin: m.st.origin, target: m.st.target, base: m.st.base}
}

// setStatus says what just happened. Whatever came from a file or a path in
// it is escaped (it may hold control characters).
func (m *Model) setStatus(s string) { m.status, m.statusErr = safetext.Line(s), false }

// setError says what went wrong; the screen is otherwise unchanged.
func (m *Model) setError(s string) { m.status, m.statusErr = safetext.Line(s), true }
