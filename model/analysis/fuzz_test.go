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
		n := len(rec.T)
		if len(rec.P) != n || len(rec.V) != n || (rec.Pao != nil && len(rec.Pao) != n) {
			t.Fatalf("columns of different lengths")
		}
		if !(rec.Rate >= MinRate*0.99 && rec.Rate <= MaxRate*1.01) || rec.Duration() < MinDuration {
			t.Fatalf("rate %g, duration %g accepted", rec.Rate, rec.Duration())
		}
		covered := 0
		for _, s := range rec.Segments {
			covered += s.To - s.From
			for i := s.From + 1; i < s.To; i++ {
				if !(rec.T[i] > rec.T[i-1]) {
					t.Fatalf("time not increasing at %d", i)
				}
			}
		}
		if covered != n || len(rec.Gaps) != len(rec.Segments)-1 {
			t.Fatalf("segments %v do not cover %d samples", rec.Segments, n)
		}
		for i := range rec.T {
			if math.IsNaN(rec.T[i]+rec.P[i]+rec.V[i]) || math.IsInf(rec.T[i]+rec.P[i]+rec.V[i], 0) {
				t.Fatalf("non-finite sample %d", i)
			}
		}
		if _, err := Analyze(rec, Options{}); err != nil {
			return
		}
	})
}
