// Package pool shares the machine's cores between the explorers of one
// process: the sessions of a lab server, or the one explorer of a terminal.
//
// A Pool holds a fixed number of slots, one per core by default. Work runs
// only while it holds a slot (Tenant.Do), so however many sessions solve at
// once, the solves never ask for more cores than the machine has. Each
// session is a Tenant. When a slot frees up it goes to the waiting work of
// the highest class (Interactive before Background) and, within a class, to
// the tenants in turn, so one session cannot starve another: a coupling map
// being solved in one session (Background, one grid point per slot) makes a
// nudge in another (Interactive) wait for at most one point.
//
// Stale work is dropped, not queued: work waiting for a slot gives up when
// its context is cancelled, and closing a tenant (the session ended) gives up
// all its waiting work at once.
package pool

import (
	"context"
	"errors"
	"runtime"
	"sync"
)

// Class says how urgently work is wanted.
type Class int

const (
	// Interactive is work someone waits to see: the solve after a nudge, a
	// protocol's beat, a scenario being opened.
	Interactive Class = iota
	// Background is work that fills in while the user looks: the points of a
	// coupling map.
	Background
	nClasses
)

// ErrClosed is returned by Do on a closed tenant.
var ErrClosed = errors.New("pool: the session has ended")

// Pool is a set of slots shared by tenants. Its methods are safe for
// concurrent use.
type Pool struct {
	mu    sync.Mutex
	size  int
	free  int
	turns [nClasses][]*Tenant // tenants with waiting work, in turn order
	stats Stats
}

// Stats counts what a pool has done.
type Stats struct {
	Granted [nClasses]int // work that got a slot, by class
}

// New returns a pool of n slots; n ≤ 0 means runtime.GOMAXPROCS(0).
func New(n int) *Pool {
	if n <= 0 {
		n = runtime.GOMAXPROCS(0)
	}
	return &Pool{size: n, free: n}
}

var (
	defaultOnce sync.Once
	defaultPool *Pool
)

// Default returns the process's pool, with one slot per core.
func Default() *Pool {
	defaultOnce.Do(func() { defaultPool = New(0) })
	return defaultPool
}

// Size returns the number of slots.
func (p *Pool) Size() int { return p.size }

// Stats returns the counts so far.
func (p *Pool) Stats() Stats {
	p.mu.Lock()
	defer p.mu.Unlock()
	return p.stats
}

// Tenant is one user of a pool, usually one explorer session.
type Tenant struct {
	p       *Pool
	waiting [nClasses][]*waiter // FIFO; guarded by p.mu
	queued  [nClasses]bool      // in p.turns[class]
	closed  bool
}

// waiter is work waiting for a slot.
type waiter struct {
	ready   chan struct{} // closed when granted a slot or refused
	granted bool
	err     error
}

// Tenant returns a new tenant of p.
func (p *Pool) Tenant() *Tenant { return &Tenant{p: p} }

// Do waits for a slot, runs fn holding it and gives the slot back. It returns
// ctx's error, or ErrClosed, without running fn if the wait ends first.
func (t *Tenant) Do(ctx context.Context, c Class, fn func()) error {
	if err := t.acquire(ctx, c); err != nil {
		return err
	}
	defer t.p.release()
	fn()
	return nil
}

// Gate returns t as a gate for work of class c, with the method the sweep
// package asks for.
func (t *Tenant) Gate(c Class) Gate { return Gate{t, c} }

// Gate runs work of one class of one tenant.
type Gate struct {
	t *Tenant
	c Class
}

// Do runs fn in a slot of the gate's class (see Tenant.Do).
func (g Gate) Do(ctx context.Context, fn func()) error { return g.t.Do(ctx, g.c, fn) }

// Close refuses the tenant's waiting and future work with ErrClosed. Work
// already holding a slot runs to its end.
func (t *Tenant) Close() {
	p := t.p
	p.mu.Lock()
	defer p.mu.Unlock()
	t.closed = true
	for c := range nClasses {
		for _, w := range t.waiting[c] {
			w.err = ErrClosed
			close(w.ready)
		}
		t.waiting[c] = nil
		p.unqueue(t, c)
	}
}

// acquire takes a slot for work of class c, waiting its turn.
func (t *Tenant) acquire(ctx context.Context, c Class) error {
	if err := ctx.Err(); err != nil {
		return err
	}
	p := t.p
	p.mu.Lock()
	if t.closed {
		p.mu.Unlock()
		return ErrClosed
	}
	if p.free > 0 { // then nothing waits
		p.free--
		p.stats.Granted[c]++
		p.mu.Unlock()
		return nil
	}
	w := &waiter{ready: make(chan struct{})}
	t.waiting[c] = append(t.waiting[c], w)
	if !t.queued[c] {
		t.queued[c] = true
		p.turns[c] = append(p.turns[c], t)
	}
	p.mu.Unlock()

	select {
	case <-w.ready:
		return w.err
	case <-ctx.Done():
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	switch {
	case w.granted:
		// The slot came as the wait was given up: pass it on.
		p.releaseLocked()
	case w.err == nil:
		t.remove(c, w)
	}
	return ctx.Err()
}

// remove takes w off t's queue of class c.
func (t *Tenant) remove(c Class, w *waiter) {
	q := t.waiting[c]
	for i, x := range q {
		if x == w {
			t.waiting[c] = append(q[:i:i], q[i+1:]...)
			break
		}
	}
	if len(t.waiting[c]) == 0 {
		t.p.unqueue(t, c)
	}
}

// unqueue takes t out of the turns of class c.
func (p *Pool) unqueue(t *Tenant, c Class) {
	if !t.queued[c] {
		return
	}
	t.queued[c] = false
	q := p.turns[c]
	for i, x := range q {
		if x == t {
			p.turns[c] = append(q[:i:i], q[i+1:]...)
			return
		}
	}
}

// release gives a slot back.
func (p *Pool) release() {
	p.mu.Lock()
	p.releaseLocked()
	p.mu.Unlock()
}

// releaseLocked hands the slot to the next waiting work: the highest class
// first, the tenant whose turn it is within it.
func (p *Pool) releaseLocked() {
	for c := range nClasses {
		if len(p.turns[c]) == 0 {
			continue
		}
		t := p.turns[c][0]
		p.turns[c] = p.turns[c][1:]
		w := t.waiting[c][0]
		t.waiting[c] = t.waiting[c][1:]
		if len(t.waiting[c]) > 0 {
			p.turns[c] = append(p.turns[c], t) // to the back of the line
		} else {
			t.queued[c] = false
		}
		p.stats.Granted[c]++
		w.granted = true
		close(w.ready)
		return
	}
	p.free++
}
