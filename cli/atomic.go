package cli

import (
	"bufio"
	"errors"
	"fmt"
	"io/fs"
	"os"

	"github.com/google/renameio/v2"
)

// outputFile is a file written to a temporary file beside its destination and
// renamed into place only when complete, so a failure never leaves half a
// file and never touches an old one.
type outputFile struct {
	*bufio.Writer
	pending *renameio.PendingFile
}

// checkOutput refuses an existing path unless force is set; flag names the
// option in the message.
func checkOutput(path, flag string, force bool) error {
	if force {
		return nil
	}
	if _, err := os.Lstat(path); err == nil {
		return fmt.Errorf("--%s %s: file exists (choose another name, or overwrite with --force)", flag, path)
	} else if !errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("--%s %s: %w", flag, path, err)
	}
	return nil
}

// createOutput starts writing path; call commit when done and discard in any
// case (a no-op after commit).
func createOutput(path, flag string, force bool) (*outputFile, error) {
	if err := checkOutput(path, flag, force); err != nil {
		return nil, err
	}
	p, err := renameio.NewPendingFile(path, renameio.WithPermissions(0o644))
	if err != nil {
		return nil, fmt.Errorf("--%s %s: %w", flag, path, err)
	}
	return &outputFile{Writer: bufio.NewWriterSize(p, 1<<16), pending: p}, nil
}

// commit flushes the file and renames it into place.
func (f *outputFile) commit() error {
	if err := f.Flush(); err != nil {
		return err
	}
	return f.pending.CloseAtomicallyReplace()
}

// outputError reports a failure to write the output file named by flag,
// without the name of the temporary file it was written to.
func outputError(flag, path string, err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		err = pe.Err
	}
	return fmt.Errorf("--%s %s: cannot write: %w", flag, path, err)
}

// discard removes the temporary file unless it was committed.
func (f *outputFile) discard() { _ = f.pending.Cleanup() }
