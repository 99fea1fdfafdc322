package cli

import (
	"errors"
	"fmt"
	"io/fs"
	"os"

	"pvcouple/internal/atomicfile"
	"pvcouple/internal/safetext"
)

// writeNew writes data to path atomically (a temporary file beside it given
// its name when complete, so a failure leaves any old file intact). It
// refuses to replace an existing file unless force is set, also one that
// appears while the data is written.
func writeNew(path string, data []byte, force bool) error {
	exists := fmt.Errorf("%s exists; choose another name, or overwrite with --force", safetext.Line(path))
	if !force {
		if _, err := os.Lstat(path); err == nil {
			return exists
		} else if !errors.Is(err, fs.ErrNotExist) {
			return fmt.Errorf("cannot write %s: %w", safetext.Line(path), err)
		}
	}
	if err := atomicfile.WriteFile(path, data, force); err != nil {
		if errors.Is(err, atomicfile.ErrExists) {
			return exists
		}
		return err
	}
	return nil
}
