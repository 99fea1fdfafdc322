package sweep

// serpentine returns the point numbers of a row-major grid of the given
// dimensions in boustrophedon order: an odometer whose fastest axis reverses
// direction at each end instead of wrapping, so every step changes exactly
// one axis index by one and each point's predecessor is a grid neighbour.
func serpentine(dims []int) []int {
	total := 1
	for _, n := range dims {
		total *= n
	}
	order := make([]int, 0, total)
	idx := make([]int, len(dims))
	dir := make([]int, len(dims))
	for k := range dir {
		dir[k] = 1
	}
	flat := func() int {
		i := 0
		for k, n := range dims {
			i = i*n + idx[k]
		}
		return i
	}
	for {
		order = append(order, flat())
		if len(order) == total {
			return order
		}
		// Advance the fastest axis that can move; the faster ones, pinned at
		// an end, turn round.
		k := len(dims) - 1
		for ; k >= 0; k-- {
			if j := idx[k] + dir[k]; j >= 0 && j < dims[k] {
				idx[k] = j
				break
			}
			dir[k] = -dir[k]
		}
	}
}

// Chunk sizes: a sweep is cut into about targetChunks pieces of the
// serpentine, each at least minChunk and at most maxChunk points. The size
// depends on the number of points only, so results do not depend on the
// number of workers; many small chunks balance the load, and each costs one
// cold start (about the price of one warm solve).
const (
	targetChunks = 64
	minChunk     = 16
	maxChunk     = 256
)

// chunkSize is the number of consecutive serpentine points one worker solves
// in a row, warm-starting each from the one before.
func chunkSize(total int) int {
	c := (total + targetChunks - 1) / targetChunks
	return max(minChunk, min(maxChunk, c))
}
