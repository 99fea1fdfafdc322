package presets

import (
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"

	"pvcouple/internal/safefile"
	"pvcouple/internal/safetext"
)

// MaxFileSize is the largest scenario or protocol file read, bytes. The
// built-ins are a few kilobytes; the cap keeps a wrong file (a recording, a
// disk image) from being read into memory.
const MaxFileSize = 1 << 20

// readCapped reads a file of at most MaxFileSize bytes; what names the kind of
// file in errors. A path that is not a regular file (a named pipe, a device,
// a folder) is refused before it is opened.
func readCapped(path, what string) ([]byte, error) {
	f, err := safefile.Open(path)
	if err != nil {
		return nil, fmt.Errorf("cannot read %s: %w", what, err)
	}
	defer f.Close()
	return readAllCapped(f, path, what)
}

// readAllCapped reads r to its end, refusing more than MaxFileSize bytes.
func readAllCapped(r io.Reader, name, what string) ([]byte, error) {
	data, err := io.ReadAll(io.LimitReader(r, MaxFileSize+1))
	if err != nil {
		return nil, fmt.Errorf("cannot read %s %s: %w", what, name, err)
	}
	if len(data) > MaxFileSize {
		return nil, &FileError{File: name, Msg: fmt.Sprintf("larger than %d KiB: not a %s file", MaxFileSize>>10, what)}
	}
	return data, nil
}

// checkText refuses control characters in the text field key: notes may
// span lines (newlines and tabs are allowed there); every other text field
// is one line. A name or label is printed on terminals and in tables, where
// an escape sequence would act instead of being read.
func checkText(key, s string) error {
	check := safetext.CheckLine
	if key == "notes" {
		check = safetext.CheckText
	}
	if err := check(s); err != nil {
		if key != "notes" && strings.ContainsAny(s, "\n\r") {
			return errors.New("must be one line")
		}
		return err
	}
	return nil
}

// rejectAliases refuses YAML aliases (*name) and merge keys anywhere in the
// tree. The files are short and flat; an alias could only save typing, and
// refusing it rules out alias bombs whatever the code reading the tree does.
// The walk visits each parsed node once (aliases are not followed), so it is
// linear in the size of the file.
func rejectAliases(n *yaml.Node, file string) error {
	if n == nil {
		return nil
	}
	if n.Kind == yaml.AliasNode {
		return &FileError{File: file, Line: n.Line, Msg: fmt.Sprintf(
			"alias *%s: aliases are not supported here; write the value out", n.Value)}
	}
	if n.Kind == yaml.ScalarNode && n.Tag == "!!merge" {
		return &FileError{File: file, Line: n.Line, Msg: "merge keys (<<) are not supported here; write the keys out"}
	}
	for _, c := range n.Content {
		if err := rejectAliases(c, file); err != nil {
			return err
		}
	}
	return nil
}

// textValue reads a one-line or multi-line text scalar (null reads as "").
func textValue(v *yaml.Node) (string, bool) {
	if v.Kind != yaml.ScalarNode || v.Tag != "!!str" && v.Tag != "!!null" {
		return "", false
	}
	if v.Tag == "!!null" {
		return "", true
	}
	return v.Value, true
}

// wholeNumber reads a YAML integer scalar.
func wholeNumber(v *yaml.Node) (int, bool) {
	if v.Kind != yaml.ScalarNode || v.Tag != "!!int" {
		return 0, false
	}
	n, err := strconv.ParseInt(strings.ReplaceAll(v.Value, "_", ""), 0, 64)
	if err != nil || n < -1<<31 || n > 1<<31-1 {
		return 0, false
	}
	return int(n), true
}

// mappingPairs walks the key–value pairs of a mapping, refusing duplicate keys
// and keys that are not plain text; at names the mapping in errors.
func mappingPairs(n *yaml.Node, at, file string, visit func(k, v *yaml.Node) error) error {
	seen := make(map[string]bool, len(n.Content)/2)
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		if k.Kind != yaml.ScalarNode {
			return &FileError{File: file, Line: k.Line, Key: at, Msg: "a key must be plain text"}
		}
		if seen[k.Value] {
			return &FileError{File: file, Line: k.Line, Key: joinKey(at, k.Value), Msg: "duplicate key"}
		}
		seen[k.Value] = true
		if err := visit(k, v); err != nil {
			return err
		}
	}
	return nil
}

// joinKey appends a key to a dotted key path.
func joinKey(path, key string) string {
	if path == "" {
		return key
	}
	return path + "." + key
}
