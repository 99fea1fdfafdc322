package model

// Evals returns the right-hand-side evaluations the solver's integrators
// have made, for tests of the work a solve takes.
func (s *Solver) Evals() int {
	n := 0
	for _, o := range s.odes {
		if o != nil {
			n += o.Stats().Evals
		}
	}
	return n
}
