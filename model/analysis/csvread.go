package analysis

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"runtime"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
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
	// VolumeOffset is subtracted from every volume, mL: a known parallel
	// volume (conductance of the tissue around the blood) or another offset.
	VolumeOffset float64
	// Alpha divides the volumes after the offset: the slope factor α of a
	// conductance catheter (docs/science.md §13). 0 means 1.
	Alpha float64
	// Species is a hint of the species recorded (nil: none); see Species.
	Species *Species
}

// Caps of what a recording may hold (common practice, no source): 2^24
// samples is 4.6 hours at 1 kHz or 56 minutes at 5 kHz; MaxFileBytes leaves
// 64 bytes a row. A file beyond either is refused as soon as it is reached,
// so an endless stream or a device costs bounded memory and time.
const (
	MaxSamples   = 1 << 24
	MaxFileBytes = MaxSamples * 64
)

// maxSamples and maxFileBytes are MaxSamples and MaxFileBytes, lowered by tests.
var (
	maxSamples   = MaxSamples
	maxFileBytes = int64(MaxFileBytes)
)

// largeRecording is the number of samples beyond which reading ends with a
// garbage collection (15 minutes at 1 kHz).
const largeRecording = 1 << 20

// Allowed ranges of the calibration (common practice, no source; α of
// conductance catheters is usually found between 0.3 and 1.5, from memory).
const (
	MaxVolumeOffset = 1000 // mL, either sign
	MinAlpha        = 0.1
	MaxAlpha        = 5.0
)

// ReadCSV reads a pressure–volume recording from r (name labels messages):
// a header line naming the columns, then one sample per line. Columns are
// found by name (time_s,pressure_mmhg,volume_ml and common variants such as
// "LV Pressure (mmHg)", "Volume [µL]", "time (ms)", with units converted) or
// named in o. The separator may be a comma, semicolon or tab (with a decimal
// comma then allowed); cells may be quoted; blank lines and lines starting
// with # are skipped. Rows with an empty or NaN value are left out, short gaps
// (up to 5 samples) are filled by linear interpolation, irregular sampling is
// resampled to the median rate, and longer gaps split the recording into
// segments, each noted in Warnings. Sampling must be MinRate to MaxRate Hz.
//
// The file is read a line at a time and only the samples are kept (4 bytes
// each, 8 more for the times while reading), so memory grows with the
// samples, never with the text; beyond MaxSamples or MaxFileBytes reading
// stops with an error. Problems are *InputError values naming the file, line
// and column.
func ReadCSV(r io.Reader, name string, o ReadOptions) (*Recording, error) {
	if err := o.Check(); err != nil {
		return nil, err
	}
	if st, ok := r.(interface{ Stat() (os.FileInfo, error) }); ok {
		if fi, err := st.Stat(); err == nil && fi.Mode().IsRegular() && fi.Size() > MaxFileBytes {
			return nil, &InputError{File: name, Line: 1, Col: 1, Msg: fmt.Sprintf(
				"the file holds %d MiB, more than the %d MiB a recording may have", fi.Size()>>20, MaxFileBytes>>20)}
		}
	}
	rd := &reader{lr: newLineReader(&capReader{r: r}, name), name: name, o: o}
	rec, err := rd.read()
	if err != nil {
		return nil, rd.explain(err)
	}
	return rec, nil
}

// Check validates the options themselves; the errors name the flag, the
// value and the allowed values or range.
func (o ReadOptions) Check() error {
	for _, u := range []struct{ flag, val, allowed string }{
		{"time-unit", o.TimeUnit, "s ms"}, {"pressure-unit", o.PressureUnit, "mmhg kpa"}, {"volume-unit", o.VolumeUnit, "ml ul"},
	} {
		if u.val != "" && !wordSet(u.allowed)[strings.ToLower(u.val)] {
			return fmt.Errorf("--%s %s: allowed %s", u.flag, quoteShort(u.val), strings.Join(strings.Fields(u.allowed), ", "))
		}
	}
	if o.Rate != 0 && !(o.Rate >= MinRate && o.Rate <= MaxRate) {
		return fmt.Errorf("--rate %g: allowed %d to %d Hz", o.Rate, MinRate, MaxRate)
	}
	if !(math.Abs(o.VolumeOffset) <= MaxVolumeOffset) {
		return fmt.Errorf("--volume-offset %g: allowed −%d to %d mL", o.VolumeOffset, MaxVolumeOffset, MaxVolumeOffset)
	}
	if o.Alpha != 0 && !(o.Alpha >= MinAlpha && o.Alpha <= MaxAlpha) {
		return fmt.Errorf("--alpha %g: allowed %g to %g (dimensionless)", o.Alpha, MinAlpha, MaxAlpha)
	}
	return nil
}

