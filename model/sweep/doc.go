// Package sweep solves the model over a grid of parameter values: a region of
// the coupling plane at once, one periodic steady state per grid point.
//
// A Grid varies one or more parameters (Axis: key, from, to, number of values)
// around a base parameter set. Run solves every point on a pool of workers,
// each with its own model.Solver, and returns the points in grid order (the
// first axis varies slowest). Start does the same in the background and
// returns a Job that reports progress, can be cancelled, and hands out partial
// maps of a metric while it runs (what an interactive map needs).
//
// The points are visited in boustrophedon order (serpentine: each step changes
// one axis by one grid step), cut into contiguous chunks whose size depends
// only on the grid, never on the number of workers. Each chunk starts cold and
// every later point warm-starts from its neighbour, so the numbers are the same
// whatever the number of workers or the scheduling. A point that does not
// settle is retried from a cold start and, if it still fails, is reported in
// its Point (Status and Err), not as an error of the run.
package sweep
