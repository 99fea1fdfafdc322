// Package atomicfile writes files so that no one ever sees half of one: the
// data goes to a temporary file beside the destination (same folder, so the
// same file system), is synced, and only then takes the destination's name.
//
// Replacing an existing file is a rename. Creating a new file without
// replacing one is a hard link from the temporary file to the name, which
// fails if the name exists: of several writers racing for one new name,
// exactly one wins and the others get ErrExists, with nothing of theirs
// left behind. The temporary files are hidden (.NAME.tmp-*), named in no
// error, and removed when the write fails or the program is stopped by
// SIGINT, SIGTERM or SIGHUP while one is open.
package atomicfile

import (
	"errors"
	"fmt"
	"io/fs"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"syscall"
)

// ErrExists is returned (wrapped) by Commit and WriteFile when the
// destination exists and replacing it was not asked for.
var ErrExists = errors.New("file exists")

// WriteError is a failure to write Path; Err is the cause, without the name
// of the temporary file.
type WriteError struct {
	Path string
	Err  error
}

func (e *WriteError) Error() string { return "cannot write " + e.Path + ": " + e.Err.Error() }

// Unwrap returns the cause.
func (e *WriteError) Unwrap() error { return e.Err }

// writeError wraps err, stripped of the temporary file's name, for path.
func writeError(path string, err error) error { return &WriteError{Path: path, Err: bare(err)} }

// Perm is the permission of the files written: read and write for the
// owner, read for the rest (before the umask of the folder's ACLs, if any).
const Perm = 0o644

// File is a file being written; Commit gives it its name, Discard drops it.
type File struct {
	f    *os.File
	path string // destination
	tmp  string
	perm fs.FileMode // given at Commit
	done bool
}

// Create starts writing path. The temporary file is made in path's folder;
// an error names path, never the temporary file.
func Create(path string) (*File, error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	track()
	for range 100 {
		// The name is recorded before the file exists, so a signal that
		// comes as it is created removes it too.
		tmp := filepath.Join(dir, "."+base+".tmp-"+strconv.FormatUint(rand.Uint64(), 36))
		add(tmp)
		f, err := os.OpenFile(tmp, os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o600)
		if err == nil {
			return &File{f: f, path: path, tmp: tmp, perm: Perm}, nil
		}
		forget(tmp)
		if !errors.Is(err, fs.ErrExist) {
			untrack("")
			return nil, writeError(path, err)
		}
	}
	untrack("")
	return nil, writeError(path, errors.New("no free temporary name"))
}

// Write writes to the temporary file.
func (f *File) Write(p []byte) (int, error) {
	n, err := f.f.Write(p)
	if err != nil {
		err = writeError(f.path, err)
	}
	return n, err
}

// Commit syncs the data and gives the file its name: over an existing file
// if replace is set, else only if the name is free (ErrExists otherwise).
// The temporary file is gone afterwards in every case.
func (f *File) Commit(replace bool) error {
	if f.done {
		return errors.New("atomicfile: Commit after Commit or Discard")
	}
	defer f.Discard()
	err := f.f.Chmod(f.perm)
	if err == nil {
		err = f.f.Sync()
	}
	if cerr := f.f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return writeError(f.path, err)
	}
	if replace {
		err = os.Rename(f.tmp, f.path)
	} else {
		err = linkNew(f.tmp, f.path)
	}
	if err != nil {
		if errors.Is(err, fs.ErrExist) {
			return fmt.Errorf("%s: %w", f.path, ErrExists)
		}
		return writeError(f.path, err)
	}
	syncDir(filepath.Dir(f.path))
	return nil
}

// Discard removes the temporary file unless it was committed; it may be
// called more than once, and after Commit.
func (f *File) Discard() {
	if f.done {
		return
	}
	f.done = true
	f.f.Close()
	os.Remove(f.tmp)
	untrack(f.tmp)
}

// WriteFile writes data to path atomically, with permission Perm; see
// Commit for replace.
func WriteFile(path string, data []byte, replace bool) error {
	return WriteFileMode(path, data, replace, Perm)
}

// WriteFileMode is WriteFile with permission perm. The data is never
// readable with wider permissions than perm or 0600 while it is written.
func WriteFileMode(path string, data []byte, replace bool, perm fs.FileMode) error {
	f, err := Create(path)
	if err != nil {
		return err
	}
	f.perm = perm
	defer f.Discard()
	if _, err := f.Write(data); err != nil {
		return err
	}
	return f.Commit(replace)
}

// linkNew gives the complete file tmp the name path only if path is free.
// A hard link does that in one step. Where the file system has no hard
// links, an empty file created exclusively claims the name first and the
// rename then fills it.
func linkNew(tmp, path string) error {
	err := os.Link(tmp, path)
	if err == nil || errors.Is(err, fs.ErrExist) {
		return err
	}
	var le *os.LinkError
	if !errors.As(err, &le) || !(errors.Is(le.Err, syscall.EPERM) || errors.Is(le.Err, syscall.ENOTSUP) ||
		errors.Is(le.Err, syscall.EOPNOTSUPP) || errors.Is(le.Err, syscall.EXDEV) || errors.Is(le.Err, syscall.EMLINK)) {
		return err
	}
	claim, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, Perm)
	if err != nil {
		return err
	}
	claim.Close()
	return os.Rename(tmp, path)
}

// syncDir makes a rename or link durable; a folder that cannot be synced
// (some file systems refuse) is left as it is.
func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		_ = d.Sync()
		d.Close()
	}
}

// bare strips the path from an error of the os package, since the path may
// be the temporary file's.
func bare(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	var le *os.LinkError
	if errors.As(err, &le) {
		return le.Err
	}
	return err
}
