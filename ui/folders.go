package ui

import "os"

// Folders are the only files an explorer may open and save when it is
// served to a lab: the fellow's own folder, where saves go, and the lab's
// shared folder, which it only reads. With Folders, the explorer lists files
// to pick from instead of asking for a path; without (a local terminal) it
// asks for paths. The implementation keeps every name inside its folder (no
// "..", no absolute paths, no symbolic links out) and opens regular files
// only.
type Folders interface {
	// List returns the files of kind k in the fellow's folder and then in
	// the shared one, each folder's in name order. A folder that cannot be
	// read is an error.
	List(k FileKind) ([]File, error)
	// Open opens f for reading; it must be a regular file (the explorer
	// checks it again). It is called off the update loop.
	Open(f File) (*os.File, error)
	// Save writes data to the file name in the fellow's folder
	// atomically: a failure leaves an older file intact. An existing file
	// is replaced only if overwrite is set, else the error wraps
	// presets.ErrExists. It returns the file as listed.
	Save(name string, data []byte, overwrite bool) (File, error)
	// Own names the fellow's folder on screen, e.g. "alice".
	Own() string
}

// FileKind is what a listed file is for.
type FileKind int

const (
	// ScenarioFiles are scenario files (YAML), opened with o and saved with s.
	ScenarioFiles FileKind = iota
	// ProtocolFiles are protocol files (YAML), played with P.
	ProtocolFiles
	// RecordingFiles are pressure–volume recordings (CSV), overlaid with O.
	RecordingFiles
)

// File is one file of Folders.
type File struct {
	Name   string // slash-separated path inside its folder
	Shared bool   // in the lab's shared folder, read only
	Size   int64  // bytes
}
