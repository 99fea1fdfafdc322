package sweep

// Statuses returns the status of every point in grid order into dst (grown
// or reused) and returns it. It may be called while the sweep runs: NotRun
// marks a point not solved yet, so a map can tell a point still to come from
// one that has no steady state.
func (j *Job) Statuses(dst []Status) []Status {
	j.mu.Lock()
	defer j.mu.Unlock()
	if cap(dst) < len(j.points) {
		dst = make([]Status, len(j.points))
	}
	dst = dst[:len(j.points)]
	for i := range j.points {
		dst[i] = j.points[i].Status
	}
	return dst
}
