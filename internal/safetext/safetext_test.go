package safetext

import (
	"encoding/json"
	"strings"
	"testing"
)

// Every class of character a terminal acts on comes out as a visible escape
// (ECMA-48 defines C0 and C1 controls and the CSI/OSC sequences; Unicode
// UAX #9 the bidirectional controls).
func TestLineEscapesEveryControl(t *testing.T) {
	cases := []struct{ in, line, text string }{
		{"plain name", "plain name", "plain name"},
		{"µL and ±", "µL and ±", "µL and ±"},
		{"\x1b]0;pwned\x07", `\x1b]0;pwned\x07`, `\x1b]0;pwned\x07`},
		{"\x1b[2J\x1b[H", `\x1b[2J\x1b[H`, `\x1b[2J\x1b[H`},
		{"a\nb\tc\rd", `a\nb\tc\rd`, "a\nb\tc\\rd"},
		{"del\x7f", `del\x7f`, `del\x7f`},
		{"c1 \u009b31m", `c1 \u009b31m`, `c1 \u009b31m`},
		{"osc \u009d0;x\u009c", `osc \u009d0;x\u009c`, `osc \u009d0;x\u009c`},
		{"rlo \u202egnp.exe", `rlo \u202egnp.exe`, `rlo \u202egnp.exe`},
		{"iso \u2066x\u2069", `iso \u2066x\u2069`, `iso \u2066x\u2069`},
		{"ls \u2028", `ls \u2028`, `ls \u2028`},
		{"bad \xff\xfe utf-8", `bad \xff\xfe utf-8`, `bad \xff\xfe utf-8`},
		{"nul\x00", `nul\x00`, `nul\x00`},
	}
	for _, c := range cases {
		if got := Line(c.in); got != c.line {
			t.Errorf("Line(%q) = %q, want %q", c.in, got, c.line)
		}
		if got := Text(c.in); got != c.text {
			t.Errorf("Text(%q) = %q, want %q", c.in, got, c.text)
		}
		for _, out := range []string{Line(c.in), Text(c.in)} {
			for _, r := range out {
				if Unsafe(r) && r != '\n' && r != '\t' {
					t.Errorf("%q still holds %U", out, r)
				}
			}
		}
		if (CheckLine(c.in) == nil) != (c.in == c.line) {
			t.Errorf("CheckLine(%q) = %v", c.in, CheckLine(c.in))
		}
	}
}

func TestCheckNamesTheCharacter(t *testing.T) {
	err := CheckLine("ab\x1b]0;x\x07")
	if err == nil || !strings.Contains(err.Error(), "character 3") || !strings.Contains(err.Error(), "U+001B (ESC)") {
		t.Errorf("CheckLine: %v", err)
	}
	if err := CheckText("two\nlines\tand a tab"); err != nil {
		t.Errorf("CheckText refuses newlines and tabs: %v", err)
	}
	if err := CheckText("x\rcarriage"); err == nil {
		t.Errorf("CheckText takes a carriage return")
	}
	if err := CheckLine("bad \xff"); err == nil || !strings.Contains(err.Error(), "byte 5") {
		t.Errorf("CheckLine on bad UTF-8: %v", err)
	}
}

// JSON keeps the decoded value and leaves no C1, DEL or override raw.
func TestJSONKeepsValues(t *testing.T) {
	in := map[string]string{"name": "a\u009b31m\x7f\u202eb\x1b[0m µ"}
	data, err := json.MarshalIndent(in, "", "\t")
	if err != nil {
		t.Fatal(err)
	}
	out := JSON(data)
	for _, r := range string(out) {
		if Unsafe(r) && r != '\n' && r != '\t' {
			t.Fatalf("JSON left %U in %s", r, out)
		}
	}
	var back map[string]string
	if err := json.Unmarshal(out, &back); err != nil || back["name"] != in["name"] {
		t.Fatalf("JSON changed the value: %v %q", err, back["name"])
	}
	if plain := []byte(`{"a":1}`); &JSON(plain)[0] != &plain[0] {
		t.Errorf("clean JSON was copied")
	}
}
