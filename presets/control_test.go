package presets

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pvcouple/internal/safetext"
)

// hostile are text values a shared file may carry, written as YAML
// double-quoted escapes (YAML 1.2 §5.7): an OSC window-title sequence, a
// screen clear, an 8-bit CSI, DEL, a right-to-left override and a newline.
var hostile = []struct{ name, yaml, what string }{
	{"OSC title", `"\e]0;owned\a"`, "U+001B (ESC)"},
	{"clear screen", `"x\e[2J"`, "U+001B (ESC)"},
	{"C1 CSI", `"x\u009b31m"`, "U+009B (CSI)"},
	{"DEL", `"x\x7f"`, "U+007F (DEL)"},
	{"bidi override", `"abc\u202Etxt.exe"`, "U+202E (right-to-left override)"},
	{"NUL", `"a\0b"`, "U+0000 (NUL)"},
}

// clean fails if an error message holds anything a terminal acts on.
func clean(t *testing.T, err error) {
	t.Helper()
	if s := err.Error(); s != safetext.Line(s) {
		t.Errorf("error not escaped: %q", s)
	}
}

// Scenario and protocol text fields refuse control characters, naming the
// file, line, key and character; notes may span lines but refuse the rest.
func TestTextFieldsRefuseControlCharacters(t *testing.T) {
	scen := func(key, val string) string {
		return "version: 1\nname: ok\nbase: normal\nparams: {}\n" + key + ": " + val + "\n"
	}
	proto := func(key, val string) string {
		return "version: 1\nsteps:\n  - {label: a, hold: 1}\n" + key + ": " + val + "\n"
	}
	label := func(_, val string) string {
		return "version: 1\nsteps:\n  - label: " + val + "\n    hold: 1\n"
	}
	type parser func(string) error
	parseS := func(doc string) error { _, err := ParseScenario([]byte(doc), "s.yaml"); return err }
	parseP := func(doc string) error { _, err := ParseProtocol([]byte(doc), "s.yaml"); return err }
	for _, c := range []struct {
		kind, key string
		doc       func(key, val string) string
		parse     parser
		line      string
	}{
		{"scenario", "name", func(k, v string) string { return strings.Replace(scen(k, v), "name: ok\n", "", 1) }, parseS, "s.yaml:4: name:"},
		{"scenario", "description", scen, parseS, "s.yaml:5: description:"},
		{"scenario", "notes", scen, parseS, "s.yaml:5: notes:"},
		{"protocol", "name", proto, parseP, "s.yaml:4: name:"},
		{"protocol", "description", proto, parseP, "s.yaml:4: description:"},
		{"protocol", "notes", proto, parseP, "s.yaml:4: notes:"},
		{"protocol", "label", label, parseP, "s.yaml:3: steps[1].label:"},
	} {
		for _, h := range hostile {
			err := c.parse(c.doc(c.key, h.yaml))
			if err == nil {
				t.Errorf("%s %s with %s: accepted", c.kind, c.key, h.name)
				continue
			}
			clean(t, err)
			var fe *FileError
			if !errors.As(err, &fe) || !strings.HasPrefix(err.Error(), c.line) || !strings.Contains(err.Error(), h.what) {
				t.Errorf("%s %s with %s: %q, want %q … %s", c.kind, c.key, h.name, err, c.line, h.what)
			}
		}
		// Notes take lines and tabs; the other fields are one line.
		err := c.parse(c.doc(c.key, `"one\ntwo\tthree"`))
		if (err == nil) != (c.key == "notes") {
			t.Errorf("%s %s with a newline and a tab: %v", c.kind, c.key, err)
		}
	}
}

// A key or value echoed in an error is escaped, whatever field it is in.
func TestErrorsEscapeWhatTheFileHolds(t *testing.T) {
	for _, doc := range []string{
		"version: 1\nbase: normal\nparams: {}\n\"\\e]0;owned\\a\": 1\n",
		"version: 1\nbase: normal\nparams:\n  \"x\\e[2J\": 1\n",
		"version: 1\nbase: normal\nparams:\n  heart_rate_bpm: \"\\e[31m80\"\n",
		"version: \"\\e]2;t\\a\"\nparams: {}\n",
	} {
		_, err := ParseScenario([]byte(doc), "s\x1b[1m.yaml")
		if err == nil {
			t.Errorf("accepted %q", doc)
			continue
		}
		clean(t, err)
	}
	_, err := ParseProtocol([]byte("version: 1\nsteps:\n  - label: a\n    set: {\"\\e]0;x\\a\": 1}\n"), "p.yaml")
	if err == nil {
		t.Fatal("accepted an unknown lever")
	}
	clean(t, err)
}

// Saving refuses what loading would refuse, before anything is written; a
// protocol named after a file with control characters in its name shows
// them escaped.
func TestSaveRefusesControlCharacters(t *testing.T) {
	sc, err := Get(Default)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	for _, bad := range []Scenario{{Name: "a\x1b]0;x\x07"}, {Name: "ok", Description: "two\nlines"}, {Name: "ok", Notes: "x\x1b[2J"}} {
		s := *sc
		s.Name, s.Description, s.Notes = bad.Name, bad.Description, bad.Notes
		path := filepath.Join(dir, "out.yaml")
		err := SaveScenario(path, &s, false)
		if err == nil || !strings.Contains(err.Error(), "cannot save scenario") {
			t.Errorf("saved %+v: %v", bad, err)
			continue
		}
		clean(t, err)
		if _, err := os.Stat(path); err == nil {
			t.Errorf("a file was written for %+v", bad)
		}
	}
	pr, err := ParseProtocol([]byte("version: 1\nsteps:\n  - {label: a, hold: 1}\n"), "/x/run\x1b]0;t\x07.yaml")
	if err != nil || pr.Name != `run\x1b]0;t\x07` {
		t.Errorf("protocol name from its file: %q, %v", pr.Name, err)
	}
}

// A scenario file reads numbers as --set does (ParseNumber): decimal only,
// with one message for hexadecimal, octal and binary forms and digit
// separators, whichever way YAML would resolve them.
func TestFileNumbersReadAsSetDoes(t *testing.T) {
	for _, c := range []struct{ val, want string }{
		{"0x50", `"0x50" is not a decimal number`},
		{"0x1p6", `"0x1p6" is not a decimal number`},
		{"0o120", `"0o120" is not a decimal number`},
		{"8_0", `"8_0" is not a number`},
		{".inf", `".inf" is not a finite number`},
		{"1e999", `"1e999" is not a finite number`},
	} {
		_, err := ParseScenario([]byte("version: 1\nbase: normal\nparams:\n  heart_rate_bpm: "+c.val+"\n"), "s.yaml")
		if err == nil || !strings.Contains(err.Error(), "s.yaml:4: params.heart_rate_bpm: "+c.want) || !strings.Contains(err.Error(), "30 to 180 bpm") {
			t.Errorf("%s: %v", c.val, err)
		}
		_, perr := ParseNumber(c.val)
		if perr == nil || !strings.Contains(perr.Error(), c.want) {
			t.Errorf("ParseNumber(%s): %v", c.val, perr)
		}
	}
	for _, ok := range []string{"80", "80.5", "+80", "8e1", "0.8E+2"} {
		if _, err := ParseScenario([]byte("version: 1\nbase: normal\nparams:\n  heart_rate_bpm: "+ok+"\n"), "s.yaml"); err != nil {
			t.Errorf("%s: %v", ok, err)
		}
	}
}
