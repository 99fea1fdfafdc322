package cli

import (
	"errors"
	"fmt"
	"io/fs"
	"os"

	"github.com/google/renameio/v2"
)

// writeNew writes data to path atomically (a temporary file renamed into
// place, so a failure leaves any old file intact). It refuses to replace an
// existing file unless force is set.
func writeNew(path string, data []byte, force bool) error {
	if !force {
		if _, err := os.Lstat(path); err == nil {
			return fmt.Errorf("%s exists; choose another name, or overwrite with --force", path)
		} else if !errors.Is(err, fs.ErrNotExist) {
			return fmt.Errorf("cannot write %s: %w", path, err)
		}
	}
	if err := renameio.WriteFile(path, data, 0o644); err != nil {
		return fmt.Errorf("cannot write %s: %w", path, err)
	}
	return nil
}
