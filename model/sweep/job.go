package sweep

import (
	"context"
	"runtime"
	"sync"
	"sync/atomic"
	"time"

	"pvcouple/model"
)

// Options tune a sweep. The zero value uses every core and reports no progress.
type Options struct {
	// Workers is the number of goroutines solving points, each with its own
	// model.Solver; 0 or less means runtime.GOMAXPROCS(0).
	Workers int
	// Progress, if not nil, is called after each chunk of points is solved,
	// from a worker goroutine but never by two at once, with Done increasing.
	// It should return quickly: the worker waits for it.
	Progress func(Progress)
	// Gate, if not nil, runs the solve of each point: a worker solves a
	// point only inside Gate.Do, so a gate shared with other work (see
	// internal/pool) decides how much of the machine the sweep takes. A
	// Do that returns an error (its context was cancelled, or the gate
	// closed) ends the worker.
	Gate Gate
}

// Gate runs work when its turn comes; Do returns an error, without running
// fn, if the wait ends first.
type Gate interface {
	Do(ctx context.Context, fn func()) error
}

// Progress is how far a sweep has come.
type Progress struct {
	Done    int           // points solved so far, failed ones included
	Failed  int           // points among Done whose Status is not OK
	Total   int           // points in the grid
	Elapsed time.Duration // since the sweep started
}

// Fraction returns Done/Total, between 0 and 1.
func (p Progress) Fraction() float64 {
	if p.Total <= 0 {
		return 1
	}
	return float64(p.Done) / float64(p.Total)
}

// Remaining estimates the time left from the pace so far; 0 when done, and
// −1 before any point is solved.
func (p Progress) Remaining() time.Duration {
	switch {
	case p.Done >= p.Total:
		return 0
	case p.Done == 0:
		return -1
	}
	return time.Duration(float64(p.Elapsed) * float64(p.Total-p.Done) / float64(p.Done))
}

// Job is a sweep running in the background. Its methods are safe for
// concurrent use.
type Job struct {
	grid    Grid
	total   int
	order   []int // serpentine order of the point numbers
	chunk   int
	workers int
	start   time.Time
	cancel  context.CancelFunc
	done    chan struct{}
	next    atomic.Int64 // next chunk to hand out
	report  func(Progress)
	repMu   sync.Mutex // serialises report
	gate    Gate       // nil: solve at once

	mu     sync.Mutex // guards what follows
	points []Point
	prog   Progress
	err    error
	ended  time.Duration
}

// Start validates g and starts solving it in the background. Cancelling ctx,
// or calling Cancel, stops the workers after the point each is solving.
func Start(ctx context.Context, g Grid, opt Options) (*Job, error) {
	if err := g.Validate(); err != nil {
		return nil, err
	}
	total := g.Size()
	j := &Job{
		grid:   Grid{Base: g.Base, Axes: append([]Axis(nil), g.Axes...)},
		total:  total,
		order:  serpentine(g.Dims()),
		chunk:  chunkSize(total),
		start:  time.Now(),
		done:   make(chan struct{}),
		report: opt.Progress,
		gate:   opt.Gate,
		points: make([]Point, total),
	}
	j.prog.Total = total
	nChunks := (total + j.chunk - 1) / j.chunk
	j.workers = opt.Workers
	if j.workers <= 0 {
		j.workers = runtime.GOMAXPROCS(0)
	}
	j.workers = min(j.workers, nChunks)
	ctx, j.cancel = context.WithCancel(ctx)
	var wg sync.WaitGroup
	for range j.workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			j.work(ctx, nChunks)
		}()
	}
	go func() {
		wg.Wait()
		j.mu.Lock()
		if j.prog.Done < j.total && j.err == nil {
			j.err = context.Cause(ctx)
		}
		j.ended = time.Since(j.start)
		j.mu.Unlock()
		j.cancel()
		close(j.done)
	}()
	return j, nil
}

