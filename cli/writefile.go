package cli

import (
	"errors"
	"fmt"

	"pvcouple/internal/atomicfile"
	"pvcouple/internal/safetext"
)

// writeNew writes data to path atomically (a temporary file beside it given
// its name when complete, so a failure leaves any old file intact). Its
// callers refuse an existing file with checkOutput before their work; unless
// force is set, writeNew refuses one that appeared since.
func writeNew(path string, data []byte, force bool) error {
	if err := atomicfile.WriteFile(path, data, force); err != nil {
		if errors.Is(err, atomicfile.ErrExists) {
			return fmt.Errorf("%s exists; choose another name, or overwrite with --force", safetext.Line(path))
		}
		return err
	}
	return nil
}
