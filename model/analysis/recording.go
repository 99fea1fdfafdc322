package analysis

import (
	"fmt"
	"sort"
	"strings"
)

// Sampling rates a recording may have, Hz: from the slowest rate that still
// gives a human beat tens of samples to the 5 kHz some small-animal systems
// record at (common practice, no source). The rate read from a file (after
// rounding to nine significant digits) must lie within them.
const (
	MinRate = 200
	MaxRate = 5000
)

// Recording is a pressure–volume recording read from a file: LV pressure and
// volume (and aortic pressure when the file has it) on a time grid that is
// uniform within each segment. Segments are the stretches between gaps. The
// samples are kept as float32 in blocks (see column); read them with Time,
// Pressure, Volume and Aortic.
type Recording struct {
	Source   string    // file name, for messages
	Rate     float64   // samples per second
	Segments []Segment // the stretches without gaps, in order
	Gaps     []Gap     // the gaps between segments
	Columns  Columns   // which columns were read, and their units
	Rows     int       // data rows read from the file
	Warnings []string  // what was repaired or looks doubtful
	// Species is the hint the file was read with (nil: none given).
	Species *Species
	// Calibration is what was applied to the volumes: V = (V_file − ParallelVolume)/Alpha.
	Calibration Calibration

	p, v, pao column
	hasAortic bool
	// 1st and 99th percentiles of pressure and volume (set by checkPlausible).
	pRange, vRange [2]float64
}

// Calibration of conductance volumes (docs/science.md §13): the parallel
// volume (the conductance of the tissue around the blood, in mL) is
// subtracted, and the remainder divided by the slope factor α.
type Calibration struct {
	ParallelVolume float64 // mL
	Alpha          float64 // dimensionless; 1 leaves the volumes as they are
}

// Span is a half-open range of sample indices.
type Span struct{ From, To int }

// Segment is a stretch of the recording without gaps: samples [From, To) at
// times Start + (i − From)·Step.
type Segment struct {
	Span
	Start float64 // s, time of sample From
	Step  float64 // s between samples
}

// Gap is a stretch of time without samples.
type Gap struct {
	From, To float64 // s: the last sample before and the first after the gap
}

// Columns records the columns a recording was read from.
type Columns struct {
	Time, Pressure, Volume, Aortic     string // header names; Time empty when --rate gave the timing
	TimeUnit, PressureUnit, VolumeUnit string // units the values were read in
	// cells are the places of the header cells of time, pressure, volume and
	// aortic pressure, for messages.
	cells [4]pos
}

// pos is a place in a file: 1-based line and column (in characters).
type pos struct{ line, col int }

// Len is the number of samples.
func (r *Recording) Len() int { return r.p.n }

// HasAortic reports whether the recording has an aortic pressure column.
func (r *Recording) HasAortic() bool { return r.hasAortic }

// Time is the time of sample i, s.
func (r *Recording) Time(i int) float64 {
	k := sort.Search(len(r.Segments), func(k int) bool { return r.Segments[k].To > i })
	s := r.Segments[min(k, len(r.Segments)-1)]
	return s.Start + float64(i-s.From)*s.Step
}

// Pressure is the LV pressure of sample i, mmHg.
func (r *Recording) Pressure(i int) float64 { return r.p.at(i) }

// Volume is the LV volume of sample i, mL (calibrated).
func (r *Recording) Volume(i int) float64 { return r.v.at(i) }

// Aortic is the aortic pressure of sample i, mmHg (NaN without one).
func (r *Recording) Aortic(i int) float64 {
	if !r.hasAortic {
		return nan
	}
	return r.pao.at(i)
}

// Duration is the time from the first to the last sample, s.
func (r *Recording) Duration() float64 {
	if r.Len() == 0 {
		return 0
	}
	return r.Time(r.Len()-1) - r.Time(0)
}

// warnf adds a warning.
func (r *Recording) warnf(format string, a ...any) {
	r.Warnings = append(r.Warnings, fmt.Sprintf(format, a...))
}

// InputError is a problem with a recording file: where it is and what is wrong.
type InputError struct {
	File   string
	Line   int    // 1-based line of the file
	Col    int    // 1-based column (characters) on that line
	Column string // name of the CSV column at fault, if any
	Msg    string
}

// cellErr is the problem msg placed at the header cell of column k (0 time,
// 1 pressure, 2 volume, 3 aortic pressure), naming column unless it is "".
func (r *Recording) cellErr(k int, column, msg string) *InputError {
	c := r.Columns.cells[k]
	return &InputError{File: r.Source, Line: max(c.line, 1), Col: max(c.col, 1), Column: column, Msg: msg}
}

// Error formats the problem as FILE:LINE:COL: column "NAME": message.
func (e *InputError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
		if e.Col > 0 {
			fmt.Fprintf(&b, ":%d", e.Col)
		}
	}
	b.WriteString(": ")
	if e.Column != "" {
		fmt.Fprintf(&b, "column %s: ", quoteShort(e.Column))
	}
	b.WriteString(e.Msg)
	return b.String()
}
