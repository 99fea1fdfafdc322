//go:build race

package ui

// raceDetector is true when the tests run under the race detector, which
// slows solves and rendering several times over.
const raceDetector = true
