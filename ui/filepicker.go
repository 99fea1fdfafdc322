package ui

import (
	"fmt"
	"os"
	"path"

	tea "github.com/charmbracelet/bubbletea"

	"pvcouple/internal/safetext"
)

// In a lab server's session (Model.folders set), o, O and a protocol file
// are picked from a list of the fellow's folder and the lab's shared one
// instead of typed as paths, and s saves by name into the fellow's folder.
// Everything else, the reading and checking of the files included, is as in
// a local terminal.

// promptFiles is the kind of file each path prompt asks for.
var promptFiles = map[promptKind]FileKind{
	promptOpen:      ScenarioFiles,
	promptProtocol:  ProtocolFiles,
	promptRecording: RecordingFiles,
}

// fileLabel is how a file is shown: its name in the fellow's folder, or
// "shared/" and its name in the lab's folder.
func fileLabel(f File) string {
	if f.Shared {
		return "shared/" + f.Name
	}
	return f.Name
}

// openFiles lists the files of kind k to pick from, the one last used
// selected.
func (m *Model) openFiles(k FileKind) {
	files, err := m.folders.List(k)
	if err != nil {
		m.setError(fmt.Sprintf("Cannot list the %s files: %v", fileLoads[k].what, err))
		return
	}
	if len(files) == 0 {
		m.setError(fmt.Sprintf("No %s files in your folder (%s) or the lab's shared folder.", fileLoads[k].what, m.folders.Own()))
		return
	}
	last := map[FileKind]string{ScenarioFiles: m.lastPath, ProtocolFiles: m.lastProtocolPath, RecordingFiles: m.lastRecPath}[k]
	m.picker = picker{rows: max(m.h-12, 3)}
	m.fileKind, m.files = k, files
	for i, f := range files {
		m.picker.names = append(m.picker.names, safetext.Line(fileLabel(f))) // names are the folder's: keep them inert
		m.picker.descs = append(m.picker.descs, sizeText(f.Size))
		if fileLabel(f) == last {
			m.picker.sel = i
		}
	}
	m.mode = modeFiles
}

// sizeText is a file size for the list.
func sizeText(n int64) string {
	switch {
	case n < 1<<10:
		return fmt.Sprintf("%d B", n)
	case n < 1<<20:
		return fmt.Sprintf("%.1f KiB", float64(n)/(1<<10))
	}
	return fmt.Sprintf("%.1f MiB", float64(n)/(1<<20))
}

// filesKey moves in the file list, opens the chosen file on Enter, closes
// on Esc.
func (m *Model) filesKey(msg tea.KeyMsg) tea.Cmd {
	if cmd, chosen := m.listKey(msg, m.keys.Cancel, "Cancelled: no file opened."); !chosen {
		return cmd
	}
	return m.openFile(m.files[m.picker.sel])
}

// fileLoads is how each kind of file is read, as from a path.
var fileLoads = map[FileKind]fileLoad{
	ScenarioFiles:  scenarioLoad,
	ProtocolFiles:  protocolLoad,
	RecordingFiles: recordingLoad,
}

// openFile reads a listed file in the background, as a path typed locally
// is read, and does what the list was for; a file that cannot be read
// changes nothing.
func (m *Model) openFile(f File) tea.Cmd {
	folders := m.folders
	open := func(string) (*os.File, error) { return folders.Open(f) }
	return m.startLoadWith(fileLoads[m.fileKind], fileLabel(f), open)
}

// saveInFolder saves the scenario as name in the fellow's folder.
func (m *Model) saveInFolder(name string, force bool) {
	data, err := m.toSave(path.Base(trimExt(name))).Marshal()
	if err != nil {
		m.setError("Not saved: " + err.Error())
		return
	}
	f, err := m.folders.Save(name, data, force)
	where := name
	if err == nil {
		where = fileLabel(f)
	}
	m.saved(name, where, err)
	if err == nil {
		m.setStatus(fmt.Sprintf("Saved levers and baseline to %s in your folder (%s).", where, m.folders.Own()))
	}
}

// trimExt drops a file name's extension.
func trimExt(name string) string { return name[:len(name)-len(path.Ext(name))] }

// renderFiles draws the file list as a framed box.
func (m *Model) renderFiles() string {
	verb := map[FileKind]string{ScenarioFiles: "Open a scenario", ProtocolFiles: "Play a protocol file",
		RecordingFiles: "Overlay a recording"}[m.fileKind]
	gap := -1
	for i, f := range m.files {
		if f.Shared {
			gap = i
			break
		}
	}
	note := fmt.Sprintf("(your folder %s, then shared/: the lab's, read only)", m.folders.Own())
	width := 12
	for _, n := range m.picker.names {
		width = max(width, min(len(n)+2, m.w/2))
	}
	return m.picker.render(m.styles, verb, note, width, m.w, gap, "opens")
}
