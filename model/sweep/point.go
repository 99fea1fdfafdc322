package sweep

import (
	"errors"

	"pvcouple/model"
)

// Status is the outcome of one grid point.
type Status int

// The outcomes of a point.
const (
	NotRun     Status = iota // not solved: the sweep was cancelled first
	OK                       // settled to a periodic steady state
	NotSettled               // no steady state within model.MaxSteadyBeats, warm or cold
	Invalid                  // the combination of values is refused by model.Params.Validate
	Failed                   // any other failure of the beat or its measurement
)

var statusNames = [...]string{"not_run", "ok", "not_settled", "invalid", "failed"}

// String returns the status as written in sweep output: not_run, ok,
// not_settled, invalid or failed.
func (s Status) String() string {
	if s < 0 || int(s) >= len(statusNames) {
		return "unknown"
	}
	return statusNames[s]
}

// Point is the outcome of solving one grid point.
type Point struct {
	Status   Status
	Metrics  model.Metrics // the steady beat's measurements; meaningful only when Status is OK
	Beats    int           // beats integrated for this point, a cold retry included
	Residual float64       // beat-map residual of the steady state (OK only)
	Err      error         // why the point failed; nil when OK or NotRun
}

// solvePoint finds the steady state of p, warm-starting from warm when it is
// valid and retrying from a cold start if that does not settle. With fill,
// the closed circulation's volume is found for p's filling pressure (a grid
// over the filling pressure is a series of fluid challenges).
func solvePoint(s *model.Solver, p model.Params, warm *model.Warm, fill bool) (Point, *model.Steady) {
	solve := s.SteadyState
	if fill {
		solve = s.SteadyStateAtFillingPressure
	}
	var pt Point
	if warm.Valid() {
		st, err := solve(p, warm)
		if err == nil {
			return okPoint(st), st
		}
		var ns *model.NotSettledError
		if !errors.As(err, &ns) {
			return failedPoint(err, 0), nil
		}
		pt.Beats = ns.Beats
	}
	st, err := solve(p, nil)
	if err != nil {
		return failedPoint(err, pt.Beats), nil
	}
	ok := okPoint(st)
	ok.Beats += pt.Beats
	return ok, st
}

func okPoint(st *model.Steady) Point {
	return Point{Status: OK, Metrics: st.Metrics, Beats: st.Beats, Residual: st.Residual}
}

func failedPoint(err error, beats int) Point {
	pt := Point{Status: Failed, Err: err, Beats: beats}
	var ns *model.NotSettledError
	var pe *model.ParamError
	var ie *model.ImplausibleError
	switch {
	case errors.As(err, &pe), errors.As(err, &ie):
		pt.Status = Invalid
	case errors.As(err, &ns):
		pt.Status = NotSettled
		pt.Beats += ns.Beats
	}
	return pt
}