// work solves chunks until none is left or ctx is done.
func (j *Job) work(ctx context.Context, nChunks int) {
	s := model.NewSolver()
	buf := make([]Point, j.chunk)
	idx := make([]int, len(j.grid.Axes))
	for ctx.Err() == nil {
		c := int(j.next.Add(1) - 1)
		if c >= nChunks {
			return
		}
		seq := j.order[c*j.chunk : min((c+1)*j.chunk, j.total)]
		// Each chunk starts cold, so its numbers do not depend on which
		// worker solved which chunk before.
		var warm model.Warm
		n := 0
		for _, i := range seq {
			if ctx.Err() != nil {
				break
			}
			j.grid.Index(i, idx)
			pt, st, err := j.solve(ctx, s, j.grid.Params(idx), &warm)
			if err != nil {
				j.stop(err)
				break
			}
			if st != nil {
				warm = st.Warm
			}
			buf[n] = pt
			n++
		}
		j.store(seq[:n], buf[:n])
	}
}

// solve solves one point, inside the gate if there is one; the error is
// the gate's when it gave up waiting.
func (j *Job) solve(ctx context.Context, s *model.Solver, p model.Params, warm *model.Warm) (pt Point, st *model.Steady, err error) {
	run := func() { pt, st = solvePoint(s, p, warm, j.grid.FillsVolume()) }
	if j.gate == nil {
		run()
		return pt, st, nil
	}
	err = j.gate.Do(ctx, run)
	return pt, st, err
}

// stop ends the sweep early with err (the first one counts).
func (j *Job) stop(err error) {
	j.mu.Lock()
	if j.err == nil {
		j.err = err
	}
	j.mu.Unlock()
	j.cancel()
}

// store files solved points and reports progress.
func (j *Job) store(seq []int, pts []Point) {
	if len(seq) == 0 {
		return
	}
	j.mu.Lock()
	for k, i := range seq {
		j.points[i] = pts[k]
		if pts[k].Status != OK {
			j.prog.Failed++
		}
	}
	j.prog.Done += len(seq)
	j.mu.Unlock()
	if j.report != nil {
		j.repMu.Lock()
		j.report(j.Progress())
		j.repMu.Unlock()
	}
}

// Grid returns the grid being solved.
func (j *Job) Grid() Grid { return j.grid }

// Workers returns the number of worker goroutines.
func (j *Job) Workers() int { return j.workers }

// Progress returns how far the sweep has come.
func (j *Job) Progress() Progress {
	j.mu.Lock()
	defer j.mu.Unlock()
	p := j.prog
	if j.ended > 0 {
		p.Elapsed = j.ended
	} else {
		p.Elapsed = time.Since(j.start)
	}
	return p
}

// Cancel stops the sweep; points not yet solved stay NotRun. Wait still
// returns the points solved before.
func (j *Job) Cancel() { j.cancel() }

// Done returns a channel closed when every worker has stopped.
func (j *Job) Done() <-chan struct{} { return j.done }

// Wait waits for the sweep to end and returns its result. If it was
// cancelled before every point was solved, the result holds the points solved
// so far and the error is the context's (context.Canceled, or
// context.DeadlineExceeded), or the error of the gate that refused a point.
func (j *Job) Wait() (*Result, error) {
	<-j.done
	j.mu.Lock()
	defer j.mu.Unlock()
	return &Result{Grid: j.grid, Points: j.points, Workers: j.workers, Elapsed: j.ended}, j.err
}

// Field returns the current values of one metric (a key of
// model.MetricSpecs) at every point in grid order, NaN where the point is not
// solved yet or did not settle. It may be called while the sweep runs, to draw
// a map as it fills in.
func (j *Job) Field(metric string) ([]float64, error) {
	j.mu.Lock()
	defer j.mu.Unlock()
	return field(j.points, metric)
}

// Run solves every point of g and returns them in grid order. It returns an
// error only for an invalid grid or a cancelled ctx (then with the partial
// result); points that fail are reported in the result.
func Run(ctx context.Context, g Grid, opt Options) (*Result, error) {
	j, err := Start(ctx, g, opt)
	if err != nil {
		return nil, err
	}
	return j.Wait()
}
