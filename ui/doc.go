// Package ui is pvcouple's interactive explorer: a full-screen Bubble Tea
// program that shows the left ventricle's steady pressure–volume loop against
// a baseline, the coupling readouts and the levers that move them.
//
// The root Model owns the state (levers, the loop on screen, the baseline,
// undo history) and solves the model off the UI goroutine, one solve at a
// time, always for the latest lever setting. The main area shows one of
// several views (see view.go); the readout and lever panels stay beside it.
//
// The Protocol view plays a study protocol from the levers now, beat by
// beat: ticks tagged with the run's id each compute one transient beat on
// the UI goroutine (see play.go), the loops are drawn as a family with
// their end-systolic points and the ESPVR fitted so far, and the readouts
// show the beat on screen against the run's starting steady beat.
//
// A recording opened with O is overlaid on the PV plane (overlay.go); the
// readouts of every view but a playing protocol then count from the
// recording's steady beat. The Coupling map view solves one metric over two
// levers around the setting in the background (mapview.go, follow.go); its
// keys m, x and y act there, and x stops a run in the Protocol view.
//
// It is a model for research and education planning, not for treating
// patients.
package ui
