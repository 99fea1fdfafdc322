package analysis

import (
	"fmt"
	"strings"
)

// Sampling rates a recording may have, Hz: the range of pressure–volume
// catheter systems (common practice, no source).
const (
	MinRate = 200
	MaxRate = 2000
)

// Recording is a pressure–volume recording read from a file: LV pressure and
// volume (and aortic pressure when the file has it) on a time grid that is
// uniform within each segment. Segments are the stretches between gaps.
type Recording struct {
	Source string    // file name, for messages
	T      []float64 // s, as in the file (converted to seconds)
	P      []float64 // LV pressure, mmHg
	V      []float64 // LV volume, mL (any --volume-offset already subtracted)
	Pao    []float64 // aortic pressure, mmHg; nil when the file has none

	Rate     float64  // samples per second
	Segments []Span   // index ranges [From, To) of the stretches without gaps
	Gaps     []Gap    // the gaps between segments
	Columns  Columns  // which columns were read, and their units
	Rows     int      // data rows read from the file
	Warnings []string // what was repaired or looks doubtful
}

// Span is a half-open range of sample indices.
type Span struct{ From, To int }

// Gap is a stretch of time without samples.
type Gap struct {
	From, To float64 // s: the last sample before and the first after the gap
}

// Columns records the columns a recording was read from.
type Columns struct {
	Time, Pressure, Volume, Aortic     string // header names; Time empty when --rate gave the timing
	TimeUnit, PressureUnit, VolumeUnit string // units the values were read in
}

// Duration is the time from the first to the last sample, s.
func (r *Recording) Duration() float64 {
	if len(r.T) == 0 {
		return 0
	}
	return r.T[len(r.T)-1] - r.T[0]
}

// warnf adds a warning.
func (r *Recording) warnf(format string, a ...any) {
	r.Warnings = append(r.Warnings, fmt.Sprintf(format, a...))
}

// InputError is a problem with a recording file: where it is and what is wrong.
type InputError struct {
	File   string
	Line   int    // 1-based line of the file; 0 when the problem is not on one line
	Column string // column name, if any
	Msg    string
}

// Error formats the problem as FILE:LINE: column "NAME": message.
func (e *InputError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	b.WriteString(": ")
	if e.Column != "" {
		fmt.Fprintf(&b, "column %q: ", e.Column)
	}
	b.WriteString(e.Msg)
	return b.String()
}
