package cli

import (
	"bufio"
	"errors"
	"fmt"
	"io/fs"
	"os"

	"pvcouple/internal/atomicfile"
	"pvcouple/internal/safetext"
)

// outputFile is a file written to a temporary file beside its destination and
// given its name only when complete, so a failure never leaves half a file
// and never touches an old one.
type outputFile struct {
	*bufio.Writer
	pending *atomicfile.File
	path    string
	flag    string
	force   bool
}

// checkOutput refuses an existing path unless force is set; flag names the
// option in the message. It runs before any work; the write itself refuses
// a file that appeared meanwhile.
func checkOutput(path, flag string, force bool) error {
	if force {
		return nil
	}
	if _, err := os.Lstat(path); err == nil {
		return existsError(flag, path)
	} else if !errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("%s %s: %w", dashed(flag), safetext.Line(path), err)
	}
	return nil
}

// existsError says that the output file of flag exists.
func existsError(flag, path string) error {
	return fmt.Errorf("%s %s: file exists (choose another name, or overwrite with --force)", dashed(flag), safetext.Line(path))
}

// createOutput starts writing path; call commit when done and discard in any
// case (a no-op after commit).
func createOutput(path, flag string, force bool) (*outputFile, error) {
	if err := checkOutput(path, flag, force); err != nil {
		return nil, err
	}
	p, err := atomicfile.Create(path)
	if err != nil {
		return nil, outputError(flag, path, err)
	}
	return &outputFile{Writer: bufio.NewWriterSize(p, 1<<16), pending: p, path: path, flag: flag, force: force}, nil
}

// commit flushes the file and gives it its name; without force it refuses
// a file of that name that appeared since checkOutput.
func (f *outputFile) commit() error {
	if err := f.Flush(); err != nil {
		return outputError(f.flag, f.path, err)
	}
	if err := f.pending.Commit(f.force); err != nil {
		if errors.Is(err, atomicfile.ErrExists) {
			return existsError(f.flag, f.path)
		}
		return outputError(f.flag, f.path, err)
	}
	return nil
}

// outputError reports a failure to write the output file named by flag,
// without the name of the temporary file it was written to.
func outputError(flag, path string, err error) error {
	var we *atomicfile.WriteError
	if errors.As(err, &we) {
		err = we.Err
	}
	var pe *fs.PathError
	if errors.As(err, &pe) {
		err = pe.Err
	}
	return fmt.Errorf("%s %s: cannot write: %w", dashed(flag), safetext.Line(path), err)
}

// discard removes the temporary file unless it was committed.
func (f *outputFile) discard() { f.pending.Discard() }

// dashed writes an option's name as the help does: -o, --samples.
func dashed(flag string) string {
	if len(flag) == 1 {
		return "-" + flag
	}
	return "--" + flag
}
