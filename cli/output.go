package cli

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"strconv"

	"pvcouple/internal/safetext"
	"pvcouple/model"
)

// field is one member of an ordered JSON object.
type field struct {
	Key string
	Val any
}

// object is a JSON object that keeps its members in order.
type object []field

// MarshalJSON writes the members in order.
func (o object) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, f := range o {
		if i > 0 {
			b.WriteByte(',')
		}
		k, _ := json.Marshal(f.Key)
		b.Write(k)
		b.WriteByte(':')
		v, err := json.Marshal(f.Val)
		if err != nil {
			return nil, err
		}
		b.Write(v)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// number is a float that encodes NaN and ±Inf as JSON null.
type number float64

// MarshalJSON writes the shortest exact decimal, or null.
func (n number) MarshalJSON() ([]byte, error) {
	f := float64(n)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, f, 'g', -1, 64), nil
}

// paramsObject lists every parameter by key.
func paramsObject(p model.Params) object {
	o := make(object, 0, len(model.Specs))
	for _, s := range model.Specs {
		o = append(o, field{s.Key, number(s.Get(p))})
	}
	return o
}

// metricsObject lists every metric by key (NaN as null).
func metricsObject(m *model.Metrics) object {
	o := make(object, 0, len(model.MetricSpecs))
	for _, s := range model.MetricSpecs {
		o = append(o, field{s.Key, number(s.Get(m))})
	}
	return o
}

// writeJSON writes v indented, with a final newline. Characters a terminal
// acts on are escaped (safetext.JSON), so the text is safe to print and
// decodes to the same values.
func writeJSON(env *Env, v any) error {
	data, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return err
	}
	data = append(safetext.JSON(data), '\n')
	_, err = env.Stdout.Write(data)
	return outputErr(err)
}

// newStdout buffers a command's standard output. A bufio.Writer keeps the
// first failed write and returns it from every later write and from Flush,
// so a command that ends with flushStdout reports output lost on a full disk
// or a closed pipe instead of exiting 0.
func newStdout(env *Env) *bufio.Writer { return bufio.NewWriterSize(env.Stdout, 1<<16) }

// flushStdout writes out what w holds and reports any write that failed.
func flushStdout(w *bufio.Writer) error { return outputErr(w.Flush()) }

// outputErr words a failure to write the standard output (nil stays nil).
func outputErr(err error) error {
	if err == nil {
		return nil
	}
	return fmt.Errorf("cannot write the output: %w", err)
}

// formatValue formats a number for tables: 4 significant digits, "—" for NaN.
func formatValue(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	a := math.Abs(v)
	switch {
	case a >= 1000:
		return strconv.FormatFloat(v, 'f', 0, 64)
	case a >= 100:
		return strconv.FormatFloat(v, 'f', 1, 64)
	case a >= 10:
		return strconv.FormatFloat(v, 'f', 2, 64)
	case a >= 0.01 || a == 0:
		return strconv.FormatFloat(v, 'f', 3, 64)
	default:
		return strconv.FormatFloat(v, 'g', 3, 64)
	}
}

// seconds rounds a time in seconds to the microsecond, far finer than any
// sampling here, so that sums of periods print as 18, not 18.000000000000004.
func seconds(t float64) float64 { return math.Round(t*1e6) / 1e6 }

// formatCSV formats a number for CSV: shortest exact decimal, empty for NaN.
func formatCSV(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}
