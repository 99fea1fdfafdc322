// Package quietterm keeps the program from asking the terminal anything at
// start-up.
//
// Bubble Tea v1's package initialisation asks Lip Gloss whether the
// terminal's background is dark, and Lip Gloss asks the terminal (an OSC 11
// query and a cursor-position report) whenever standard output is one. A
// terminal or a link that does not answer then stalls every command for
// seconds, and a key typed meanwhile is read as the answer and lost.
// pvcouple's colours read on dark and light backgrounds alike, so it
// declares the background dark instead of asking.
//
// This must happen before Bubble Tea's init. Go initialises packages in the
// order of their import paths, each as soon as the packages it imports are
// initialised (The Go Programming Language Specification, "Package
// initialization"): this module's path, early.invalid/quietterm, sorts
// before github.com/charmbracelet/bubbletea and imports only Lip Gloss,
// which Bubble Tea imports too, so its init always runs first. The .invalid
// top-level domain (RFC 2606) marks a path that is never fetched; go.mod
// replaces it by this folder.
package quietterm

import "github.com/charmbracelet/lipgloss"

func init() {
	lipgloss.SetHasDarkBackground(true)
}
