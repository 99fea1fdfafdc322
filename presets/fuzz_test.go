package presets

import (
	"errors"
	"strings"
	"testing"
	"time"

	"pvcouple/internal/safetext"
)

// checkFileError fails unless err is a *FileError naming the file.
func checkFileError(t *testing.T, err error, file string) {
	t.Helper()
	var fe *FileError
	if !errors.As(err, &fe) {
		t.Fatalf("error %T is not a *FileError: %v", err, err)
	}
	if fe.File != file || fe.Msg == "" || !strings.HasPrefix(err.Error(), file) {
		t.Fatalf("error does not name the file %q clearly: %q", file, err.Error())
	}
}

// FuzzParseScenario feeds the scenario loader arbitrary bytes: it must not
// panic or hang, must refuse garbage with a *FileError naming the file, and
// whatever it accepts must be a valid scenario that saves and loads back
// unchanged. Seeds: the built-ins (added here) and testdata/fuzz/FuzzParseScenario.
func FuzzParseScenario(f *testing.F) {
	for _, n := range Names() {
		src, err := Source(n)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(src)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		start := time.Now()
		sc, err := ParseScenario(data, "fuzz.yaml")
		if d := time.Since(start); d > 2*time.Second {
			t.Fatalf("parsing %d bytes took %v", len(data), d)
		}
		if err != nil {
			checkFileError(t, err, "fuzz.yaml")
			if s := err.Error(); s != safetext.Line(s) {
				t.Fatalf("error not escaped: %q", s)
			}
			return
		}
		if err := sc.Params.Validate(); err != nil {
			t.Fatalf("accepted invalid parameters: %v", err)
		}
		if safetext.CheckLine(sc.Name) != nil || safetext.CheckLine(sc.Description) != nil || safetext.CheckText(sc.Notes) != nil {
			t.Fatalf("accepted control characters: %q %q %q", sc.Name, sc.Description, sc.Notes)
		}
		if sc.Baseline != nil {
			if err := sc.Baseline.Validate(); err != nil {
				t.Fatalf("accepted an invalid baseline: %v", err)
			}
		}
		out, err := sc.Marshal()
		if err != nil {
			t.Fatalf("accepted scenario does not encode: %v", err)
		}
		back, err := ParseScenario(out, "again.yaml")
		if err != nil {
			t.Fatalf("saved scenario does not load: %v\n%s", err, out)
		}
		if back.Params != sc.Params || back.Name != sc.Name || back.Description != sc.Description || back.Notes != sc.Notes ||
			(back.Baseline == nil) != (sc.Baseline == nil) || sc.Baseline != nil && *back.Baseline != *sc.Baseline {
			t.Fatalf("round trip changed the scenario:\n%+v\n%+v\n%s", sc, back, out)
		}
	})
}

// FuzzParseProtocol feeds the protocol loader arbitrary bytes: no panic, no
// hang, garbage refused with a *FileError naming the file, and whatever it
// accepts stays within the caps and expands on the default preset either to
// a plan of its length or to a *FileError. Seeds: the built-ins (added here)
// and testdata/fuzz/FuzzParseProtocol.
func FuzzParseProtocol(f *testing.F) {
	for _, n := range ProtocolNames() {
		src, err := ProtocolSource(n)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(src)
	}
	def, err := Get(Default)
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		start := time.Now()
		pr, err := ParseProtocol(data, "fuzz.yaml")
		if d := time.Since(start); d > 2*time.Second {
			t.Fatalf("parsing %d bytes took %v", len(data), d)
		}
		if err != nil {
			checkFileError(t, err, "fuzz.yaml")
			return
		}
		n := pr.TotalBeats()
		if len(pr.Steps) == 0 || n < 1 || n > MaxProtocolBeats {
			t.Fatalf("accepted %d steps of %d beats", len(pr.Steps), n)
		}
		if safetext.CheckLine(pr.Name) != nil || safetext.CheckLine(pr.Description) != nil || safetext.CheckText(pr.Notes) != nil {
			t.Fatalf("accepted control characters: %q %q %q", pr.Name, pr.Description, pr.Notes)
		}
		for _, s := range pr.Steps {
			if safetext.CheckLine(s.Label) != nil {
				t.Fatalf("accepted the label %q", s.Label)
			}
			if s.Label == "" || s.Beats < 1 || (s.Kind == StepHold) != (len(s.Changes) == 0) {
				t.Fatalf("accepted step %+v", s)
			}
		}
		pl, err := pr.Expand(def.Params)
		if err != nil {
			checkFileError(t, err, "fuzz.yaml")
			return
		}
		if len(pl.Params) != n {
			t.Fatalf("planned %d beats of %d", len(pl.Params), n)
		}
		for i, p := range pl.Params {
			if err := p.Validate(); err != nil {
				t.Fatalf("beat %d planned with invalid parameters: %v", i+1, err)
			}
		}
	})
}
