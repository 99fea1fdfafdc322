package presets

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"

	"pvcouple/internal/safetext"
	"pvcouple/model"
)

// SchemaVersion is the version of the scenario schema this package reads and writes.
const SchemaVersion = 1

// Scenario is a named parameter set with an optional baseline.
type Scenario struct {
	Version     int
	Name        string
	Description string
	Notes       string
	Base        string // built-in preset the parameters were filled from, if any
	Params      model.Params
	Baseline    *model.Params // nil when the scenario names no baseline
}

// BaselineOrParams returns the baseline, or the parameters when there is none.
func (s *Scenario) BaselineOrParams() model.Params {
	if s.Baseline != nil {
		return *s.Baseline
	}
	return s.Params
}

// FileError is an error at a place in a scenario or protocol file.
type FileError struct {
	File string // file name, or "preset NAME" for built-ins
	Line int    // 1-based; 0 if unknown
	Key  string // dotted key path, if any
	Msg  string
}

// Error names the place and says what is wrong, on one line; whatever came
// from the file (a key, a value) is escaped so that it cannot act on a
// terminal.
func (e *FileError) Error() string {
	var b strings.Builder
	b.WriteString(safetext.Line(e.File))
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	b.WriteString(": ")
	if e.Key != "" {
		b.WriteString(safetext.Line(e.Key))
		b.WriteString(": ")
	}
	b.WriteString(safetext.Line(e.Msg))
	return b.String()
}

// LoadScenario reads and strictly checks a scenario file.
func LoadScenario(path string) (*Scenario, error) {
	data, err := readCapped(path, "scenario")
	if err != nil {
		return nil, err
	}
	return ParseScenario(data, path)
}

// ReadScenario reads a scenario from r (at most MaxFileSize bytes) and
// strictly checks it; name labels errors.
func ReadScenario(r io.Reader, name string) (*Scenario, error) {
	data, err := readAllCapped(r, name, "scenario")
	if err != nil {
		return nil, err
	}
	return ParseScenario(data, name)
}

// ParseScenario strictly decodes a scenario; name labels errors (a file name).
func ParseScenario(data []byte, name string) (*Scenario, error) {
	root, err := decodeSingle(data, name)
	if err != nil {
		return nil, err
	}
	fe := func(n *yaml.Node, key, format string, a ...any) error {
		return &FileError{File: name, Line: n.Line, Key: key, Msg: fmt.Sprintf(format, a...)}
	}
	if root.Kind != yaml.MappingNode {
		return nil, fe(root, "", "a scenario must be a mapping with version, name and params")
	}
	sc := &Scenario{}
	var paramsNode, baselineNode *yaml.Node
	seen := map[string]bool{}
	for i := 0; i+1 < len(root.Content); i += 2 {
		k, v := root.Content[i], root.Content[i+1]
		if seen[k.Value] {
			return nil, fe(k, k.Value, "duplicate key")
		}
		seen[k.Value] = true
		switch k.Value {
		case "version":
			n, err := strconv.Atoi(v.Value)
			if v.Kind != yaml.ScalarNode || err != nil {
				return nil, fe(v, "version", "%q is not a whole number; this program reads version %d", v.Value, SchemaVersion)
			}
			if n != SchemaVersion {
				return nil, fe(v, "version", "version %d is not supported; this program reads version %d", n, SchemaVersion)
			}
			sc.Version = n
		case "name", "description", "notes", "base":
			if v.Kind != yaml.ScalarNode || v.Tag != "!!str" && v.Tag != "!!null" {
				return nil, fe(v, k.Value, "must be text")
			}
			if err := checkText(k.Value, v.Value); err != nil {
				return nil, fe(v, k.Value, "%v", err)
			}
			switch k.Value {
			case "name":
				sc.Name = v.Value
			case "description":
				sc.Description = v.Value
			case "notes":
				sc.Notes = v.Value
			case "base":
				sc.Base = v.Value
			}
		case "params":
			paramsNode = v
		case "baseline":
			baselineNode = v
		default:
			return nil, fe(k, k.Value, "unknown key; allowed: version, name, description, notes, base, params, baseline")
		}
	}
	if sc.Version == 0 {
		return nil, fe(root, "version", "missing; add `version: %d`", SchemaVersion)
	}
	if paramsNode == nil {
		return nil, fe(root, "params", "missing; list the parameters (see `pvcouple params`)")
	}
	var base *model.Params
	if sc.Base != "" {
		b, err := builtinScenario(sc.Base)
		if err != nil {
			return nil, fe(root, "base", "%v", err)
		}
		base = &b.Params
	}
	p, err := decodeParams(paramsNode, "params", base, name)
	if err != nil {
		return nil, err
	}
	sc.Params = p
	if baselineNode != nil && baselineNode.Tag != "!!null" {
		bp, err := decodeParams(baselineNode, "baseline", base, name)
		if err != nil {
			return nil, err
		}
		sc.Baseline = &bp
	}
	return sc, nil
}

