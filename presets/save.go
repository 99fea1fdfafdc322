package presets

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"

	"pvcouple/internal/atomicfile"
	"pvcouple/internal/safetext"
	"pvcouple/model"
)

// ErrExists is returned by SaveScenario when the file exists and force is
// false (also when it appeared while the scenario was written).
var ErrExists = atomicfile.ErrExists

// Marshal returns the scenario as YAML in schema version 1, every parameter
// written with the shortest decimal that reads back exactly, in the order of
// model.Specs. A scenario saved and loaded again solves to the same numbers.
func (s *Scenario) Marshal() ([]byte, error) {
	root := &yaml.Node{Kind: yaml.MappingNode}
	add := func(key string, v *yaml.Node) {
		root.Content = append(root.Content, &yaml.Node{Kind: yaml.ScalarNode, Tag: "!!str", Value: key}, v)
	}
	str := func(v string) *yaml.Node {
		n := &yaml.Node{Kind: yaml.ScalarNode, Tag: "!!str", Value: v}
		if len(v) > 0 && v[len(v)-1] == '\n' {
			n.Style = yaml.LiteralStyle
		}
		return n
	}
	add("version", &yaml.Node{Kind: yaml.ScalarNode, Tag: "!!int", Value: strconv.Itoa(SchemaVersion)})
	add("name", str(s.Name))
	if s.Description != "" {
		add("description", str(s.Description))
	}
	if s.Notes != "" {
		add("notes", str(s.Notes))
	}
	add("params", paramsNode(s.Params))
	if s.Baseline != nil {
		add("baseline", paramsNode(*s.Baseline))
	}
	doc := &yaml.Node{Kind: yaml.DocumentNode, Content: []*yaml.Node{root},
		HeadComment: "pvcouple scenario file. Keys and units: `pvcouple params`; load with --scenario."}
	var b bytes.Buffer
	enc := yaml.NewEncoder(&b)
	enc.SetIndent(2)
	if err := enc.Encode(doc); err != nil {
		return nil, err
	}
	if err := enc.Close(); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

func paramsNode(p model.Params) *yaml.Node {
	n := &yaml.Node{Kind: yaml.MappingNode}
	for _, s := range model.Specs {
		n.Content = append(n.Content,
			&yaml.Node{Kind: yaml.ScalarNode, Tag: "!!str", Value: s.Key},
			numberNode(s.Get(p)))
	}
	return n
}

// numberNode is a YAML scalar holding the shortest decimal that reads back
// as x, tagged as YAML resolves it so that no explicit tag is written.
func numberNode(x float64) *yaml.Node {
	v := strconv.FormatFloat(x, 'g', -1, 64)
	tag := "!!int"
	if strings.ContainsAny(v, ".eE") {
		tag = "!!float"
	}
	return &yaml.Node{Kind: yaml.ScalarNode, Tag: tag, Value: v}
}

// checkText refuses a name, description or notes that a load would refuse.
func (s *Scenario) checkText() error {
	for _, f := range []struct{ key, val string }{{"name", s.Name}, {"description", s.Description}, {"notes", s.Notes}} {
		if err := checkText(f.key, f.val); err != nil {
			return fmt.Errorf("cannot save scenario: its %s %s: %w", f.key, QuoteShort(f.val), err)
		}
	}
	return nil
}

// SaveScenario writes s to path atomically (a temporary file renamed into
// place, so a failure leaves any old file intact). It refuses to replace an
// existing file unless force is set, returning an error wrapping ErrExists.
func SaveScenario(path string, s *Scenario, force bool) error {
	if err := s.checkText(); err != nil {
		return err
	}
	data, err := s.Marshal()
	if err != nil {
		return fmt.Errorf("cannot encode scenario: %w", err)
	}
	if !force {
		if _, err := os.Lstat(path); err == nil {
			return fmt.Errorf("%s: %w (choose another name, or overwrite with --force)", safetext.Line(path), ErrExists)
		} else if !errors.Is(err, fs.ErrNotExist) {
			return fmt.Errorf("cannot save scenario: %w", err)
		}
	}
	if err := atomicfile.WriteFile(path, data, force); err != nil {
		if errors.Is(err, ErrExists) {
			return fmt.Errorf("%s: %w (choose another name, or overwrite with --force)", safetext.Line(path), ErrExists)
		}
		return fmt.Errorf("cannot save scenario: %w", err)
	}
	return nil
}
