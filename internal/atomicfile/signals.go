package atomicfile

import (
	"os"
	"os/signal"
	"sync"
	"syscall"
	"time"
)

// stopSignals are the signals that remove the temporary files being
// written before the program ends.
var stopSignals = []os.Signal{syscall.SIGINT, syscall.SIGTERM, syscall.SIGHUP}

// pending is the temporary files being written, watched for stopSignals
// while there is at least one (or one is being created).
var pending struct {
	sync.Mutex
	users int // Create calls between track and untrack
	files map[string]bool
	ch    chan os.Signal
}

// track notes a file about to be created and, for the first, starts
// watching the signals.
func track() {
	pending.Lock()
	defer pending.Unlock()
	if pending.users == 0 {
		pending.files = map[string]bool{}
		pending.ch = make(chan os.Signal, 1)
		signal.Notify(pending.ch, stopSignals...)
		go watch(pending.ch)
	}
	pending.users++
}

// add records a temporary file created since track.
func add(tmp string) {
	pending.Lock()
	pending.files[tmp] = true
	pending.Unlock()
}

// forget drops a temporary name that was not created.
func forget(tmp string) {
	pending.Lock()
	delete(pending.files, tmp)
	pending.Unlock()
}

// untrack forgets a temporary file (tmp may be "" when none was made) and,
// after the last, stops watching the signals.
func untrack(tmp string) {
	pending.Lock()
	defer pending.Unlock()
	delete(pending.files, tmp)
	pending.users--
	if pending.users == 0 {
		signal.Stop(pending.ch)
		close(pending.ch)
	}
}

// watch removes the temporary files when a stop signal comes and then lets
// the signal do what it would have done (end the program).
func watch(ch chan os.Signal) {
	sig, ok := <-ch
	if !ok {
		return
	}
	pending.Lock()
	for f := range pending.files {
		os.Remove(f)
	}
	signal.Reset(sig)
	if p, err := os.FindProcess(os.Getpid()); err == nil {
		_ = p.Signal(sig)
	}
	time.Sleep(time.Second) // the signal ends the program; should it not, exit
	os.Exit(128 + int(sig.(syscall.Signal)))
}
