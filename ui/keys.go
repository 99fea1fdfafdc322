package ui

import "github.com/charmbracelet/bubbles/key"

// KeyMap is every key of the explorer. The help overlay and the key line at
// the foot of the screen are built from it, so a key added here is listed
// there.
type KeyMap struct {
	Up, Down       key.Binding // nudge the selected lever by a small step
	BigUp, BigDown key.Binding // nudge by a large step
	Prev, Next     key.Binding // choose the lever
	Pin            key.Binding // make the current state the baseline
	Revert         key.Binding // go back to the baseline
	Undo, Redo     key.Binding
	Fit            key.Binding // fit the axes to the loops again
	Preset         key.Binding // pick a built-in preset
	Circulation    key.Binding // switch between the held and the closed circulation
	Devices        key.Binding // show the valve lesion and support levers, and go to them or back
	Save, Open     key.Binding // save and load a scenario file
	NextView       key.Binding // switch views
	GoView         key.Binding // go to a view by its number
	Help           key.Binding
	Quit           key.Binding

	// Keys of protocol playback (view Protocol); Protocol works anywhere.
	Protocol          key.Binding // pick a protocol and play it
	PlayPause         key.Binding
	StepFwd, StepBack key.Binding // one beat forward (computing it if new) or back
	Faster, Slower    key.Binding // playback speed
	Restart           key.Binding // play the protocol again from the levers now
	Stop              key.Binding // end the run; x in the protocol view only (elsewhere x is MapX)

	// Keys of the prompts, pickers and overlays.
	Confirm, Cancel key.Binding

	// Recording overlay and coupling map (see overlay.go, mapview.go). The
	// map's keys act in the map view; elsewhere they say where the map is,
	// except x in the protocol view, which is Stop there.
	OpenRecording, ClearRecording key.Binding // overlay a recorded loop on the PV plane, and remove it
	MapMetric, MapX, MapY         key.Binding // the map view's metric and levers (next; shifted: previous)
}

