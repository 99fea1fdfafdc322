package analysis

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// quantileOf gives the value of rank ⌊q·(n−1)⌋ of the sorted data (sorted
// by slices.Sort) on random data, ties, a constant and a long stretch of one
// value, where its bins must be split again.
func TestQuantileOf(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	cases := map[string][]float64{}
	x := make([]float64, 100000)
	for i := range x {
		x[i] = rng.NormFloat64()
	}
	cases["normal"] = x
	y := make([]float64, 50000)
	for i := range y {
		y[i] = float64(rng.IntN(7))
	}
	cases["ties"] = y
	z := make([]float64, 70000)
	for i := range z {
		z[i] = 0.001
		if i%1000 == 0 {
			z[i] = 0.002
		}
	}
	cases["one value"] = z
	cases["constant"] = []float64{3, 3, 3}
	for name, v := range cases {
		s := slices.Clone(v)
		slices.Sort(s)
		for _, q := range []float64{0, 0.01, 0.5, 0.99, 0.995, 1} {
			got := quantileOf(len(v), func(i int) float64 { return v[i] }, q)
			want := s[int(q*float64(len(s)-1))]
			if got != want {
				t.Errorf("%s q %g: %g, want %g", name, q, got, want)
			}
		}
	}
}
