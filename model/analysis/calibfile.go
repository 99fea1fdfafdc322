package analysis

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"
)

// CalibrationFile is the small YAML file `pvcouple calibrate` writes and the
// analysis reads (docs/science.md §13):
//
//	version: 1
//	parallel_volume_ml: 12.4   # subtracted from every volume (Baan et al. 1984)
//	alpha: 0.82                # the remainder is divided by it
//	source: saline.csv         # optional: where the values came from
//	notes: free text           # optional
//
// Loading is strict: an unknown or repeated key, a value of the wrong type
// or outside its range is an *InputError naming the file, line, column and
// key.
type CalibrationFile struct {
	Calibration
	Source, Notes string
}

// CalibrationVersion is the version of the calibration file schema.
const CalibrationVersion = 1

// maxCalibrationBytes caps a calibration file: it holds a few lines.
const maxCalibrationBytes = 1 << 16

// LoadCalibration reads a calibration file.
func LoadCalibration(path string) (*CalibrationFile, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("cannot read calibration: %w", err)
	}
	defer f.Close()
	return ReadCalibration(f, path)
}

// ReadCalibration reads a calibration file from r; name labels errors.
func ReadCalibration(r io.Reader, name string) (*CalibrationFile, error) {
	data, err := io.ReadAll(io.LimitReader(r, maxCalibrationBytes+1))
	if err != nil {
		return nil, fmt.Errorf("cannot read calibration %s: %w", name, err)
	}
	ferr := func(n *yaml.Node, key, format string, a ...any) error {
		e := &InputError{File: name, Line: 1, Col: 1, Column: key, Msg: fmt.Sprintf(format, a...)}
		if n != nil && n.Line > 0 {
			e.Line, e.Col = n.Line, max(n.Column, 1)
		}
		return e
	}
	if len(data) > maxCalibrationBytes {
		return nil, ferr(nil, "", "larger than %d KiB: not a calibration file", maxCalibrationBytes>>10)
	}
	if i := bytes.IndexFunc(data, func(r rune) bool { return r < 0x20 && r != '\n' && r != '\r' && r != '\t' || r == 0x7f }); i >= 0 {
		line := bytes.Count(data[:i], []byte{'\n'}) + 1
		col := i - bytes.LastIndexByte(data[:i], '\n')
		return nil, &InputError{File: name, Line: line, Col: col, Msg: fmt.Sprintf("control character %U: a calibration file is plain text", data[i])}
	}
	var doc yaml.Node
	dec := yaml.NewDecoder(bytes.NewReader(data))
	if err := dec.Decode(&doc); err != nil {
		if errors.Is(err, io.EOF) {
			return nil, ferr(nil, "", "file is empty; expected version: %d, parallel_volume_ml and alpha", CalibrationVersion)
		}
		return nil, ferr(nil, "", "not valid YAML: %s", yamlMsg(err))
	}
	var extra yaml.Node
	if err := dec.Decode(&extra); !errors.Is(err, io.EOF) {
		return nil, ferr(&extra, "", "more than one YAML document; a calibration file holds one")
	}
	root := &doc
	if root.Kind == yaml.DocumentNode && len(root.Content) == 1 {
		root = root.Content[0]
	}
	if root.Kind != yaml.MappingNode {
		return nil, ferr(root, "", "a calibration file must be a mapping with version, parallel_volume_ml and alpha")
	}
	c := &CalibrationFile{}
	seen := map[string]*yaml.Node{}
	for i := 0; i+1 < len(root.Content); i += 2 {
		k, v := root.Content[i], root.Content[i+1]
		if k.Kind != yaml.ScalarNode || k.Tag != "!!str" {
			return nil, ferr(k, "", "a key must be plain text")
		}
		key := k.Value
		if seen[key] != nil {
			return nil, ferr(k, key, "duplicate key (first on line %d)", seen[key].Line)
		}
		seen[key] = k
		if v.Kind == yaml.AliasNode || v.Tag == "!!merge" || k.Tag == "!!merge" {
			return nil, ferr(v, key, "aliases and merge keys are not supported here; write the value out")
		}
		switch key {
		case "version":
			n, err := strconv.Atoi(v.Value)
			if v.Kind != yaml.ScalarNode || v.Tag != "!!int" || err != nil || n != CalibrationVersion {
				return nil, ferr(v, key, "%s: this program reads version %d", quoteShort(v.Value), CalibrationVersion)
			}
		case "parallel_volume_ml", "alpha":
			x, err := strconv.ParseFloat(v.Value, 64)
			if v.Kind != yaml.ScalarNode || v.Tag != "!!int" && v.Tag != "!!float" || err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
				return nil, ferr(v, key, "%s is not a number", quoteShort(v.Value))
			}
			if key == "alpha" {
				if !(x >= MinAlpha && x <= MaxAlpha) {
					return nil, ferr(v, key, "%g is out of range; allowed %g to %g (dimensionless)", x, MinAlpha, MaxAlpha)
				}
				c.Alpha = x
			} else {
				if !(math.Abs(x) <= MaxVolumeOffset) {
					return nil, ferr(v, key, "%g is out of range; allowed −%d to %d mL", x, MaxVolumeOffset, MaxVolumeOffset)
				}
				c.ParallelVolume = x
			}
		case "source", "notes":
			if v.Kind != yaml.ScalarNode || v.Tag != "!!str" && v.Tag != "!!null" {
				return nil, ferr(v, key, "must be text")
			}
			if key == "source" {
				c.Source = v.Value
			} else {
				c.Notes = v.Value
			}
		default:
			return nil, ferr(k, key, "unknown key; allowed: version, parallel_volume_ml, alpha, source, notes")
		}
	}
	for _, key := range []string{"version", "parallel_volume_ml", "alpha"} {
		if seen[key] == nil {
			return nil, ferr(root, key, "missing; a calibration file needs version: %d, parallel_volume_ml and alpha", CalibrationVersion)
		}
	}
	return c, nil
}

// yamlMsg strips the package prefix of a YAML error.
func yamlMsg(err error) string {
	return strings.TrimPrefix(err.Error(), "yaml: ")
}

// Marshal writes the file as YAML, numbers with the shortest decimals that
// read back exactly.
func (c *CalibrationFile) Marshal() []byte {
	var b strings.Builder
	fmt.Fprintf(&b, "# pvcouple calibration of conductance volumes: V = (V_signal − parallel_volume_ml) / alpha.\n")
	fmt.Fprintf(&b, "# Read with: pvcouple analyze FILE.csv --calibration THIS.yaml\n")
	fmt.Fprintf(&b, "version: %d\n", CalibrationVersion)
	fmt.Fprintf(&b, "parallel_volume_ml: %s\n", strconv.FormatFloat(c.ParallelVolume, 'g', -1, 64))
	fmt.Fprintf(&b, "alpha: %s\n", strconv.FormatFloat(c.Alpha, 'g', -1, 64))
	for _, kv := range [][2]string{{"source", c.Source}, {"notes", c.Notes}} {
		if kv[1] != "" {
			q, _ := yaml.Marshal(kv[1])
			fmt.Fprintf(&b, "%s: %s", kv[0], q)
		}
	}
	return []byte(b.String())
}
