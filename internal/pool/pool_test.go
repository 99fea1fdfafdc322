package pool

import (
	"context"
	"errors"
	"math/rand/v2"
	"sync"
	"sync/atomic"
	"testing"
	"time"
)

// hold takes every slot of p with work that waits for release to be closed,
// and returns once all of them run.
func hold(t *testing.T, p *Pool, release <-chan struct{}) *sync.WaitGroup {
	t.Helper()
	var wg sync.WaitGroup
	started := make(chan struct{})
	tn := p.Tenant()
	for range p.Size() {
		wg.Add(1)
		go func() {
			defer wg.Done()
			_ = tn.Do(context.Background(), Background, func() {
				started <- struct{}{}
				<-release
			})
		}()
	}
	for range p.Size() {
		<-started
	}
	return &wg
}

// waitQueued waits until n pieces of work wait for a slot.
func waitQueued(t *testing.T, p *Pool, n int) {
	t.Helper()
	deadline := time.Now().Add(5 * time.Second)
	for time.Now().Before(deadline) {
		p.mu.Lock()
		k := 0
		for c := range nClasses {
			for _, tn := range p.turns[c] {
				k += len(tn.waiting[c])
			}
		}
		p.mu.Unlock()
		if k == n {
			return
		}
		time.Sleep(time.Millisecond)
	}
	t.Fatalf("%d pieces of work never queued", n)
}

// order runs the queued work one at a time and records the order it ran in.
type order struct {
	mu  sync.Mutex
	ran []string
}

func (o *order) add(s string) {
	o.mu.Lock()
	o.ran = append(o.ran, s)
	o.mu.Unlock()
}

// Interactive work waiting beside background work gets the next free slot,
// whichever came first.
func TestInteractiveBeforeBackground(t *testing.T) {
	p := New(1)
	release := make(chan struct{})
	busy := hold(t, p, release)
	a, b := p.Tenant(), p.Tenant()
	var o order
	var wg sync.WaitGroup
	wg.Add(2)
	go func() { defer wg.Done(); _ = a.Do(context.Background(), Background, func() { o.add("map point") }) }()
	waitQueued(t, p, 1)
	go func() { defer wg.Done(); _ = b.Do(context.Background(), Interactive, func() { o.add("nudge") }) }()
	waitQueued(t, p, 2)
	close(release)
	busy.Wait()
	wg.Wait()
	if len(o.ran) != 2 || o.ran[0] != "nudge" {
		t.Errorf("ran in order %v, want the nudge first", o.ran)
	}
}

// Within a class the tenants take turns: one tenant's long queue does not
// hold back another's work.
func TestTenantsTakeTurns(t *testing.T) {
	p := New(1)
	release := make(chan struct{})
	busy := hold(t, p, release)
	a, b := p.Tenant(), p.Tenant()
	var o order
	var wg sync.WaitGroup
	for i := range 5 {
		wg.Add(1)
		go func() { defer wg.Done(); _ = a.Do(context.Background(), Background, func() { o.add("a") }) }()
		waitQueued(t, p, i+1)
	}
	wg.Add(1)
	go func() { defer wg.Done(); _ = b.Do(context.Background(), Background, func() { o.add("b") }) }()
	waitQueued(t, p, 6)
	close(release)
	busy.Wait()
	wg.Wait()
	if len(o.ran) != 6 || o.ran[1] != "b" {
		t.Errorf("ran in order %v, want b second (after one of a's)", o.ran)
	}
}

// Work whose context is cancelled while it waits does not run, and the slots
// all come back.
func TestCancelledWaitDoesNotRun(t *testing.T) {
	p := New(2)
	release := make(chan struct{})
	busy := hold(t, p, release)
	tn := p.Tenant()
	ctx, cancel := context.WithCancel(context.Background())
	errc := make(chan error)
	var ran atomic.Bool
	go func() { errc <- tn.Do(ctx, Interactive, func() { ran.Store(true) }) }()
	waitQueued(t, p, 1)
	cancel()
	if err := <-errc; !errors.Is(err, context.Canceled) || ran.Load() {
		t.Errorf("err %v, ran %v: want context.Canceled and not run", err, ran.Load())
	}
	close(release)
	busy.Wait()
	if p.free != p.size {
		t.Errorf("%d of %d slots free after all work ended", p.free, p.size)
	}
}

// Closing a tenant refuses its waiting work and anything it asks for later;
// other tenants go on.
func TestCloseRefusesWaitingWork(t *testing.T) {
	p := New(1)
	release := make(chan struct{})
	busy := hold(t, p, release)
	gone, other := p.Tenant(), p.Tenant()
	errc := make(chan error, 2)
	go func() { errc <- gone.Do(context.Background(), Background, func() { t.Error("ran after Close") }) }()
	waitQueued(t, p, 1)
	gone.Close()
	if err := <-errc; !errors.Is(err, ErrClosed) {
		t.Errorf("waiting work got %v, want ErrClosed", err)
	}
	if err := gone.Do(context.Background(), Interactive, func() { t.Error("ran after Close") }); !errors.Is(err, ErrClosed) {
		t.Errorf("later work got %v, want ErrClosed", err)
	}
	go func() { errc <- other.Do(context.Background(), Interactive, func() {}) }()
	close(release)
	busy.Wait()
	if err := <-errc; err != nil {
		t.Errorf("another tenant's work: %v", err)
	}
}

// Under a random load of many tenants, with waits given up at random, no
// more work runs at once than there are slots, and every slot comes back.
func TestNeverMoreThanSize(t *testing.T) {
	p := New(3)
	var running, peak atomic.Int32
	var wg sync.WaitGroup
	for k := range 8 {
		tn := p.Tenant()
		wg.Add(1)
		go func() {
			defer wg.Done()
			r := rand.New(rand.NewPCG(uint64(k), 1))
			for range 200 {
				ctx, cancel := context.WithTimeout(context.Background(), time.Duration(r.IntN(300))*time.Microsecond)
				_ = tn.Do(ctx, Class(r.IntN(2)), func() {
					n := running.Add(1)
					for {
						old := peak.Load()
						if n <= old || peak.CompareAndSwap(old, n) {
							break
						}
					}
					time.Sleep(time.Duration(r.IntN(100)) * time.Microsecond)
					running.Add(-1)
				})
				cancel()
			}
		}()
	}
	wg.Wait()
	if peak.Load() > 3 {
		t.Errorf("%d pieces of work ran at once on 3 slots", peak.Load())
	}
	if p.free != p.size {
		t.Errorf("%d of %d slots free after all work ended", p.free, p.size)
	}
}
