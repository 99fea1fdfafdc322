package model_test

import (
	"testing"

	"pvcouple/model"
)

// benchmarkTransient times one beat of a transient run (Next), the work a
// protocol player does per beat.
func benchmarkTransient(b *testing.B, rate int) {
	p := normalParams(b)
	sched := repeat(p, 500)
	var tr *model.Transient
	b.ReportAllocs()
	for b.Loop() {
		if tr == nil || tr.Done() {
			b.StopTimer()
			var err error
			if tr, err = model.NewTransient(p, sched, model.TransientOptions{RecordRate: rate}); err != nil {
				b.Fatal(err)
			}
			b.StartTimer()
		}
		if _, err := tr.Next(); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkTransientBeat is one beat of a protocol run at rest.
func BenchmarkTransientBeat(b *testing.B) { benchmarkTransient(b, 0) }

// BenchmarkTransientBeatRecorded adds the 1 kHz recording of --samples.
func BenchmarkTransientBeatRecorded(b *testing.B) { benchmarkTransient(b, 1000) }