// capReader stops reading past MaxFileBytes.
type capReader struct {
	r io.Reader
	n int64
}

var errTooLarge = errors.New("too large")

func (c *capReader) Read(p []byte) (int, error) {
	if c.n > maxFileBytes {
		return 0, errTooLarge
	}
	n, err := c.r.Read(p)
	c.n += int64(n)
	return n, err
}

// reader is the state of one ReadCSV.
type reader struct {
	lr    *lineReader
	name  string
	o     ReadOptions
	names []string
	cells []pos // header cells
	delim byte
}

// explain turns an I/O error into an error naming the file and line.
func (rd *reader) explain(err error) error {
	var ie *InputError
	switch {
	case errors.As(err, &ie):
		return err
	case errors.Is(err, errTooLarge):
		return rd.lr.errf(1, "the file is larger than %d MiB, more than a recording may have (an endless stream or a device?)", maxFileBytes>>20)
	}
	return fmt.Errorf("cannot read recording %s: %w", rd.name, err)
}

// at is an InputError at a header cell (i < 0: the header line).
func (rd *reader) at(i int, format string, a ...any) error {
	e := &InputError{File: rd.name, Line: 1, Col: 1, Msg: fmt.Sprintf(format, a...)}
	if len(rd.cells) > 0 {
		e.Line = rd.cells[0].line
	}
	if i >= 0 && i < len(rd.cells) {
		e.Line, e.Col, e.Column = rd.cells[i].line, rd.cells[i].col, rd.names[i]
	}
	return e
}

// header reads the header line: the first line that is not blank or a comment.
func (rd *reader) header() error {
	lr := rd.lr
	if err := lr.start(); err != nil {
		return err
	}
	var line []byte
	for skipped := 0; ; skipped++ {
		b, err := lr.next()
		if errors.Is(err, io.EOF) {
			lr.line = max(lr.line, 1)
			return lr.errf(1, "file is empty; expected a header line such as time_s,pressure_mmhg,volume_ml and one sample per line")
		}
		if err != nil {
			return err
		}
		if !isComment(b) {
			line = b
			break
		}
		if skipped >= maxLeadLines {
			return lr.errf(1, "no header line in the first %d lines (all blank or comments)", maxLeadLines)
		}
	}
	latin1 := !utf8.Valid(line)
	if latin1 {
		// Lab software often writes µ as the Latin-1 byte 0xB5.
		rs := make([]rune, len(line))
		for i, c := range line {
			rs[i] = rune(c)
		}
		line = []byte(string(rs))
	}
	rd.delim = sniffDelimiter(line)
	cells, at, msg := splitLine(line, rd.delim, nil)
	if at >= 0 {
		return lr.errf(runeCol(line, at), "%s", msg)
	}
	for _, c := range cells {
		col := runeCol(line, c.at)
		for k, r := range string(c.text) {
			if unicode.IsControl(r) {
				return lr.errf(col+utf8.RuneCount(c.text[:k]), "control character %U in a column name; names must be printable text", r)
			}
		}
		rd.names = append(rd.names, strings.TrimSpace(string(c.text)))
		rd.cells = append(rd.cells, pos{lr.line, col})
	}
	if latin1 {
		return errLatin1
	}
	return nil
}

// errLatin1 says the header was read as Latin-1; it is a warning, not a failure.
var errLatin1 = errors.New("latin-1 header")

