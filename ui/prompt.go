package ui

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path"
	"path/filepath"
	"strings"

	"github.com/charmbracelet/bubbles/cursor"
	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/bubbles/textinput"
	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/internal/safefile"
	"pvcouple/internal/safetext"
	"pvcouple/model"
	"pvcouple/presets"
)

// newPrompt returns the path prompt, styled from s and with a steady cursor
// (a blinking one would redraw the line twice a second over the link).
func newPrompt(s *Styles) textinput.Model {
	t := textinput.New()
	t.PromptStyle = s.Prompt
	t.TextStyle = s.Status
	t.PlaceholderStyle = s.Dim
	t.CompletionStyle = s.Dim
	t.Cursor.Style = s.Renderer().NewStyle().Reverse(true)
	t.Cursor.TextStyle = s.Status
	t.Cursor.SetMode(cursor.CursorStatic)
	t.CharLimit = 4096
	return t
}

// promptKind is what the path prompt is for.
type promptKind int

const (
	promptSave      promptKind = iota // save the scenario
	promptOpen                        // open a scenario
	promptProtocol                    // play a protocol file
	promptRecording                   // overlay a recording (overlay.go)
)

// promptVerb is what Enter does in the prompt, for its hint.
var promptVerb = map[promptKind]string{promptSave: "saves", promptOpen: "opens", promptProtocol: "plays",
	promptRecording: "overlays"}

// openPrompt asks for a path to save to, open from, play or overlay.
func (m *Model) openPrompt(kind promptKind) tea.Cmd {
	if m.folders != nil && kind != promptSave {
		m.openFiles(promptFiles[kind]) // a list of the session's files instead
		return nil
	}
	m.promptFor = kind
	m.prompt.Reset()
	switch kind {
	case promptSave:
		m.prompt.Prompt = "Save scenario to: "
		v := m.lastPath
		if v == "" {
			v = m.st.name + ".yaml"
		}
		if m.folders != nil {
			m.prompt.Prompt = "Save scenario in your folder as: "
			v = path.Base(v)
		}
		m.prompt.SetValue(v)
	case promptOpen:
		m.prompt.Prompt = "Open scenario: "
		m.prompt.SetValue(m.lastPath)
	case promptProtocol:
		m.prompt.Prompt = "Play protocol file: "
		m.prompt.SetValue(m.lastProtocolPath)
	case promptRecording:
		m.prompt.Prompt = "Open recording (CSV): "
		m.prompt.SetValue(m.lastRecPath)
	}
	m.prompt.CursorEnd()
	m.mode = modePrompt
	return m.prompt.Focus()
}

// promptKey edits the path; Enter does what the prompt is for, Esc cancels.
func (m *Model) promptKey(msg tea.KeyMsg) tea.Cmd {
	switch {
	case msg.String() == "ctrl+c":
		return tea.Quit
	case key.Matches(msg, m.keys.Cancel):
		m.mode = modeMain
		m.prompt.Blur()
		m.setStatus("Cancelled.")
		return nil
	case key.Matches(msg, m.keys.Confirm):
		m.mode = modeMain
		m.prompt.Blur()
		path := strings.TrimSpace(m.prompt.Value())
		if m.folders == nil {
			path = expandHome(path)
		}
		if path == "" {
			m.setError("No path given: nothing saved or opened.")
			return nil
		}
		switch m.promptFor {
		case promptSave:
			m.save(path, false)
		case promptOpen:
			return m.open(path)
		case promptProtocol:
			return m.playFile(path)
		case promptRecording:
			return m.openRecording(path)
		}
		return nil
	}
	var cmd tea.Cmd
	m.prompt, cmd = m.prompt.Update(msg)
	return cmd
}

// confirmKey answers "overwrite?": y overwrites, anything else keeps the file.
func (m *Model) confirmKey(msg tea.KeyMsg) tea.Cmd {
	m.mode = modeMain
	switch msg.String() {
	case "ctrl+c":
		return tea.Quit
	case "y", "Y":
		m.save(m.confirm, true)
	default:
		m.setStatus("Kept " + m.confirm + " as it was: nothing saved.")
	}
	return nil
}

// save writes the levers and the baseline to path as a scenario (in a lab
// server's session, to that name in the fellow's folder). An existing file
// is replaced only after the user confirms.
func (m *Model) save(path string, force bool) {
	if m.folders != nil {
		m.saveInFolder(path, force)
		return
	}
	sc := m.toSave(strings.TrimSuffix(filepath.Base(path), filepath.Ext(path)))
	if dir := filepath.Dir(path); !isDir(dir) {
		m.setError(fmt.Sprintf("Not saved: there is no folder %s for %s.", dir, path))
		return
	}
	m.saved(path, path, presets.SaveScenario(path, sc, force))
}

// toSave is the scenario that s saves as name: the levers and the baseline.
func (m *Model) toSave(name string) *presets.Scenario {
	sc := &presets.Scenario{
		Version:     presets.SchemaVersion,
		Name:        safetext.Line(name),
		Description: "Saved from pvcouple explore, started from " + safetext.Line(m.st.origin),
		Params:      m.st.target,
	}
	if m.st.base != nil {
		b := m.st.base.Params
		sc.Baseline = &b
	}
	return sc
}

// saved reports a save to name (as typed) shown as where: an existing file
// asks whether to overwrite it.
func (m *Model) saved(name, where string, err error) {
	switch {
	case errors.Is(err, presets.ErrExists):
		m.confirm = name
		m.mode = modeConfirm
		m.setError(where + " exists. Overwrite it? y overwrites, any other key keeps it.")
	case err != nil:
		m.setError("Not saved: " + err.Error())
	default:
		m.lastPath = where
		m.setStatus(fmt.Sprintf("Saved levers and baseline to %s.", where))
	}
}

// scenarioLoad reads a scenario file and solves it and its baseline off the
// update loop; a file that fails to load or solve changes nothing on screen.
var scenarioLoad = fileLoad{
	what: "scenario",
	then: "Solving",
	read: func(ctx context.Context, f *safefile.File, path string) (any, error) {
		sc, err := presets.ReadScenario(f, path)
		if err != nil {
			return nil, err
		}
		var cur, base *model.Steady
		if perr := inPool(ctx, func() { cur, base, err = solveScenario(model.NewSolver(), sc, path) }); perr != nil {
			return nil, perr
		}
		if err != nil {
			return nil, err
		}
		return &openedScenario{sc: sc, cur: cur, base: base}, nil
	},
	apply: func(m *Model, path string, res any) tea.Cmd {
		o := res.(*openedScenario)
		m.show(o.sc, path, o.cur, o.base)
		m.lastPath = path
		m.setStatus(fmt.Sprintf("Opened %s (%s). u undoes.", path, o.sc.Name))
		return nil
	},
}

// openedScenario is a scenario read and solved.
type openedScenario struct {
	sc        *presets.Scenario
	cur, base *model.Steady
}

// open reads a scenario file in the background.
func (m *Model) open(path string) tea.Cmd { return m.startLoad(scenarioLoad, path) }

// expandHome replaces a leading ~/ by the home directory.
func expandHome(p string) string {
	if p == "~" || strings.HasPrefix(p, "~/") {
		if h, err := os.UserHomeDir(); err == nil {
			return filepath.Join(h, strings.TrimPrefix(p, "~"))
		}
	}
	return p
}

// isDir reports whether path is an existing directory.
func isDir(path string) bool {
	fi, err := os.Stat(path)
	return err == nil && fi.IsDir()
}
