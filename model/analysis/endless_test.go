package analysis

import (
	"errors"
	"io"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
	"time"
)

// repeat is an endless reader of a pattern (after an optional head).
type repeat struct {
	head, body []byte
	i          int
}

func (r *repeat) Read(p []byte) (int, error) {
	n := 0
	for n < len(p) {
		if len(r.head) > 0 {
			k := copy(p[n:], r.head)
			r.head, n = r.head[k:], n+k
			continue
		}
		k := copy(p[n:], r.body[r.i:])
		n += k
		r.i = (r.i + k) % len(r.body)
	}
	return n, nil
}

// random is an endless reader of random bytes (/dev/urandom).
type random struct{ rng *rand.Rand }

func (r random) Read(p []byte) (int, error) {
	for i := range p {
		p[i] = byte(r.rng.Uint32())
	}
	return len(p), nil
}

// counting is an endless stream of valid rows with increasing time.
type counting struct {
	buf     []byte
	i       int
	started bool
}

func (c *counting) Read(p []byte) (int, error) {
	if !c.started {
		c.buf, c.started = []byte("time_s,pressure_mmhg,volume_ml\n"), true
	}
	n := 0
	for n < len(p) {
		if len(c.buf) == 0 {
			c.buf = strconv.AppendFloat(c.buf, float64(c.i)/1000, 'f', 3, 64)
			c.buf = append(c.buf, ",80,100\n"...)
			c.i++
		}
		k := copy(p[n:], c.buf)
		c.buf, n = c.buf[k:], n+k
	}
	return n, nil
}

// Devices and endless streams handed in as an io.Reader are refused within
// a second, with the file, line and column: zeros (/dev/zero), random bytes
// (/dev/urandom), a line that never ends, endless blank lines or comments,
// a header then rows whose time never advances. An endless stream of valid
// rows is refused at the row cap (lowered here to keep the test small).
func TestEndlessInputIsRefused(t *testing.T) {
	head := []byte("time_s,pressure_mmhg,volume_ml\n")
	cases := []struct {
		name string
		r    io.Reader
		want string
	}{
		{"zeros", &repeat{body: []byte{0}}, "NUL byte: this is a binary file"},
		{"random", random{rand.New(rand.NewPCG(1, 1))}, ""},
		{"endless line", &repeat{body: []byte("1234567,")}, "longer than 64 KiB"},
		{"endless blank lines", &repeat{body: []byte("\n")}, "no header line"},
		{"endless comments after the header", &repeat{head: head, body: []byte("# note\n")}, "blank or comment lines in a row"},
		{"time stands still", &repeat{head: head, body: []byte("0,80,100\n")}, "times must increase"},
	}
	for _, c := range cases {
		start := time.Now()
		_, err := ReadCSV(c.r, "stream", ReadOptions{})
		var ie *InputError
		if !errors.As(err, &ie) || ie.Line < 1 || ie.Col < 1 || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got %v, want an InputError with %q", c.name, err, c.want)
		}
		if d := time.Since(start); d > time.Second {
			t.Errorf("%s: refused after %v", c.name, d)
		}
	}
	defer func(n int, b int64) { maxSamples, maxFileBytes = n, b }(maxSamples, maxFileBytes)
	maxSamples = 100000
	if _, err := ReadCSV(&counting{}, "stream", ReadOptions{}); err == nil || !strings.Contains(err.Error(), "more than 100000 rows") {
		t.Errorf("endless valid rows: %v", err)
	}
	maxSamples, maxFileBytes = MaxSamples, 1<<20
	if _, err := ReadCSV(&counting{}, "stream", ReadOptions{}); err == nil || !strings.Contains(err.Error(), "larger than 1 MiB") {
		t.Errorf("endless valid rows past the byte cap: %v", err)
	}
}
