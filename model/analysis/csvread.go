package analysis

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
)

// ReadOptions say how to read a recording file. The zero value finds the
// columns and units from the header.
type ReadOptions struct {
	// TimeCol, PressureCol and VolumeCol name the columns to use (header name,
	// case ignored, or 1-based column number); empty to find them by name.
	TimeCol, PressureCol, VolumeCol string
	// AorticCol names an aortic pressure column; empty to use one found by
	// name, "-" to ignore any.
	AorticCol string
	// Units override those in the column names: TimeUnit "s" or "ms",
	// PressureUnit "mmhg" or "kpa", VolumeUnit "ml" or "ul". Without either,
	// s, mmHg and mL are assumed.
	TimeUnit, PressureUnit, VolumeUnit string
	// Rate is the sampling rate, Hz, for files without a time column.
	Rate float64
	// VolumeOffset is subtracted from every volume, mL (a known parallel
	// conductance or calibration offset).
	VolumeOffset float64
}

// maxFileSize caps the size of a recording file (two hours at 2 kHz fit).
const maxFileSize = 1 << 30

// LoadCSV reads a recording from a CSV file; see ReadCSV.
func LoadCSV(path string, o ReadOptions) (*Recording, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("cannot read recording: %w", err)
	}
	defer f.Close()
	return ReadCSV(f, path, o)
}

// ReadCSV reads a pressure–volume recording: a header line naming the
// columns, then one sample per line. Columns are found by name
// (time_s,pressure_mmhg,volume_ml and common variants such as
// "LV Pressure (mmHg)", "Volume [µl]", "time (ms)", with units converted) or
// named in o. The separator may be a comma, semicolon or tab (with a decimal
// comma then allowed); lines starting with # are comments. Rows with an empty
// or NaN value are left out, short gaps (up to 5 samples) are filled by
// linear interpolation, irregular sampling is resampled to the median rate,
// and longer gaps split the recording into segments, each noted in Warnings.
// Sampling must be 200 to 2000 Hz. Problems are *InputError values naming the
// file, line and column.
func ReadCSV(r io.Reader, name string, o ReadOptions) (*Recording, error) {
	data, err := io.ReadAll(io.LimitReader(r, maxFileSize+1))
	if err != nil {
		return nil, fmt.Errorf("cannot read recording %s: %w", name, err)
	}
	if len(data) > maxFileSize {
		return nil, &InputError{File: name, Msg: fmt.Sprintf("file is larger than %d MiB", maxFileSize>>20)}
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	if err := o.check(); err != nil {
		return nil, &InputError{File: name, Msg: err.Error()}
	}
	delim := sniffDelimiter(data)
	cr := csv.NewReader(bytes.NewReader(data))
	cr.Comma, cr.Comment = delim, '#'
	cr.FieldsPerRecord, cr.TrimLeadingSpace, cr.LazyQuotes, cr.ReuseRecord = -1, true, true, true

	ierr := func(col, format string, a ...any) error {
		return &InputError{File: name, Column: col, Msg: fmt.Sprintf(format, a...)}
	}
	head, err := cr.Read()
	if errors.Is(err, io.EOF) {
		return nil, ierr("", "file is empty; expected a header line such as time_s,pressure_mmhg,volume_ml and one sample per line")
	}
	if err != nil {
		return nil, csvError(name, err)
	}
	names := append([]string(nil), head...)
	headLine, _ := cr.FieldPos(0)
	if allNumbers(names, delim != ',') {
		return nil, &InputError{File: name, Line: headLine, Msg: "the first line holds numbers, not column names; " +
			"add a header line such as time_s,pressure_mmhg,volume_ml"}
	}
	c, err := chooseColumns(names, o, ierr)
	if err != nil {
		return nil, err
	}
	rec := &Recording{Source: name}
	if c.time < 0 && o.Rate > 0 {
		for _, n := range names {
			if classify(n).role == roleTime {
				rec.warnf("--rate %g Hz given: the time column %q is not read", o.Rate, n)
			}
		}
	}
	units, err := resolveUnits(names, c, o, rec)
	if err != nil {
		return nil, &InputError{File: name, Msg: err.Error()}
	}
	rec.Columns = units

	cols := []int{c.time, c.pressure, c.volume, c.aortic}
	need := 0
	for _, i := range cols {
		need = max(need, i+1)
	}
	var t, p, v, pao []float64
	var lines []int
	vals := make([]float64, 4)
	missing, row := 0, 0
	for {
		fields, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, csvError(name, err)
		}
		line, _ := cr.FieldPos(0)
		row++
		if len(fields) < need {
			return nil, &InputError{File: name, Line: line, Msg: fmt.Sprintf(
				"%d fields, but the columns read need %d (the header has %d)", len(fields), need, len(names))}
		}
		gap := false
		for k, i := range cols {
			if i < 0 {
				vals[k] = math.NaN()
				continue
			}
			x, ok, err := parseNumber(fields[i], delim != ',')
			if err != nil {
				return nil, &InputError{File: name, Line: line, Column: names[i], Msg: err.Error()}
			}
			if !ok {
				gap = true
			}
			vals[k] = x
		}
		if gap {
			missing++
			continue
		}
		if c.time < 0 {
			vals[0] = float64(row-1) / o.Rate
		}
		t = append(t, vals[0])
		p = append(p, vals[1])
		v = append(v, vals[2])
		if c.aortic >= 0 {
			pao = append(pao, vals[3])
		}
		lines = append(lines, line)
	}
	rec.Rows = row
	if missing > 0 {
		rec.warnf("%d of %d rows had an empty or NaN value and were left out", missing, row)
	}
	if len(t) < 2 {
		return nil, ierr("", "holds %d usable samples; a recording needs at least a few beats", len(t))
	}
	if err := checkBounds(name, names, c, units, p, v, pao, lines); err != nil {
		return nil, err
	}
	scaleAll(t, timeScale[units.TimeUnit])
	scaleAll(p, pressureScale[units.PressureUnit])
	scaleAll(pao, pressureScale[units.PressureUnit])
	scaleAll(v, volumeScale[units.VolumeUnit])
	for i := range v {
		v[i] -= o.VolumeOffset
	}
	rec.T, rec.P, rec.V, rec.Pao = t, p, v, pao
	if err := rec.setTimeline(lines, o); err != nil {
		return nil, err
	}
	if err := rec.checkPlausible(); err != nil {
		return nil, err
	}
	return rec, nil
}

