// Package safetext makes text that came from a file or an argument safe to
// print on a terminal, in a table or in a CSV or JSON file, and tells when a
// name or label holds characters that have no place in one.
//
// A terminal acts on control characters: ESC starts sequences that move the
// cursor, retitle the window or rewrite the screen, and a C1 control such as
// U+009B does the same on some terminals. Bidirectional overrides reorder
// what is shown. Line and Text print every such character, and every byte
// that is not UTF-8, as a visible escape (\x1b, \u009b, \xff), so that the
// text can be read but never acts.
package safetext

import (
	"fmt"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Unsafe reports whether r must not reach a terminal as it is: C0 and C1
// controls, DEL, the bidirectional marks, embeddings, overrides and
// isolates, and the Unicode line and paragraph separators.
func Unsafe(r rune) bool {
	switch {
	case unicode.IsControl(r): // C0, DEL, C1
		return true
	case r == '\u061c', r == '\u200e', r == '\u200f', r >= '\u202a' && r <= '\u202e', r >= '\u2066' && r <= '\u2069':
		return true
	case r == '\u2028', r == '\u2029':
		return true
	}
	return false
}

// Line returns s for one line of output: every unsafe character, newlines
// and tabs included, and every invalid byte is written as an escape.
func Line(s string) string { return clean(s, false) }

// Text returns s for output that may span lines: as Line, but newlines and
// tabs are kept.
func Text(s string) string { return clean(s, true) }

func clean(s string, multiline bool) string {
	if safe(s, multiline) {
		return s
	}
	var b strings.Builder
	b.Grow(len(s) + 8)
	for i := 0; i < len(s); {
		r, n := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && n == 1:
			fmt.Fprintf(&b, `\x%02x`, s[i])
		case multiline && (r == '\n' || r == '\t'):
			b.WriteRune(r)
		case r == '\n':
			b.WriteString(`\n`)
		case r == '\t':
			b.WriteString(`\t`)
		case r == '\r':
			b.WriteString(`\r`)
		case r < 0x80 && Unsafe(r):
			fmt.Fprintf(&b, `\x%02x`, r)
		case Unsafe(r):
			fmt.Fprintf(&b, `\u%04x`, r)
		default:
			b.WriteRune(r)
		}
		i += n
	}
	return b.String()
}

// safe reports whether s needs no escape.
func safe(s string, multiline bool) bool {
	for i := 0; i < len(s); {
		if c := s[i]; c >= 0x20 && c < 0x7f {
			i++
			continue
		}
		r, n := utf8.DecodeRuneInString(s[i:])
		if r == utf8.RuneError && n == 1 || Unsafe(r) && !(multiline && (r == '\n' || r == '\t')) {
			return false
		}
		i += n
	}
	return true
}

// CheckLine returns an error when s is not one line of printable text: it
// holds a control character (newline and tab included), a bidirectional
// override or bytes that are not UTF-8. The error says which and where; the
// caller adds the field's name.
func CheckLine(s string) error { return check(s, false) }

// CheckText is CheckLine for text that may span lines: newlines and tabs are
// allowed.
func CheckText(s string) error { return check(s, true) }

func check(s string, multiline bool) error {
	pos := 0
	for i := 0; i < len(s); {
		r, n := utf8.DecodeRuneInString(s[i:])
		pos++
		switch {
		case r == utf8.RuneError && n == 1:
			return fmt.Errorf("byte %d is not UTF-8 text (\\x%02x)", i+1, s[i])
		case multiline && (r == '\n' || r == '\t'):
		case Unsafe(r):
			return fmt.Errorf("character %d is the control character %s; only printable text is allowed", pos, describe(r))
		}
		i += n
	}
	return nil
}

// describe names a rune for an error: its code point and, for the common
// ones, its name.
func describe(r rune) string {
	names := map[rune]string{0: "NUL", '\a': "BEL", '\b': "BS", '\t': "TAB", '\n': "newline", '\r': "carriage return",
		0x1b: "ESC", 0x7f: "DEL", 0x9b: "CSI", 0x9d: "OSC", '\u202e': "right-to-left override"}
	if n, ok := names[r]; ok {
		return fmt.Sprintf("U+%04X (%s)", r, n)
	}
	return fmt.Sprintf("U+%04X", r)
}