// DefaultKeyMap returns the explorer's keys.
func DefaultKeyMap() KeyMap {
	return KeyMap{
		Up:          key.NewBinding(key.WithKeys("up", "k"), key.WithHelp("↑/k", "raise lever")),
		Down:        key.NewBinding(key.WithKeys("down", "j"), key.WithHelp("↓/j", "lower lever")),
		BigUp:       key.NewBinding(key.WithKeys("shift+up", "K", "pgup"), key.WithHelp("⇧↑/K/PgUp", "raise ×5")),
		BigDown:     key.NewBinding(key.WithKeys("shift+down", "J", "pgdown"), key.WithHelp("⇧↓/J/PgDn", "lower ×5")),
		Prev:        key.NewBinding(key.WithKeys("left", "h", "shift+tab"), key.WithHelp("←/h/⇧Tab", "previous lever")),
		Next:        key.NewBinding(key.WithKeys("right", "l", "tab"), key.WithHelp("→/l/Tab", "next lever")),
		Pin:         key.NewBinding(key.WithKeys("b"), key.WithHelp("b", "pin as baseline")),
		Revert:      key.NewBinding(key.WithKeys("r"), key.WithHelp("r", "back to baseline")),
		Undo:        key.NewBinding(key.WithKeys("u"), key.WithHelp("u", "undo")),
		Redo:        key.NewBinding(key.WithKeys("ctrl+r", "U"), key.WithHelp("^R/U", "redo")),
		Fit:         key.NewBinding(key.WithKeys("z"), key.WithHelp("z", "refit axes")),
		Preset:      key.NewBinding(key.WithKeys("p"), key.WithHelp("p", "preset")),
		Circulation: key.NewBinding(key.WithKeys("c"), key.WithHelp("c", "held/closed circulation")),
		Devices:     key.NewBinding(key.WithKeys("d"), key.WithHelp("d", "lesions & support")),
		Save:        key.NewBinding(key.WithKeys("s"), key.WithHelp("s", "save")),
		Open:        key.NewBinding(key.WithKeys("o"), key.WithHelp("o", "open")),
		NextView:    key.NewBinding(key.WithKeys("v"), key.WithHelp("v", "next view")),
		GoView:      key.NewBinding(key.WithKeys("1", "2", "3", "4", "5", "6", "7", "8", "9"), key.WithHelp("1…9", "go to view")),
		Help:        key.NewBinding(key.WithKeys("?"), key.WithHelp("?", "help")),
		Quit:        key.NewBinding(key.WithKeys("q", "ctrl+c"), key.WithHelp("q/^C", "quit")),
		Protocol:    key.NewBinding(key.WithKeys("P"), key.WithHelp("P", "pick protocol")),
		PlayPause:   key.NewBinding(key.WithKeys(" "), key.WithHelp("Space", "play/pause")),
		StepFwd:     key.NewBinding(key.WithKeys("."), key.WithHelp(".", "next beat")),
		StepBack:    key.NewBinding(key.WithKeys(","), key.WithHelp(",", "previous beat")),
		Faster:      key.NewBinding(key.WithKeys("+", "="), key.WithHelp("+", "faster")),
		Slower:      key.NewBinding(key.WithKeys("-"), key.WithHelp("-", "slower")),
		Restart:     key.NewBinding(key.WithKeys("R"), key.WithHelp("R", "restart run")),
		Stop:        key.NewBinding(key.WithKeys("x"), key.WithHelp("x", "stop run")),
		Confirm:     key.NewBinding(key.WithKeys("enter"), key.WithHelp("Enter", "confirm")),
		Cancel:      key.NewBinding(key.WithKeys("esc"), key.WithHelp("Esc", "cancel/close")),

		// Recording overlay and coupling map.
		OpenRecording:  key.NewBinding(key.WithKeys("O"), key.WithHelp("O", "open recording")),
		ClearRecording: key.NewBinding(key.WithKeys("C"), key.WithHelp("C", "clear recording")),
		MapMetric:      key.NewBinding(key.WithKeys("m", "M"), key.WithHelp("m/M", "map metric")),
		MapX:           key.NewBinding(key.WithKeys("x", "X"), key.WithHelp("x/X", "map x lever")),
		MapY:           key.NewBinding(key.WithKeys("y", "Y"), key.WithHelp("y/Y", "map y lever")),
	}
}

// ShortHelp is the key line at the foot of the screen.
func (k KeyMap) ShortHelp() []key.Binding {
	return []key.Binding{k.Up, k.Down, k.Next, k.Pin, k.Revert, k.Undo, k.Preset, k.Save, k.Open, k.NextView, k.Help, k.Quit}
}

// PlayHelp is the key line at the foot of the protocol view.
func (k KeyMap) PlayHelp() []key.Binding {
	return []key.Binding{k.PlayPause, k.StepFwd, k.StepBack, k.Faster, k.Slower, k.Restart, k.Stop, k.Protocol, k.NextView, k.Help, k.Quit}
}

// FullHelp is the help overlay, one group per list (see helpGroups and
// helpColumns).
func (k KeyMap) FullHelp() [][]key.Binding {
	return [][]key.Binding{
		{k.Up, k.Down, k.BigUp, k.BigDown, k.Prev, k.Next},
		{k.Pin, k.Revert, k.Undo, k.Redo, k.Fit, k.Circulation},
		{k.Protocol, k.PlayPause, k.StepFwd, k.StepBack, k.Faster, k.Slower, k.Restart, k.Stop},
		{k.Preset, k.Save, k.Open, k.Devices, k.NextView, k.GoView},
		{k.Help, k.Cancel, k.Confirm, k.Quit},
		{k.OpenRecording, k.ClearRecording, k.MapMetric, k.MapX, k.MapY}, // recording and map
	}
}
