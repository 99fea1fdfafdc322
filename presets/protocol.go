package presets

import (
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strings"

	"go.yaml.in/yaml/v3"

	"pvcouple/internal/safetext"
	"pvcouple/model"
)

// ProtocolVersion is the version of the protocol schema this package reads.
const ProtocolVersion = 1

// Limits of a protocol file. At 70 bpm MaxProtocolBeats is about seven
// minutes of beats, far more than a study step; the cap keeps a file from
// asking for a run that would not end or would not fit in memory.
const (
	MaxProtocolBeats = 500 // beats in the whole protocol
	MaxLabelLength   = 60  // characters of a step label
	MaxFactor        = 100 // largest scale factor
)

// StepKind is what a protocol step does to the levers.
type StepKind string

// The step kinds.
const (
	// StepSet puts levers at new values at the step's first beat and keeps
	// them for the step's beats.
	StepSet StepKind = "set"
	// StepScale multiplies levers by factors at the step's first beat and
	// keeps them for the step's beats.
	StepScale StepKind = "scale"
	// StepRamp moves levers in equal parts from their values at the step's
	// start to their targets, reaching them on the step's last beat.
	StepRamp StepKind = "ramp"
	// StepHold leaves the levers alone for the step's beats.
	StepHold StepKind = "hold"
)

// ChangeMode says how a Change gives its target.
type ChangeMode int

// The change modes.
const (
	// ToValue: the target is Value, in the lever's unit.
	ToValue ChangeMode = iota
	// ByFactor: the target is Value times the lever's value at the step's start.
	ByFactor
	// ToInitial: the target is the lever's value at the start of the run.
	ToInitial
)

// Change is what a step does to one lever.
type Change struct {
	Key   string     // parameter key (see model.Specs)
	Mode  ChangeMode // how Value gives the target
	Value float64    // target (ToValue) or factor (ByFactor); unused for ToInitial
	Line  int        // line of the change in the file
}

// Step is one labelled step of a protocol.
type Step struct {
	Label   string
	Kind    StepKind
	Beats   int      // beats the step lasts, at least 1
	Changes []Change // in file order; empty for hold
	Line    int      // line of the step in the file
}

// Protocol is a named list of steps that change the levers beat by beat.
type Protocol struct {
	Version     int
	Name        string
	Description string
	Notes       string
	Steps       []Step
	Source      string // file name, or "protocol NAME" for a built-in; labels errors
}

// TotalBeats returns the number of beats the protocol runs.
func (pr *Protocol) TotalBeats() int {
	n := 0
	for _, s := range pr.Steps {
		n += s.Beats
	}
	return n
}

// Levers returns the keys of the parameters the protocol changes, in the
// order of model.Specs.
func (pr *Protocol) Levers() []string {
	used := map[string]bool{}
	for _, s := range pr.Steps {
		for _, c := range s.Changes {
			used[c.Key] = true
		}
	}
	var keys []string
	for _, s := range model.Specs {
		if used[s.Key] {
			keys = append(keys, s.Key)
		}
	}
	return keys
}

// ESPVRFixed reports whether the protocol leaves the ESPVR alone (it changes
// neither ees_mmhg_per_ml nor v0_ml), so that the end-systolic points of all
// its loops lie on one line and fitting one ESPVR to the run makes sense; if
// not, why names the lever that moves it.
func (pr *Protocol) ESPVRFixed() (ok bool, why string) {
	for _, k := range pr.Levers() {
		if k == "ees_mmhg_per_ml" || k == "v0_ml" {
			return false, "the protocol changes " + k + ", so its loops do not share one ESPVR"
		}
	}
	return true, ""
}

// LoadProtocol reads and strictly checks a protocol file.
func LoadProtocol(path string) (*Protocol, error) {
	data, err := readCapped(path, "protocol")
	if err != nil {
		return nil, err
	}
	return ParseProtocol(data, path)
}

// ReadProtocol reads a protocol from r (at most MaxFileSize bytes) and
// strictly checks it; name labels errors and names a protocol without one.
func ReadProtocol(r io.Reader, name string) (*Protocol, error) {
	data, err := readAllCapped(r, name, "protocol")
	if err != nil {
		return nil, err
	}
	return ParseProtocol(data, name)
}

// protocolKeys are the keys of a protocol file, in the order of the schema.
const protocolKeys = "version, name, description, notes, steps"

