package safefile

import (
	"context"
	"io"
	"os"
	"sync/atomic"
)

// Progress counts the bytes read of a file of known size. It is safe to read
// from one goroutine while another reads the file.
type Progress struct {
	read, size atomic.Int64
}

// Read returns the bytes read so far.
func (p *Progress) Read() int64 { return p.read.Load() }

// Size returns the size of the file, or 0 before it is known.
func (p *Progress) Size() int64 { return p.size.Load() }

// Fraction returns the part read, 0 to 1 (0 while the size is unknown).
func (p *Progress) Fraction() float64 {
	s := p.Size()
	if s <= 0 {
		return 0
	}
	return min(1, float64(p.Read())/float64(s))
}

// chunk caps one read, so that cancelling and progress take effect within
// about a millisecond of reading even when the caller asks for a large
// buffer (io.ReadAll does as the data grows).
const chunk = 1 << 20

// Reader reads from R until Ctx is done, adding what it reads to Progress.
type Reader struct {
	ctx  context.Context
	r    io.Reader
	prog *Progress
}

// NewReader returns a reader of r that fails with ctx's error once ctx is
// done and counts its bytes in prog (which may be nil).
func NewReader(ctx context.Context, r io.Reader, prog *Progress) *Reader {
	if prog == nil {
		prog = &Progress{}
	}
	return &Reader{ctx: ctx, r: r, prog: prog}
}

// Read implements io.Reader.
func (r *Reader) Read(p []byte) (int, error) {
	if err := r.ctx.Err(); err != nil {
		return 0, err
	}
	if len(p) > chunk {
		p = p[:chunk]
	}
	n, err := r.r.Read(p)
	r.prog.read.Add(int64(n))
	return n, err
}

// File is a regular file opened for a cancellable read.
type File struct {
	*Reader
	f *os.File
}

// Close closes the file.
func (f *File) Close() error { return f.f.Close() }

// Opener opens a file for reading; Open is the usual one. A server that
// confines its users to a folder can pass one built on os.Root.
type Opener func(path string) (*os.File, error)

// OpenReader opens path with open (Open when nil), records its size in prog
// and returns it as a Reader bound to ctx. The caller closes it.
func OpenReader(ctx context.Context, open Opener, path string, prog *Progress) (*File, error) {
	if open == nil {
		open = Open
	}
	f, err := open(path)
	if err != nil {
		return nil, err
	}
	fi, err := f.Stat()
	if err == nil {
		err = Check(path, fi)
	}
	if err != nil {
		f.Close()
		return nil, err
	}
	r := NewReader(ctx, f, prog)
	r.prog.size.Store(fi.Size())
	return &File{Reader: r, f: f}, nil
}