// decodeSingle parses data as exactly one YAML document.
func decodeSingle(data []byte, name string) (*yaml.Node, error) {
	if len(data) > MaxFileSize {
		return nil, &FileError{File: name, Msg: fmt.Sprintf("larger than %d KiB: not a scenario or protocol file", MaxFileSize>>10)}
	}
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var doc yaml.Node
	if err := dec.Decode(&doc); err != nil {
		if errors.Is(err, io.EOF) {
			return nil, &FileError{File: name, Msg: "file is empty"}
		}
		return nil, &FileError{File: name, Msg: "not valid YAML: " + strings.TrimPrefix(err.Error(), "yaml: ")}
	}
	var extra yaml.Node
	if err := dec.Decode(&extra); !errors.Is(err, io.EOF) {
		line := extra.Line
		return nil, &FileError{File: name, Line: line, Msg: "a second YAML document follows the first; a file holds one"}
	}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) != 1 {
		return nil, &FileError{File: name, Msg: "file holds no YAML document"}
	}
	if err := rejectAliases(doc.Content[0], name); err != nil {
		return nil, err
	}
	return doc.Content[0], nil
}

// decodeParams reads a mapping of parameter keys to numbers. Keys missing from
// the mapping come from base; without base every key is required.
func decodeParams(n *yaml.Node, path string, base *model.Params, file string) (model.Params, error) {
	var p model.Params
	if base != nil {
		p = *base
	}
	if n.Kind != yaml.MappingNode {
		return p, &FileError{File: file, Line: n.Line, Key: path, Msg: "must be a mapping of parameter keys to numbers"}
	}
	seen := map[string]bool{}
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		key := path + "." + k.Value
		if k.Kind != yaml.ScalarNode {
			return p, &FileError{File: file, Line: k.Line, Key: path, Msg: "a key must be plain text"}
		}
		spec, ok := model.SpecByKey(k.Value)
		if !ok {
			return p, &FileError{File: file, Line: k.Line, Key: key, Msg: "unknown parameter (see `pvcouple params`)"}
		}
		if seen[k.Value] {
			return p, &FileError{File: file, Line: k.Line, Key: key, Msg: "duplicate key"}
		}
		seen[k.Value] = true
		x, err := scalarNumber(v)
		if err != nil {
			return p, &FileError{File: file, Line: v.Line, Key: key, Msg: fmt.Sprintf("%v; %s", err, spec.RangeText())}
		}
		if err := spec.Check(x); err != nil {
			return p, &FileError{File: file, Line: v.Line, Key: path, Msg: err.Error()}
		}
		spec.Set(&p, x)
	}
	if base == nil {
		var missing []string
		for _, s := range model.Specs {
			if !seen[s.Key] {
				missing = append(missing, s.Key)
			}
		}
		if len(missing) > 0 {
			return p, &FileError{File: file, Line: n.Line, Key: path, Msg: "missing " + strings.Join(missing, ", ") +
				" (give every parameter, or name a built-in preset with `base:`)"}
		}
	}
	if err := p.Validate(); err != nil {
		return p, &FileError{File: file, Line: n.Line, Key: path, Msg: err.Error()}
	}
	return p, nil
}

// scalarNumber reads a finite number from a YAML scalar. Whatever YAML
// resolves a plain scalar to (0x10 is an integer, 0x1p3 and 1e999 text),
// ParseNumber decides, as for --set; a quoted value is text.
func scalarNumber(v *yaml.Node) (float64, error) {
	switch {
	case v.Kind == yaml.MappingNode:
		return 0, errors.New("a mapping is not a number")
	case v.Kind == yaml.SequenceNode:
		return 0, errors.New("a list is not a number")
	case v.Kind != yaml.ScalarNode || v.Style&(yaml.DoubleQuotedStyle|yaml.SingleQuotedStyle|yaml.LiteralStyle|yaml.FoldedStyle) != 0 ||
		v.Tag != "!!int" && v.Tag != "!!float" && v.Tag != "!!str":
		return 0, fmt.Errorf("%s is not a number", QuoteShort(v.Value))
	}
	return ParseNumber(v.Value)
}