// check validates the options themselves.
func (o ReadOptions) check() error {
	for _, u := range []struct{ flag, val, allowed string }{
		{"time-unit", o.TimeUnit, "s ms"}, {"pressure-unit", o.PressureUnit, "mmhg kpa"}, {"volume-unit", o.VolumeUnit, "ml ul"},
	} {
		if u.val != "" && !wordSet(u.allowed)[strings.ToLower(u.val)] {
			return fmt.Errorf("--%s %q: allowed %s", u.flag, u.val, strings.Join(strings.Fields(u.allowed), ", "))
		}
	}
	if o.Rate != 0 && !(o.Rate >= MinRate && o.Rate <= MaxRate) {
		return fmt.Errorf("--rate %g: allowed %d to %d Hz", o.Rate, MinRate, MaxRate)
	}
	if math.IsNaN(o.VolumeOffset) || math.Abs(o.VolumeOffset) > 1000 {
		return fmt.Errorf("--volume-offset %g: allowed −1000 to 1000 mL", o.VolumeOffset)
	}
	return nil
}

// Unit conversions to s, mmHg and mL. 1 kPa = 7.50062 mmHg (common practice, no source).
var (
	timeScale     = map[string]float64{"s": 1, "ms": 1e-3}
	pressureScale = map[string]float64{"mmhg": 1, "kpa": 7.50062}
	volumeScale   = map[string]float64{"ml": 1, "ul": 1e-3}
)

func scaleAll(x []float64, k float64) {
	if k == 1 {
		return
	}
	for i := range x {
		x[i] *= k
	}
}

// resolveUnits takes each column's unit from the options, else from its
// name, else the default; an option overriding a name is noted.
func resolveUnits(names []string, c chosen, o ReadOptions, rec *Recording) (Columns, error) {
	cols := Columns{Pressure: names[c.pressure], Volume: names[c.volume]}
	if c.time >= 0 {
		cols.Time = names[c.time]
	}
	if c.aortic >= 0 {
		cols.Aortic = names[c.aortic]
	}
	unit := func(col int, flag, opt, def string) string {
		fromName := ""
		if col >= 0 {
			fromName = classify(names[col]).unit
		}
		opt = strings.ToLower(opt)
		switch {
		case opt != "" && fromName != "" && opt != fromName:
			rec.warnf("column %q is named in %s but --%s %s was given: reading it in %s", names[col], fromName, flag, opt, opt)
			return opt
		case opt != "":
			return opt
		case fromName != "":
			return fromName
		}
		return def
	}
	cols.TimeUnit = unit(c.time, "time-unit", o.TimeUnit, "s")
	cols.PressureUnit = unit(c.pressure, "pressure-unit", o.PressureUnit, "mmhg")
	cols.VolumeUnit = unit(c.volume, "volume-unit", o.VolumeUnit, "ml")
	if c.aortic >= 0 {
		if u := classify(names[c.aortic]).unit; u != "" && u != cols.PressureUnit {
			return cols, fmt.Errorf("column %q is in %s but the LV pressure is read in %s; both pressures must share a unit", names[c.aortic], u, cols.PressureUnit)
		}
	}
	return cols, nil
}