// ParseProtocol strictly decodes a protocol; source labels errors (a file
// name). A protocol without a name takes the file's base name.
func ParseProtocol(data []byte, source string) (*Protocol, error) {
	root, err := decodeSingle(data, source)
	if err != nil {
		return nil, err
	}
	fe := func(n *yaml.Node, key, format string, a ...any) error {
		return &FileError{File: source, Line: n.Line, Key: key, Msg: fmt.Sprintf(format, a...)}
	}
	if root.Kind != yaml.MappingNode {
		return nil, fe(root, "", "a protocol must be a mapping with version, name and steps")
	}
	pr := &Protocol{Source: source}
	var stepsNode *yaml.Node
	err = mappingPairs(root, "", source, func(k, v *yaml.Node) error {
		switch k.Value {
		case "version":
			n, ok := wholeNumber(v)
			if !ok {
				return fe(v, "version", "%q is not a whole number; this program reads version %d", v.Value, ProtocolVersion)
			}
			if n != ProtocolVersion {
				return fe(v, "version", "version %d is not supported; this program reads version %d", n, ProtocolVersion)
			}
			pr.Version = n
		case "name", "description", "notes":
			s, ok := textValue(v)
			if !ok {
				return fe(v, k.Value, "must be text")
			}
			if err := checkText(k.Value, s); err != nil {
				return fe(v, k.Value, "%v", err)
			}
			switch k.Value {
			case "name":
				pr.Name = s
			case "description":
				pr.Description = s
			case "notes":
				pr.Notes = s
			}
		case "steps":
			stepsNode = v
		default:
			return fe(k, k.Value, "unknown key; allowed: %s", protocolKeys)
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	if pr.Version == 0 {
		return nil, fe(root, "version", "missing; add `version: %d`", ProtocolVersion)
	}
	if stepsNode == nil {
		return nil, fe(root, "steps", "missing; list the steps (set, scale, ramp or hold)")
	}
	if pr.Name == "" {
		pr.Name = safetext.Line(strings.TrimSuffix(filepath.Base(source), filepath.Ext(source)))
	}
	if stepsNode.Kind != yaml.SequenceNode || len(stepsNode.Content) == 0 {
		return nil, fe(stepsNode, "steps", "must be a list of one or more steps, each `- label: …` with set, scale, ramp or hold")
	}
	total := 0
	for i, sn := range stepsNode.Content {
		st, err := parseStep(sn, i, source)
		if err != nil {
			return nil, err
		}
		total += st.Beats
		if total > MaxProtocolBeats {
			return nil, fe(sn, stepKey(i), "the protocol reaches %d beats here; at most %d are allowed in all", total, MaxProtocolBeats)
		}
		pr.Steps = append(pr.Steps, st)
	}
	return pr, nil
}

// stepKey names step i (from 0) in errors; steps are numbered from 1 there.
func stepKey(i int) string { return fmt.Sprintf("steps[%d]", i+1) }

// stepKeys are the keys of a step.
const stepKeys = "label, set, scale, ramp, hold, beats"

// parseStep decodes step i of the list.
func parseStep(n *yaml.Node, i int, file string) (Step, error) {
	at := stepKey(i)
	fe := func(n *yaml.Node, key, format string, a ...any) error {
		return &FileError{File: file, Line: n.Line, Key: key, Msg: fmt.Sprintf(format, a...)}
	}
	st := Step{Line: n.Line}
	if n.Kind != yaml.MappingNode {
		return st, fe(n, at, "a step must be a mapping: `- label: …` with one of set, scale, ramp or hold")
	}
	var kindNode, beatsNode *yaml.Node
	err := mappingPairs(n, at, file, func(k, v *yaml.Node) error {
		key := at + "." + k.Value
		switch k.Value {
		case "label":
			s, ok := textValue(v)
			if !ok {
				return fe(v, key, "must be text")
			}
			s = strings.TrimSpace(s)
			if s == "" || strings.ContainsAny(s, "\n\r") || len([]rune(s)) > MaxLabelLength {
				return fe(v, key, "must be one line of 1 to %d characters", MaxLabelLength)
			}
			if err := checkText("label", s); err != nil {
				return fe(v, key, "%v", err)
			}
			st.Label = s
		case "set", "scale", "ramp", "hold":
			if kindNode != nil {
				return fe(k, key, "a step does one thing; it already has %s (split it into two steps)", st.Kind)
			}
			st.Kind, kindNode = StepKind(k.Value), v
		case "beats":
			beatsNode = v
		default:
			return fe(k, key, "unknown key; allowed: %s", stepKeys)
		}
		return nil
	})
	if err != nil {
		return st, err
	}
	if kindNode == nil {
		return st, fe(n, at, "missing what the step does: set, scale, ramp or hold")
	}
	if st.Label == "" {
		return st, fe(n, at+".label", "missing; every step needs a label for the per-beat output")
	}
	beats := func(v *yaml.Node, key string) (int, error) {
		b, ok := wholeNumber(v)
		if !ok || b < 1 || b > MaxProtocolBeats {
			return 0, fe(v, key, "%q: must be a whole number of beats from 1 to %d", v.Value, MaxProtocolBeats)
		}
		return b, nil
	}
	if st.Kind == StepHold {
		if beatsNode != nil {
			return st, fe(beatsNode, at+".beats", "hold gives its beats itself: `hold: %s`", beatsNode.Value)
		}
		st.Beats, err = beats(kindNode, at+".hold")
		return st, err
	}
	switch {
	case beatsNode != nil:
		if st.Beats, err = beats(beatsNode, at+".beats"); err != nil {
			return st, err
		}
	case st.Kind == StepRamp:
		return st, fe(n, at+".beats", "missing; a ramp needs the number of beats it takes")
	default:
		st.Beats = 1
	}
	st.Changes, err = parseChanges(kindNode, st.Kind, at+"."+string(st.Kind), file)
	return st, err
}

// parseChanges decodes the lever mapping of a set, scale or ramp step.
func parseChanges(n *yaml.Node, kind StepKind, at, file string) ([]Change, error) {
	fe := func(n *yaml.Node, key, format string, a ...any) error {
		return &FileError{File: file, Line: n.Line, Key: key, Msg: fmt.Sprintf(format, a...)}
	}
	if n.Kind != yaml.MappingNode || len(n.Content) == 0 {
		return nil, fe(n, at, "must map one or more parameter keys to %s (see `pvcouple params`)", kindHint(kind))
	}
	var changes []Change
	err := mappingPairs(n, at, file, func(k, v *yaml.Node) error {
		key := at + "." + k.Value
		spec, ok := model.SpecByKey(k.Value)
		if !ok {
			return fe(k, key, "unknown parameter (see `pvcouple params`)")
		}
		c := Change{Key: k.Value, Line: v.Line}
		switch {
		case kind == StepScale:
			f, err := factorValue(v)
			if err != nil {
				return fe(v, key, "%v", err)
			}
			c.Mode, c.Value = ByFactor, f
		case v.Kind == yaml.ScalarNode && v.Tag == "!!str" && v.Value == "initial":
			c.Mode = ToInitial
		case kind == StepRamp && v.Kind == yaml.MappingNode:
			f, err := rampFactor(v, key, file)
			if err != nil {
				return err
			}
			c.Mode, c.Value = ByFactor, f
		default:
			x, err := scalarNumber(v)
			if err != nil {
				return fe(v, key, "%v; give a value (%s)%s", err, spec.RangeText(), factorHint(kind))
			}
			if err := spec.Check(x); err != nil {
				return fe(v, key, "%v", err)
			}
			c.Mode, c.Value = ToValue, x
		}
		changes = append(changes, c)
		return nil
	})
	return changes, err
}

// kindHint says what the lever mapping of a step kind holds.
func kindHint(kind StepKind) string {
	switch kind {
	case StepScale:
		return "factors"
	case StepRamp:
		return "targets (a value, `initial` or `{factor: F}`)"
	}
	return "values (or `initial`)"
}

// factorHint lists the other forms a target may take.
func factorHint(kind StepKind) string {
	if kind == StepRamp {
		return ", `initial` or `{factor: F}`"
	}
	return " or `initial`"
}

// rampFactor reads the `{factor: F}` form of a ramp target.
func rampFactor(n *yaml.Node, at, file string) (float64, error) {
	var f float64
	found := false
	err := mappingPairs(n, at, file, func(k, v *yaml.Node) error {
		if k.Value != "factor" {
			return &FileError{File: file, Line: k.Line, Key: at + "." + k.Value, Msg: "unknown key; a ramp target is a value, `initial` or `{factor: F}`"}
		}
		x, err := factorValue(v)
		if err != nil {
			return &FileError{File: file, Line: v.Line, Key: at + ".factor", Msg: err.Error()}
		}
		f, found = x, true
		return nil
	})
	if err == nil && !found {
		err = &FileError{File: file, Line: n.Line, Key: at, Msg: "missing factor: write `{factor: F}`"}
	}
	return f, err
}

// factorValue reads a scale factor: a finite number from 0 to MaxFactor.
func factorValue(v *yaml.Node) (float64, error) {
	f, err := scalarNumber(v)
	if err != nil {
		return 0, fmt.Errorf("%v; a factor is a number from 0 to %d (0.8 is 80 %% of the value)", err, MaxFactor)
	}
	if f < 0 || f > MaxFactor || math.IsNaN(f) {
		return 0, fmt.Errorf("factor %g out of range; allowed 0 to %d (0.8 is 80 %% of the value)", f, MaxFactor)
	}
	return f, nil
}
