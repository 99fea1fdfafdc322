package analysis

import (
	"bytes"
	"errors"
	"math"
	"strings"
	"testing"
)

// FuzzReadCSV feeds arbitrary bytes to the recording reader and, when it
// accepts them, to the analysis: neither may panic, every refusal of the
// reader names the file, a line and a column, and an accepted recording
// must keep the reader's promises. The seed corpus is in
// testdata/fuzz/FuzzReadCSV. Run: go test ./model/analysis -run '^$' -fuzz FuzzReadCSV -fuzztime 2m
func FuzzReadCSV(f *testing.F) {
	f.Add([]byte("time_s,pressure_mmhg,volume_ml\n0,10,120\n0.001,11,120\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		rec, err := ReadCSV(bytes.NewReader(data), "fuzz.csv", ReadOptions{})
		if err != nil {
			var ie *InputError
			if !errors.As(err, &ie) || ie.File != "fuzz.csv" || ie.Line < 1 || ie.Col < 1 {
				t.Fatalf("refusal without file, line and column: %v", err)
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
			var ie *InputError
			var se *SmoothError
			if !errors.As(err, &ie) && !errors.As(err, &se) && !strings.Contains(err.Error(), "samples") {
				t.Fatalf("analysis refusal of another kind: %v", err)
			}
			return
		}
	})
}

// FuzzReadCalibration feeds arbitrary bytes to the calibration reader: it
// may not panic, every refusal is an *InputError naming the file, a line and
// a column, and an accepted file is in range and reads back the same after
// Marshal. Seed corpus: testdata/fuzz/FuzzReadCalibration. Run: go test
// ./model/analysis -run '^$' -fuzz FuzzReadCalibration -fuzztime 1m
func FuzzReadCalibration(f *testing.F) {
	f.Add([]byte("version: 1\nparallel_volume_ml: 12.5\nalpha: 0.8\nsource: saline.csv\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		c, err := ReadCalibration(bytes.NewReader(data), "fuzz.yaml")
		if err != nil {
			var ie *InputError
			if !errors.As(err, &ie) || ie.File != "fuzz.yaml" || ie.Line < 1 || ie.Col < 1 {
				t.Fatalf("refusal without file, line and column: %v", err)
			}
			return
		}
		if !(c.Alpha >= MinAlpha && c.Alpha <= MaxAlpha) || !(math.Abs(c.ParallelVolume) <= MaxVolumeOffset) {
			t.Fatalf("out of range accepted: %+v", c)
		}
		back, err := ReadCalibration(bytes.NewReader(c.Marshal()), "back.yaml")
		if err != nil || *back != *c {
			t.Fatalf("round trip: %v, %+v vs %+v", err, back, c)
		}
	})
}