// sniffDelimiter picks comma, semicolon or tab by their count on the first
// line that is not a comment.
func sniffDelimiter(data []byte) rune {
	for len(data) > 0 {
		line := data
		if i := bytes.IndexByte(data, '\n'); i >= 0 {
			line, data = data[:i], data[i+1:]
		} else {
			data = nil
		}
		line = bytes.TrimSpace(line)
		if len(line) == 0 || line[0] == '#' {
			continue
		}
		best, n := ',', bytes.Count(line, []byte{','})
		for _, d := range []rune{';', '\t'} {
			if k := bytes.Count(line, []byte(string(d))); k > n {
				best, n = d, k
			}
		}
		return best
	}
	return ','
}

// allNumbers reports whether every field is a number (a header is missing).
func allNumbers(fields []string, decimalComma bool) bool {
	for _, f := range fields {
		if _, ok, err := parseNumber(f, decimalComma); err != nil || !ok {
			return false
		}
	}
	return true
}

// parseNumber reads a finite number. ok is false for an empty or NaN cell (a
// missing value); err is set for text that is not a number.
func parseNumber(s string, decimalComma bool) (x float64, ok bool, err error) {
	s = strings.TrimSpace(s)
	switch strings.ToLower(s) {
	case "", "nan", "na", "n/a", "-", "null":
		return math.NaN(), false, nil
	}
	x, perr := strconv.ParseFloat(s, 64)
	if perr != nil && decimalComma && strings.Count(s, ",") == 1 && !strings.Contains(s, ".") {
		x, perr = strconv.ParseFloat(strings.Replace(s, ",", ".", 1), 64)
	}
	if perr != nil && !errors.Is(perr, strconv.ErrRange) {
		return 0, false, fmt.Errorf("%s is not a number", quoteShort(s))
	}
	if math.IsInf(x, 0) || math.IsNaN(x) {
		return 0, false, fmt.Errorf("%s is not a finite number", quoteShort(s))
	}
	return x, true, nil
}

// quoteShort quotes s, cut to 40 bytes.
func quoteShort(s string) string {
	if len(s) > 40 {
		return strconv.Quote(s[:40]) + "…"
	}
	return strconv.Quote(s)
}

// csvError turns a CSV syntax error into an InputError with its line.
func csvError(name string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &InputError{File: name, Line: pe.Line, Msg: "not valid CSV: " + pe.Err.Error()}
	}
	return fmt.Errorf("cannot read recording %s: %w", name, err)
}

// maxAbsValue bounds any pressure (mmHg) or volume (mL) a recording may hold:
// beyond it a value is a fault of the file, not a measurement, and would
// overflow the filters.
const maxAbsValue = 1e7

// checkBounds refuses a pressure or volume beyond ±maxAbsValue once
// converted, naming its line.
func checkBounds(name string, names []string, c chosen, u Columns, p, v, pao []float64, lines []int) error {
	for _, col := range []struct {
		x     []float64
		i     int
		scale float64
		unit  string
	}{{p, c.pressure, pressureScale[u.PressureUnit], "mmHg"}, {pao, c.aortic, pressureScale[u.PressureUnit], "mmHg"},
		{v, c.volume, volumeScale[u.VolumeUnit], "mL"}} {
		for k, x := range col.x {
			if math.Abs(x*col.scale) > maxAbsValue {
				return &InputError{File: name, Line: lines[k], Column: names[col.i], Msg: fmt.Sprintf(
					"%g is %g %s, beyond the ±%g %s any recording may hold; check the column and its unit", x, x*col.scale, col.unit, float64(maxAbsValue), col.unit)}
			}
		}
	}
	return nil
}
