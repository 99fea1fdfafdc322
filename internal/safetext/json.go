package safetext

import (
	"bytes"
	"fmt"
	"unicode/utf8"
)

// JSON rewrites JSON text so that it holds no character a terminal acts on:
// encoding/json already escapes C0 controls, and JSON escapes DEL, the C1
// controls and the bidirectional overrides as \uXXXX here. The text decodes
// to the same values: outside strings JSON holds only ASCII punctuation,
// digits, letters and white space, so every character changed is inside a
// string.
func JSON(data []byte) []byte {
	clean := true
	for _, c := range data {
		if c == 0x7f || c >= 0x80 {
			clean = false
			break
		}
	}
	if clean {
		return data
	}
	var b bytes.Buffer
	b.Grow(len(data) + 16)
	for i := 0; i < len(data); {
		r, n := utf8.DecodeRune(data[i:])
		// C0 controls appear only as JSON's white space (inside strings
		// encoding/json escapes them).
		if r >= 0x20 && r != utf8.RuneError && Unsafe(r) {
			fmt.Fprintf(&b, `\u%04x`, r)
		} else {
			b.Write(data[i : i+n])
		}
		i += n
	}
	return b.Bytes()
}
