package server

import (
	"crypto/ed25519"
	"crypto/rand"
	"encoding/pem"
	"os"
	"path/filepath"
	"strings"
	"testing"

	gossh "golang.org/x/crypto/ssh"
)

// The host key is made on the first start with mode 0600 and the same key is
// read on the next; a key others can read, or one with a passphrase, is
// refused.
func TestHostKey(t *testing.T) {
	path := filepath.Join(t.TempDir(), "host_key")
	s1, created, err := LoadHostKey(path)
	if err != nil || !created {
		t.Fatalf("first start: created %v, %v", created, err)
	}
	fi, err := os.Stat(path)
	if err != nil || fi.Mode().Perm() != 0o600 {
		t.Fatalf("mode %v (%v), want 0600", fi.Mode().Perm(), err)
	}
	s2, created, err := LoadHostKey(path)
	if err != nil || created {
		t.Fatalf("second start: created %v, %v", created, err)
	}
	if fingerprint(s1.PublicKey()) != fingerprint(s2.PublicKey()) || s1.PublicKey().Type() != gossh.KeyAlgoED25519 {
		t.Errorf("second start read another key, or not Ed25519: %s vs %s", fingerprint(s1.PublicKey()), fingerprint(s2.PublicKey()))
	}
	entries, _ := os.ReadDir(filepath.Dir(path))
	if len(entries) != 1 {
		t.Errorf("%d files beside the key, want the key alone", len(entries))
	}

	if err := os.Chmod(path, 0o644); err != nil {
		t.Fatal(err)
	}
	if _, _, err := LoadHostKey(path); err == nil || !strings.Contains(err.Error(), "mode 0644 lets others read it") {
		t.Errorf("a key readable by others: %v", err)
	}

	_, priv, _ := ed25519.GenerateKey(rand.Reader)
	block, err := gossh.MarshalPrivateKeyWithPassphrase(priv, "", []byte("secret"))
	if err != nil {
		t.Fatal(err)
	}
	locked := filepath.Join(t.TempDir(), "locked")
	if err := os.WriteFile(locked, pem.EncodeToMemory(block), 0o600); err != nil {
		t.Fatal(err)
	}
	if _, _, err := LoadHostKey(locked); err == nil || !strings.Contains(err.Error(), "passphrase") {
		t.Errorf("a key with a passphrase: %v", err)
	}
	dir := t.TempDir()
	if _, _, err := LoadHostKey(dir); err == nil || !strings.Contains(err.Error(), "not a regular file") {
		t.Errorf("a folder as the key: %v", err)
	}
}
