package sweep_test

import (
	"context"
	"math"
	"testing"

	"pvcouple/model/sweep"
)

// Statuses tells points still to come (NotRun) from solved ones while a
// sweep runs, agrees with Field on which points have a value, and matches
// the result's statuses once the sweep ends.
func TestStatuses(t *testing.T) {
	g := coupling(t, 8, 6)
	var seen []sweep.Status
	var job *sweep.Job
	started := make(chan struct{})
	job, err := sweep.Start(context.Background(), g, sweep.Options{Workers: 1, Progress: func(p sweep.Progress) {
		<-started
		if p.Done < p.Total && seen == nil {
			seen = job.Statuses(nil)
		}
	}})
	if err != nil {
		t.Fatal(err)
	}
	close(started)
	res, err := job.Wait()
	if err != nil {
		t.Fatal(err)
	}
	notRun := 0
	for _, s := range seen {
		if s == sweep.NotRun {
			notRun++
		}
	}
	if seen == nil || notRun == 0 || notRun == len(seen) {
		t.Errorf("statuses while running: %d of %d not run, want some but not all", notRun, len(seen))
	}
	final := job.Statuses(seen)
	sw, _ := job.Field("sw_mmhg_ml")
	for i, p := range res.Points {
		if final[i] != p.Status {
			t.Fatalf("point %d: status %v, result says %v", i, final[i], p.Status)
		}
		if (p.Status == sweep.OK) == math.IsNaN(sw[i]) {
			t.Fatalf("point %d: status %v but field value %v", i, p.Status, sw[i])
		}
	}
}
