package analysis

import (
	"bytes"
	"errors"
	"math"
	"testing"
)

// FuzzReadCSV feeds arbitrary bytes to the recording reader and, when it
// accepts them, to the analysis: neither may panic, and an accepted
// recording must keep the reader's promises. The seed corpus is in
// testdata/fuzz/FuzzReadCSV. Run: go test ./model/analysis -run '^$' -fuzz FuzzReadCSV -fuzztime 2m
func FuzzReadCSV(f *testing.F) {
	f.Add([]byte("time_s,pressure_mmhg,volume_ml\n0,10,120\n0.001,11,120\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		rec, err := ReadCSV(bytes.NewReader(data), "fuzz.csv", ReadOptions{})
		if err != nil {
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("error is not an InputError: %v", err)
			}
			return
		}
		n := rec.Len()
		if rec.p.n != n || rec.v.n != n || (rec.HasAortic() && rec.pao.n != n) {
			t.Fatalf("columns of different lengths")
		}
		if !(rec.Rate >= MinRate && rec.Rate <= MaxRate) || rec.Duration() < MinDuration {
			t.Fatalf("rate %g, duration %g accepted", rec.Rate, rec.Duration())
		}
		covered := 0
		for _, s := range rec.Segments {
			covered += s.To - s.From
			if !(s.Step > 0) {
				t.Fatalf("segment %+v has no time step", s)
			}
		}
		if covered != n || len(rec.Gaps) != len(rec.Segments)-1 {
			t.Fatalf("segments %v do not cover %d samples", rec.Segments, n)
		}
		for i := 1; i < n; i++ {
			if !(rec.Time(i) > rec.Time(i-1)) {
				t.Fatalf("time not increasing at %d", i)
			}
		}
		for i := 0; i < n; i++ {
			x := rec.Time(i) + rec.Pressure(i) + rec.Volume(i)
			if rec.HasAortic() {
				x += rec.Aortic(i)
			}
			if math.IsNaN(x) || math.IsInf(x, 0) {
				t.Fatalf("non-finite sample %d", i)
			}
		}
		if _, err := Analyze(rec, Options{}); err != nil {
			return
		}
	})
}