// read reads the whole recording.
func (rd *reader) read() (*Recording, error) {
	o := rd.o
	rec := &Recording{Source: rd.name, Species: o.Species, Calibration: Calibration{ParallelVolume: o.VolumeOffset, Alpha: 1}}
	if o.Alpha != 0 {
		rec.Calibration.Alpha = o.Alpha
	}
	if err := rd.header(); errors.Is(err, errLatin1) {
		rec.warnf("the header line is not UTF-8; it was read as Latin-1 (so byte B5 reads as µ)")
	} else if err != nil {
		return nil, err
	}
	names := rd.names
	decimalComma := rd.delim != ','
	if allNumbers(names, decimalComma) {
		return nil, rd.at(-1, "the first line holds numbers, not column names; add a header line such as time_s,pressure_mmhg,volume_ml")
	}
	c, err := chooseColumns(names, o, rd.at)
	if err != nil {
		return nil, err
	}
	if c.time < 0 && o.Rate > 0 {
		for _, n := range names {
			if classify(n).role == roleTime {
				rec.warnf("--rate %g Hz given: the time column %q is not read", o.Rate, n)
			}
		}
	}
	units, err := resolveUnits(names, c, o, rec)
	if err != nil {
		return nil, rd.at(c.aortic, "%v", err)
	}
	for k, i := range []int{c.time, c.pressure, c.volume, c.aortic} {
		if i >= 0 {
			units.cells[k] = rd.cells[i]
		}
	}
	rec.Columns = units
	rec.hasAortic = c.aortic >= 0

	cols := []int{c.time, c.pressure, c.volume, c.aortic}
	scales := []float64{timeScale[units.TimeUnit], pressureScale[units.PressureUnit], volumeScale[units.VolumeUnit], pressureScale[units.PressureUnit]}
	need := 0
	for _, i := range cols {
		need = max(need, i+1)
	}
	var t times
	var vals [4]float64
	var cells []cell
	missing, row, prevLine, skipped := 0, 0, 0, 0
	lr := rd.lr
	for {
		line, err := lr.next()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, err
		}
		if isComment(line) {
			if skipped++; skipped > maxLeadLines {
				return nil, lr.errf(1, "%d blank or comment lines in a row: not a recording (or an endless stream)", maxLeadLines)
			}
			continue
		}
		skipped = 0
		var at int
		var msg string
		if cells, at, msg = splitLine(line, rd.delim, cells); at >= 0 {
			return nil, lr.errf(runeCol(line, at), "%s", msg)
		}
		if row++; row > maxSamples {
			return nil, lr.errf(1, "more than %d rows, more than a recording may have (4.6 hours at 1 kHz); split the file", maxSamples)
		}
		if len(cells) < need {
			return nil, lr.errf(runeCol(line, len(line)), "%d fields, but the columns read need %d (the header has %d)", len(cells), need, len(names))
		}
		gap := false
		for k, i := range cols {
			if i < 0 {
				vals[k] = nan
				continue
			}
			x, ok, err := parseNumber(cells[i].text, decimalComma)
			if err != nil {
				return nil, &InputError{File: rd.name, Line: lr.line, Col: runeCol(line, cells[i].at), Column: names[i], Msg: err.Error()}
			}
			if !ok {
				gap = true
				continue
			}
			x *= scales[k]
			if k > 0 && math.Abs(x) > maxAbsValue {
				unit := "mmHg"
				if k == 2 {
					unit = "mL"
				}
				return nil, &InputError{File: rd.name, Line: lr.line, Col: runeCol(line, cells[i].at), Column: names[i], Msg: fmt.Sprintf(
					"%s is %g %s, beyond the ±%g %s any recording may hold; check the column and its unit", quoteShort(string(cells[i].text)), x, unit, float64(maxAbsValue), unit)}
			}
			vals[k] = x
		}
		if gap {
			missing++
			continue
		}
		if c.time < 0 {
			vals[0] = float64(row-1) / o.Rate
		} else if t.n > 0 && !(vals[0] > t.at(t.n-1)) {
			return nil, &InputError{File: rd.name, Line: lr.line, Col: runeCol(line, cells[c.time].at), Column: names[c.time], Msg: fmt.Sprintf(
				"time %g s is not after the previous sample's %g s (line %d); times must increase", vals[0], t.at(t.n-1), prevLine)}
		}
		t.push(vals[0])
		rec.p.push(vals[1])
		rec.v.push((vals[2] - o.VolumeOffset) / rec.Calibration.Alpha)
		if rec.hasAortic {
			rec.pao.push(vals[3])
		}
		prevLine = lr.line
	}
	rec.Rows = row
	if missing > 0 {
		rec.warnf("%d of %d rows had an empty or NaN value and were left out", missing, row)
	}
	if t.n < 2 {
		return nil, rd.at(-1, "holds %d usable samples; a recording needs at least a few beats", t.n)
	}
	if err := rec.setTimeline(&t); err != nil {
		return nil, err
	}
	if t.n > largeRecording {
		// The times are a third of a long recording's memory and are no
		// longer needed: return them before the analysis allocates its own.
		t = times{}
		runtime.GC()
	}
	if err := rec.checkPlausible(rd); err != nil {
		return nil, err
	}
	return rec, nil
}

