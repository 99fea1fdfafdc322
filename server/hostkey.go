package server

import (
	"crypto/ed25519"
	"crypto/rand"
	"encoding/pem"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"

	gossh "golang.org/x/crypto/ssh"

	"pvcouple/internal/atomicfile"
	"pvcouple/internal/safefile"
)

// maxKeyFile caps the size of a key file read, bytes; keys are a few KiB.
const maxKeyFile = 1 << 20

// LoadHostKey reads the server's private host key from path. If there is no
// file there it creates one, an Ed25519 key in OpenSSH's format with mode
// 0600, and reports created; a later start reuses it, so clients keep
// recognising the server. A key file that others may read (any of the mode's
// group or other bits set) is refused, as sshd refuses one.
func LoadHostKey(path string) (signer gossh.Signer, created bool, err error) {
	fi, err := os.Lstat(path)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		if err := createHostKey(path); err != nil {
			return nil, false, err
		}
		created = true
	case err != nil:
		return nil, false, fmt.Errorf("host key: %w", err)
	case !fi.Mode().IsRegular():
		return nil, false, fmt.Errorf("host key %s: not a regular file (%s)", path, fi.Mode().Type())
	case fi.Mode().Perm()&0o077 != 0:
		return nil, false, fmt.Errorf("host key %s: mode %04o lets others read it; allowed: 0600 or 0400 (chmod 600 %s)",
			path, fi.Mode().Perm(), path)
	}
	data, err := readCapped(path, maxKeyFile)
	if err != nil {
		return nil, false, fmt.Errorf("host key: %w", err)
	}
	signer, err = gossh.ParsePrivateKey(data)
	var missing *gossh.PassphraseMissingError
	switch {
	case errors.As(err, &missing):
		return nil, false, fmt.Errorf("host key %s: it has a passphrase; the server needs a key without one", path)
	case err != nil:
		return nil, false, fmt.Errorf("host key %s: not a private key the server can read: %w", path, err)
	}
	return signer, created, nil
}

// createHostKey writes a new Ed25519 private key to path, mode 0600,
// atomically: a key file is never half written and an existing one is never
// replaced.
func createHostKey(path string) error {
	_, priv, err := ed25519.GenerateKey(rand.Reader)
	if err != nil {
		return fmt.Errorf("host key: %w", err)
	}
	block, err := gossh.MarshalPrivateKey(priv, "pvcouple host key")
	if err != nil {
		return fmt.Errorf("host key: %w", err)
	}
	err = atomicfile.WriteFileMode(path, pem.EncodeToMemory(block), false, 0o600)
	if errors.Is(err, atomicfile.ErrExists) {
		return fmt.Errorf("host key: cannot create %s: %w", path, err)
	}
	if err != nil {
		return fmt.Errorf("host key: %w", err)
	}
	return nil
}

// readCapped reads the file at path, refusing one larger than limit bytes or
// one that is not a regular file (a FIFO would block the read).
func readCapped(path string, limit int64) ([]byte, error) {
	f, err := safefile.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, limit+1))
	if err != nil {
		return nil, err
	}
	if int64(len(data)) > limit {
		return nil, fmt.Errorf("%s: larger than %d KiB", path, limit>>10)
	}
	return data, nil
}
