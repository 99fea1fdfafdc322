package analysis

import (
	"math"
	"slices"
)

// quantileOf is the q-quantile (the value of rank ⌊q·(n−1)⌋ in sorted
// order) of the n values at(0)…at(n−1), found exactly without sorting a
// copy: a histogram of 4096 bins finds the bin that holds the rank; a bin
// with more than maxSorted values is split again by another pass, and only
// a small bin is sorted. Memory stays small for the millions of samples of
// a long recording.
func quantileOf(n int, at func(i int) float64, q float64) float64 {
	if n == 0 {
		return nan
	}
	rank := int(q * float64(n-1))
	lo, hi := math.Inf(-1), math.Inf(1) // the values considered: lo ≤ x ≤ hi
	below := 0                          // values under lo
	for {
		// The range of the values considered, and their count.
		vmin, vmax, in := math.Inf(1), math.Inf(-1), 0
		for i := 0; i < n; i++ {
			if x := at(i); x >= lo && x <= hi {
				vmin, vmax, in = math.Min(vmin, x), math.Max(vmax, x), in+1
			}
		}
		if !(vmax > vmin) {
			return vmin
		}
		if in <= maxSorted {
			vals := make([]float64, 0, in)
			for i := 0; i < n; i++ {
				if x := at(i); x >= lo && x <= hi {
					vals = append(vals, x)
				}
			}
			slices.Sort(vals)
			return vals[rank-below]
		}
		const bins = 4096
		w := (vmax - vmin) / bins
		bin := func(x float64) int { return max(0, min(bins-1, int((x-vmin)/w))) }
		var count [bins]int
		for i := 0; i < n; i++ {
			if x := at(i); x >= lo && x <= hi {
				count[bin(x)]++
			}
		}
		k := 0
		for ; below+count[k] <= rank; k++ {
			below += count[k]
		}
		// Keep the values of bin k: those the bin function puts in it.
		blo, bhi := math.Inf(1), math.Inf(-1)
		for i := 0; i < n; i++ {
			if x := at(i); x >= lo && x <= hi && bin(x) == k {
				blo, bhi = math.Min(blo, x), math.Max(bhi, x)
			}
		}
		lo, hi = blo, bhi
	}
}

// maxSorted is the most values quantileOf sorts at once.
const maxSorted = 1 << 14
