// Package safefile opens the files pvcouple reads (scenarios, protocols,
// recordings) only when they are regular files, and reads them in a way that
// can be cancelled and watched.
//
// A named pipe blocks a read until someone writes to it, a device such as
// /dev/zero never ends, and a directory is not a file at all: each is refused
// by Open before it is opened, with an error that says what the path is.
// Reader stops at once when its context is cancelled and counts the bytes it
// has read, for a progress line.
package safefile

import (
	"errors"
	"fmt"
	"io/fs"
	"os"

	"pvcouple/internal/safetext"
)

// ErrNotRegular is wrapped by the error of Open for a path that is not a
// regular file.
var ErrNotRegular = errors.New("not a regular file")

// NotRegularError says what a refused path is.
type NotRegularError struct {
	Path string
	Kind string // "a named pipe (FIFO)", "a folder", ...
}

func (e *NotRegularError) Error() string {
	return fmt.Sprintf("%s is %s, not a regular file", safetext.Line(e.Path), e.Kind)
}

// Unwrap makes errors.Is(err, ErrNotRegular) true.
func (e *NotRegularError) Unwrap() error { return ErrNotRegular }

// kind names the type of a file that is not regular.
func kind(m fs.FileMode) string {
	switch {
	case m.IsDir():
		return "a folder"
	case m&fs.ModeNamedPipe != 0:
		return "a named pipe (FIFO)"
	case m&fs.ModeCharDevice != 0:
		return "a character device"
	case m&fs.ModeDevice != 0:
		return "a block device"
	case m&fs.ModeSocket != 0:
		return "a socket"
	}
	return "not an ordinary file"
}

// Check returns a *NotRegularError unless fi describes a regular file.
func Check(path string, fi fs.FileInfo) error {
	if fi.Mode().IsRegular() {
		return nil
	}
	return &NotRegularError{Path: path, Kind: kind(fi.Mode())}
}

// Open opens path for reading if it is a regular file (a symbolic link to
// one is followed). Anything else is refused before it is opened, so a named
// pipe cannot block the caller; the file is checked again once open, so a
// path swapped for a pipe in between is refused too. Errors name the path.
func Open(path string) (*os.File, error) {
	fi, err := os.Stat(path)
	if err != nil {
		return nil, err
	}
	if err := Check(path, fi); err != nil {
		return nil, err
	}
	f, err := os.OpenFile(path, os.O_RDONLY|openFlags, 0)
	if err != nil {
		return nil, err
	}
	return checked(path, f)
}

// OpenIn opens name inside root for reading if it is a regular file: opened
// without blocking on a named pipe and refused once open if it is not
// regular, as Open refuses it. Errors of the check name name.
func OpenIn(root *os.Root, name string) (*os.File, error) {
	f, err := root.OpenFile(name, os.O_RDONLY|openFlags, 0)
	if err != nil {
		return nil, err
	}
	return checked(name, f)
}

// checked returns f if it is a regular file; otherwise it closes f and
// returns why.
func checked(path string, f *os.File) (*os.File, error) {
	fi, err := f.Stat()
	if err == nil {
		err = Check(path, fi)
	}
	if err != nil {
		f.Close()
		return nil, err
	}
	return f, nil
}
