package presets

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// ParseNumber reads a number the way scenario files, protocol files, --set
// and --vary all take it: decimal, with an optional sign, fraction and
// exponent (90, 0.85, -3, 1e-3). Hexadecimal (0x10, 0x1p3), octal and binary
// forms, digit separators (1_000), infinities and NaN are refused alike,
// with a message saying which; the value is quoted, escaped and cut short.
func ParseNumber(s string) (float64, error) {
	t := strings.TrimSpace(s)
	u := strings.ToLower(strings.TrimLeft(t, "+-"))
	switch {
	case t == "":
		return 0, fmt.Errorf("%s is not a number", QuoteShort(s))
	case len(u) > 1 && u[0] == '0' && strings.ContainsRune("xob", rune(u[1])):
		return 0, fmt.Errorf("%s is not a decimal number (hexadecimal, octal and binary forms are not taken; write it in decimal)", QuoteShort(s))
	case strings.Contains(u, "inf") || strings.Contains(u, "nan"):
		return 0, fmt.Errorf("%s is not a finite number", QuoteShort(s))
	case strings.Trim(t, "0123456789+-.eE") != "":
		return 0, fmt.Errorf("%s is not a number", QuoteShort(s))
	}
	x, err := strconv.ParseFloat(t, 64)
	if err != nil && !errors.Is(err, strconv.ErrRange) {
		return 0, fmt.Errorf("%s is not a number", QuoteShort(s))
	}
	if err != nil || math.IsInf(x, 0) || math.IsNaN(x) {
		return 0, fmt.Errorf("%s is not a finite number", QuoteShort(s))
	}
	return x, nil
}

// QuoteShort quotes s for a message: escaped (strconv.Quote), and cut to 40
// characters so that a long value is not echoed whole.
func QuoteShort(s string) string {
	if r := []rune(s); len(r) > 40 {
		return strconv.Quote(string(r[:40])) + fmt.Sprintf("… (%d characters)", len(r))
	}
	return strconv.Quote(s)
}
