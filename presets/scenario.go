package presets

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"path"
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
	// VolumeGiven records that the file set the stressed volume itself; when
	// it did not, a closed circulation's volume is calibrated to the filling
	// pressure (see SetCirculation).
	VolumeGiven bool
}

// BaselineOrParams returns the baseline, or the parameters when there is none.
func (s *Scenario) BaselineOrParams() model.Params {
	if s.Baseline != nil {
		return *s.Baseline
	}
	return s.Params
}

// SetCirculation moves the scenario (and its baseline) to circulation c. Into
// a closed one, a scenario whose file did not give a stressed volume has its
// volume calibrated to its filling pressure, as when it was loaded; into a
// held one, the stressed volume is dropped.
func (s *Scenario) SetCirculation(c model.Circulation) error {
	set := func(p *model.Params) error {
		if p.Circulation == c {
			return nil
		}
		p.Circulation = c
		if c == model.Held {
			p.StressedVolume = 0 // a held circulation has none
		}
		if c != model.Closed || s.VolumeGiven && p.StressedVolume > 0 {
			return p.Validate()
		}
		q, _, err := model.CalibrateVolume(*p)
		if err != nil {
			return fmt.Errorf("%s in the closed circulation: %w", s.Name, err)
		}
		*p = q
		return nil
	}
	if err := set(&s.Params); err != nil {
		return err
	}
	if s.Baseline != nil {
		return set(s.Baseline)
	}
	return nil
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
	circ := model.DefaultCirculation
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
		case "circulation":
			c, err := model.ParseCirculation(v.Value)
			if v.Kind != yaml.ScalarNode || err != nil {
				return nil, fe(v, "circulation", "%q: allowed held (filling pressure held) or closed (blood volume conserved)", v.Value)
			}
			circ = c
		case "params":
			paramsNode = v
		case "baseline":
			baselineNode = v
		default:
			return nil, fe(k, k.Value, "unknown key; allowed: version, name, description, notes, base, circulation, params, baseline")
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
	p, given, err := decodeParams(paramsNode, "params", base, name)
	if err != nil {
		return nil, err
	}
	p.Circulation = circ
	sc.VolumeGiven = given
	if err := settle(&p, given, paramsNode, "params", name); err != nil {
		return nil, err
	}
	sc.Params = p
	if baselineNode != nil && baselineNode.Tag != "!!null" {
		bp, bgiven, err := decodeParams(baselineNode, "baseline", base, name)
		if err != nil {
			return nil, err
		}
		bp.Circulation = circ
		if err := settle(&bp, bgiven, baselineNode, "baseline", name); err != nil {
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
// the mapping come from base. Without base every key is required but those of
// the closed circulation, which come from the default preset, the valve
// lesion and support levers, which are off, and the stressed volume, which
// is calibrated (see settle). It reports whether the stressed volume was
// given.
func decodeParams(n *yaml.Node, path string, base *model.Params, file string) (model.Params, bool, error) {
	p, given, err := decodeParamValues(n, path, base, file)
	if err != nil || base != nil {
		return p, given["stressed_volume_ml"], err
	}
	var missing []string
	var defaults *model.Params
	for _, s := range model.Specs {
		if given[s.Key] || s.Key == "stressed_volume_ml" ||
			s.Key == "filling_pressure_mmhg" && given["stressed_volume_ml"] {
			continue
		}
		if s.Device {
			s.Set(&p, s.Off)
			continue
		}
		if !s.ActsIn(model.Held) {
			if defaults == nil {
				if defaults, err = closedDefaults(); err != nil {
					return p, false, err
				}
			}
			s.Set(&p, s.Get(*defaults))
			continue
		}
		missing = append(missing, s.Key)
	}
	if len(missing) > 0 {
		return p, false, &FileError{File: file, Line: n.Line, Key: path, Msg: "missing " + strings.Join(missing, ", ") +
			" (give every parameter, or name a built-in preset with `base:`)"}
	}
	return p, given["stressed_volume_ml"], nil
}

// closedDefaults returns the default preset's parameters as its file gives
// them: the values of the closed circulation that a scenario leaves out.
func closedDefaults() (*model.Params, error) {
	data, err := builtinFS.ReadFile(path.Join("builtin", Default+".yaml"))
	if err != nil {
		return nil, err
	}
	root, err := decodeSingle(data, "preset "+Default)
	if err != nil {
		return nil, err
	}
	for i := 0; i+1 < len(root.Content); i += 2 {
		if root.Content[i].Value == "params" {
			p, _, err := decodeParamValues(root.Content[i+1], "params", nil, "preset "+Default)
			return &p, err
		}
	}
	return nil, fmt.Errorf("preset %s has no params", Default)
}

// settle completes decoded parameters in their circulation and checks them.
// Closed: without a stressed volume, the volume is calibrated so that the mean
// left-atrial pressure equals the filling pressure; with one and no filling
// pressure, the filling pressure becomes the mean LAP the volume gives; with
// both, they must agree within settleTolerance.
func settle(p *model.Params, volumeGiven bool, n *yaml.Node, key, file string) error {
	fe := func(msg string) error { return &FileError{File: file, Line: n.Line, Key: key, Msg: msg} }
	if p.Circulation == model.Held || !volumeGiven {
		if err := p.Validate(); err != nil && !isKey(err, "stressed_volume_ml") {
			return fe(err.Error())
		}
	}
	if p.Circulation == model.Held {
		return nil
	}
	if !volumeGiven {
		q, _, err := model.CalibrateVolume(*p)
		if err != nil {
			return fe("cannot set the blood volume for filling_pressure_mmhg = " + formatNum(p.FillingPressure) + " mmHg: " + err.Error())
		}
		*p = q
		return nil
	}
	fill := p.FillingPressure
	if !(fill > 0) {
		p.FillingPressure = 8 // any valid value: the solve below replaces it
	}
	if err := p.Validate(); err != nil {
		return fe(err.Error())
	}
	st, err := model.NewSolver().SteadyState(*p, nil)
	if err != nil {
		return fe(err.Error())
	}
	lap := st.Metrics.LAPMean
	if fill > 0 && math.Abs(lap-fill) > settleTolerance {
		return fe(fmt.Sprintf("filling_pressure_mmhg = %s mmHg, but stressed_volume_ml = %s mL gives a mean left-atrial pressure of %.2f mmHg: "+
			"remove stressed_volume_ml to set the volume from the filling pressure, or remove filling_pressure_mmhg to keep the volume",
			formatNum(fill), formatNum(p.StressedVolume), lap))
	}
	if !(fill > 0) {
		p.FillingPressure = lap
	}
	return nil
}

// settleTolerance is how far a closed scenario's filling pressure may lie from
// the mean LAP its stressed volume gives, mmHg (the digits a file rounds to).
const settleTolerance = 0.01

func isKey(err error, key string) bool {
	var pe *model.ParamError
	return errors.As(err, &pe) && pe.Key == key
}

func formatNum(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// decodeParamValues reads the keys and numbers of a params mapping over base
// and reports which keys it saw.
func decodeParamValues(n *yaml.Node, path string, base *model.Params, file string) (model.Params, map[string]bool, error) {
	var p model.Params
	if base != nil {
		p = *base
	}
	if n.Kind != yaml.MappingNode {
		return p, nil, &FileError{File: file, Line: n.Line, Key: path, Msg: "must be a mapping of parameter keys to numbers"}
	}
	seen := map[string]bool{}
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		key := path + "." + k.Value
		if k.Kind != yaml.ScalarNode {
			return p, nil, &FileError{File: file, Line: k.Line, Key: path, Msg: "a key must be plain text"}
		}
		spec, ok := model.SpecByKey(k.Value)
		if !ok {
			return p, nil, &FileError{File: file, Line: k.Line, Key: key, Msg: "unknown parameter (see `pvcouple params`)"}
		}
		if seen[k.Value] {
			return p, nil, &FileError{File: file, Line: k.Line, Key: key, Msg: "duplicate key"}
		}
		seen[k.Value] = true
		x, err := scalarNumber(v)
		if err != nil {
			return p, nil, &FileError{File: file, Line: v.Line, Key: key, Msg: fmt.Sprintf("%v; %s", err, spec.RangeText())}
		}
		if err := spec.Check(x); err != nil {
			return p, nil, &FileError{File: file, Line: v.Line, Key: path, Msg: err.Error()}
		}
		spec.Set(&p, x)
	}
	return p, seen, nil
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
