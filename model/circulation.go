package model

import (
	"fmt"
	"strings"
)

// Circulation says what the left ventricle is part of.
type Circulation uint8

const (
	// Held fills the ventricle from a left-atrial pressure held at the filling
	// pressure and drains the arterial load to a fixed venous pressure: the
	// ventricle and its load alone, for textbook reasoning. It is the zero
	// value, so parameters made in code without a circulation run held.
	Held Circulation = iota
	// Closed conserves blood volume around systemic arteries and veins, a right
	// atrium and ventricle, pulmonary arteries and veins and a contracting left
	// atrium, so filling follows from what the heart ejects.
	Closed
)

// DefaultCirculation is the circulation a scenario runs in unless it says
// otherwise: the closed one, which answers what a patient's circulation does
// (pacing, pressors and inotropes move filling as in people).
const DefaultCirculation = Closed

// String returns "held" or "closed".
func (c Circulation) String() string {
	switch c {
	case Held:
		return "held"
	case Closed:
		return "closed"
	}
	return fmt.Sprintf("circulation(%d)", uint8(c))
}

// ParseCirculation reads "held" or "closed".
func ParseCirculation(s string) (Circulation, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "held":
		return Held, nil
	case "closed":
		return Closed, nil
	}
	return 0, fmt.Errorf("circulation %q: allowed held (filling pressure held) or closed (blood volume conserved)", s)
}
