package server

import (
	"bufio"
	"bytes"
	"fmt"
	"regexp"
	"strconv"
	"strings"

	gossh "golang.org/x/crypto/ssh"
)

// namePattern is what a fellow's name may be: it names a folder, so it is
// short, lower case and free of separators.
var namePattern = regexp.MustCompile(`^[a-z0-9._-]{1,32}$`)

// CheckName reports whether name may name a fellow: 1 to 32 of a–z, 0–9,
// '.', '_' and '-', and not made of dots alone ("." and ".." are folders
// already).
func CheckName(name string) error {
	if !namePattern.MatchString(name) || strings.Trim(name, ".") == "" {
		return fmt.Errorf("name %s: a fellow's name is 1 to 32 of a-z, 0-9, '.', '_', '-', and not dots alone",
			strconv.Quote(name))
	}
	return nil
}

// nameOption is the authorized-keys option that names the fellow of a key,
// as in `name="alice" ssh-ed25519 AAAA… laptop`. Without it the key's comment
// is the name.
const nameOption = "name"

// harmlessOptions are OpenSSH options that ask for what the server does for
// every key anyway; a line may carry them, so that one file can serve sshd
// and pvcouple. Any other option is refused, since the server would not
// honour it.
var harmlessOptions = map[string]bool{
	"restrict":            true,
	"no-port-forwarding":  true,
	"no-agent-forwarding": true,
	"no-x11-forwarding":   true,
	"no-user-rc":          true,
}

// Keyring maps the authorized keys to their fellows' names.
type Keyring struct {
	byKey map[string]string // key in wire format → name
	lines map[string]int    // key in wire format → line, for duplicates
}

// Lookup returns the name of the fellow whose key k is.
func (r *Keyring) Lookup(k gossh.PublicKey) (name string, ok bool) {
	if r == nil || k == nil {
		return "", false
	}
	name, ok = r.byKey[string(k.Marshal())]
	return name, ok
}

// Len returns the number of keys.
func (r *Keyring) Len() int { return len(r.byKey) }

// Fellows returns the number of distinct names.
func (r *Keyring) Fellows() int {
	seen := map[string]bool{}
	for _, n := range r.byKey {
		seen[n] = true
	}
	return len(seen)
}

// LoadAuthorizedKeys reads an authorized-keys file (see ParseAuthorizedKeys).
func LoadAuthorizedKeys(path string) (*Keyring, error) {
	data, err := readCapped(path, maxKeyFile)
	if err != nil {
		return nil, fmt.Errorf("authorized keys: %w", err)
	}
	return ParseAuthorizedKeys(data, path)
}

// ParseAuthorizedKeys reads an authorized-keys file in OpenSSH's format: one
// public key a line, optionally preceded by options and followed by a
// comment; blank lines and lines starting with # are skipped. Each key
// belongs to the fellow named by its name="…" option or, without one, by its
// comment, and the name must pass CheckName. A fellow may have several keys;
// one key may not belong to two fellows. Loading is strict: any line that
// cannot be read refuses the whole file, with file and line in the error, so
// a typo never silently locks a fellow out or lets a key in under another
// name. file labels errors.
func ParseAuthorizedKeys(data []byte, file string) (*Keyring, error) {
	r := &Keyring{byKey: map[string]string{}, lines: map[string]int{}}
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 0, 64<<10), maxKeyFile)
	n := 0
	for sc.Scan() {
		n++
		line := bytes.TrimSpace(sc.Bytes())
		if len(line) == 0 || line[0] == '#' {
			continue
		}
		name, key, err := parseKeyLine(line)
		if err != nil {
			return nil, fmt.Errorf("%s:%d: %w", file, n, err)
		}
		wire := string(key.Marshal())
		if old, ok := r.byKey[wire]; ok && old != name {
			return nil, fmt.Errorf("%s:%d: this key is also on line %d for %s: one key belongs to one fellow",
				file, n, r.lines[wire], strconv.Quote(old))
		}
		r.byKey[wire], r.lines[wire] = name, n
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("%s:%d: %w", file, n+1, err)
	}
	return r, nil
}

// parseKeyLine reads one line of an authorized-keys file.
func parseKeyLine(line []byte) (name string, key gossh.PublicKey, err error) {
	key, comment, options, rest, err := gossh.ParseAuthorizedKey(line)
	if err != nil {
		return "", nil, fmt.Errorf("not an OpenSSH public key line: %w", err)
	}
	if len(bytes.TrimSpace(rest)) > 0 {
		return "", nil, fmt.Errorf("more than one key on the line")
	}
	if _, ok := key.(*gossh.Certificate); ok {
		return "", nil, fmt.Errorf("a certificate (%s): list the fellow's public key itself", key.Type())
	}
	fromOption := false
	for _, o := range options {
		k, v, hasValue := strings.Cut(o, "=")
		k = strings.ToLower(k)
		switch {
		case k == nameOption && hasValue:
			if fromOption {
				return "", nil, fmt.Errorf("two %s= options", nameOption)
			}
			u, err := strconv.Unquote(v)
			if err != nil || !strings.HasPrefix(v, `"`) {
				return "", nil, fmt.Errorf("option %s: write the name in double quotes, as name=\"alice\"", o)
			}
			name, fromOption = u, true
		case harmlessOptions[k] && !hasValue:
		default:
			return "", nil, fmt.Errorf("option %s is not supported by pvcouple serve (only %s=\"…\" and %s)",
				strconv.Quote(o), nameOption, strings.Join(harmlessList(), ", "))
		}
	}
	if !fromOption {
		name = strings.TrimSpace(comment)
		if name == "" {
			return "", nil, fmt.Errorf("no name for this key: add %s=\"NAME\" before it, or NAME as its comment", nameOption)
		}
	}
	if err := CheckName(name); err != nil {
		if !fromOption {
			return "", nil, fmt.Errorf("the comment is taken as the fellow's name: %w; or give %s=\"NAME\" before the key", err, nameOption)
		}
		return "", nil, err
	}
	return name, key, nil
}

// harmlessList lists harmlessOptions in a fixed order for messages.
func harmlessList() []string {
	return []string{"restrict", "no-port-forwarding", "no-agent-forwarding", "no-X11-forwarding", "no-user-rc"}
}