var nan = math.NaN()

// Unit conversions to s, mmHg and mL. 1 kPa = 7.50062 mmHg (common practice, no source).
var (
	timeScale     = map[string]float64{"s": 1, "ms": 1e-3}
	pressureScale = map[string]float64{"mmhg": 1, "kpa": 7.50062}
	volumeScale   = map[string]float64{"ml": 1, "ul": 1e-3}
)

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
			return cols, fmt.Errorf("column is in %s but the LV pressure is read in %s; both pressures must share a unit", u, cols.PressureUnit)
		}
	}
	return cols, nil
}

// allNumbers reports whether every field is a number (a header is missing).
func allNumbers(fields []string, decimalComma bool) bool {
	for _, f := range fields {
		if _, ok, err := parseNumber([]byte(f), decimalComma); err != nil || !ok {
			return false
		}
	}
	return true
}

// parseNumber reads a finite number. ok is false for an empty or NaN cell (a
// missing value); err is set for text that is not a number.
func parseNumber(b []byte, decimalComma bool) (x float64, ok bool, err error) {
	b = trimSpace(b)
	switch len(b) {
	case 0:
		return nan, false, nil
	case 1, 2, 3, 4:
		switch strings.ToLower(string(b)) {
		case "nan", "na", "n/a", "-", "null":
			return nan, false, nil
		}
	}
	x, perr := strconv.ParseFloat(string(b), 64)
	if perr != nil && decimalComma {
		if s := string(b); strings.Count(s, ",") == 1 && !strings.Contains(s, ".") {
			x, perr = strconv.ParseFloat(strings.Replace(s, ",", ".", 1), 64)
		}
	}
	if perr != nil && !errors.Is(perr, strconv.ErrRange) {
		return 0, false, fmt.Errorf("%s is not a number", quoteShort(string(b)))
	}
	if math.IsInf(x, 0) || math.IsNaN(x) {
		return 0, false, fmt.Errorf("%s is not a finite number", quoteShort(string(b)))
	}
	return x, true, nil
}

// trimSpace trims ASCII spaces and tabs.
func trimSpace(b []byte) []byte {
	for len(b) > 0 && (b[0] == ' ' || b[0] == '\t') {
		b = b[1:]
	}
	for len(b) > 0 && (b[len(b)-1] == ' ' || b[len(b)-1] == '\t') {
		b = b[:len(b)-1]
	}
	return b
}

// quoteShort quotes s (control characters escaped), cut to 40 bytes.
func quoteShort(s string) string {
	if len(s) > 40 {
		cut := 40
		for cut > 0 && !utf8.RuneStart(s[cut]) {
			cut--
		}
		return strconv.Quote(s[:cut]) + "…"
	}
	return strconv.Quote(s)
}

// maxAbsValue bounds any pressure (mmHg) or volume (mL) a recording may hold:
// beyond it a value is a fault of the file, not a measurement, and would
// overflow the filters.
const maxAbsValue = 1e7
