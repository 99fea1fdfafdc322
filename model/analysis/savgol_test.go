package analysis

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

// testdata/savgol.json holds the output of SciPy's savgol_filter (mode
// "interp", Debian's python3-scipy) for a test signal; testdata/savgol.py
// regenerates it. Agreement to 1e-9 relative to the signal's scale shows the
// weights, the derivative scaling and the end handling are SciPy's.
func TestSavGolMatchesSciPy(t *testing.T) {
	data, err := os.ReadFile("testdata/savgol.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		DT    float64   `json:"dt"`
		Input []float64 `json:"input"`
		Cases []struct {
			Window, Order, Deriv int
			Output               []float64
		} `json:"cases"`
	}
	if err := json.Unmarshal(data, &ref); err != nil {
		t.Fatal(err)
	}
	for _, c := range ref.Cases {
		f, err := NewSavGol(c.Window, c.Order, c.Deriv)
		if err != nil {
			t.Fatal(err)
		}
		got := f.Apply(nil, ref.Input, ref.DT)
		scale := 0.0
		for _, v := range c.Output {
			scale = math.Max(scale, math.Abs(v))
		}
		for i := range got {
			if d := math.Abs(got[i] - c.Output[i]); d > 1e-9*scale {
				t.Errorf("window %d order %d deriv %d: sample %d = %.12g, SciPy %.12g", c.Window, c.Order, c.Deriv, i, got[i], c.Output[i])
				break
			}
		}
	}
}

func TestSavGolRejectsBadShapes(t *testing.T) {
	for _, c := range [][3]int{{4, 2, 0}, {1, 0, 0}, {5, 5, 0}, {5, 2, 3}, {5, -1, 0}} {
		if _, err := NewSavGol(c[0], c[1], c[2]); err == nil {
			t.Errorf("window %d order %d deriv %d accepted", c[0], c[1], c[2])
		}
	}
}
