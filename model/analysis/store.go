package analysis

// column holds one signal of a recording in fixed-size blocks of float32, so
// that reading a long file never copies what it has read (no slice doubling)
// and a sample costs 4 bytes. float32 keeps 7 significant digits, more than
// the 16-bit converters of catheter systems deliver.
type column struct {
	blocks [][]float32
	n      int
}

// blockBits sets the block size: 2^16 samples, about a minute at 1 kHz.
const (
	blockBits = 16
	blockSize = 1 << blockBits
	blockMask = blockSize - 1
)

// push appends a sample.
func (c *column) push(x float64) {
	if c.n&blockMask == 0 {
		c.blocks = append(c.blocks, make([]float32, blockSize))
	}
	c.blocks[c.n>>blockBits][c.n&blockMask] = float32(x)
	c.n++
}

// at returns sample i.
func (c *column) at(i int) float64 { return float64(c.blocks[i>>blockBits][i&blockMask]) }

// window copies samples [from, to) into dst (grown as needed) as float64.
func (c *column) window(dst []float64, from, to int) []float64 {
	dst = dst[:0]
	for i := from; i < to; {
		b := c.blocks[i>>blockBits]
		k := i & blockMask
		end := min(blockSize, k+to-i)
		for _, x := range b[k:end] {
			dst = append(dst, float64(x))
		}
		i += end - k
	}
	return dst
}

// times holds sample times while a file is read: float64 (times need more
// digits than float32 has), in blocks like column. They are dropped once the
// time grid of each segment is known.
type times struct {
	blocks [][]float64
	n      int
}

func (c *times) push(x float64) {
	if c.n&blockMask == 0 {
		c.blocks = append(c.blocks, make([]float64, blockSize))
	}
	c.blocks[c.n>>blockBits][c.n&blockMask] = x
	c.n++
}

func (c *times) at(i int) float64 { return c.blocks[i>>blockBits][i&blockMask] }

// window copies times [from, to) into dst.
func (c *times) window(dst []float64, from, to int) []float64 {
	dst = dst[:0]
	for i := from; i < to; i++ {
		dst = append(dst, c.at(i))
	}
	return dst
}
