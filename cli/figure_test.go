package cli

import (
	"bytes"
	"encoding/xml"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestFigureWritesFiles(t *testing.T) {
	dir := t.TempDir()
	svg := filepath.Join(dir, "afterload.svg")
	code, out, errs := runCLI(t, "figure", "--set", "resistance_mmhg_s_per_ml=1.7", "-o", svg)
	if code != 0 || out != "" || !strings.Contains(errs, "wrote "+svg) {
		t.Fatalf("exit %d, stdout %q, stderr %q", code, out, errs)
	}
	data, err := os.ReadFile(svg)
	if err != nil {
		t.Fatal(err)
	}
	var root struct{ XMLName xml.Name }
	if err := xml.Unmarshal(data, &root); err != nil || root.XMLName.Local != "svg" {
		t.Fatalf("not an SVG: %v", err)
	}
	if w := attr(data, "width"); w != "16cm" || attr(data, "height") != "11cm" {
		t.Errorf("default size %s × %s", w, attr(data, "height"))
	}
	for _, want := range []string{"Systemic resistance 0.85 → 1.7", "without the --set changes", "Changed readouts"} {
		if !bytes.Contains(data, []byte(want)) {
			t.Errorf("SVG lacks %q", want)
		}
	}

	// No overwrite without --force; the old file stays.
	code, _, errs = runCLI(t, "figure", "--set", "heart_rate_bpm=90", "-o", svg)
	if code != 1 || !strings.Contains(errs, "exists") || !strings.Contains(errs, "--force") {
		t.Errorf("overwrite: exit %d, %q", code, errs)
	}
	if again, _ := os.ReadFile(svg); !bytes.Equal(again, data) {
		t.Error("refused overwrite changed the file")
	}
	if code, _, errs = runCLI(t, "figure", "--set", "heart_rate_bpm=90", "-o", svg, "--force"); code != 0 {
		t.Errorf("--force: exit %d, %q", code, errs)
	}

	pngPath := filepath.Join(dir, "Small.PNG")
	code, _, errs = runCLI(t, "figure", "--preset", "hfref", "--set", "ees_mmhg_per_ml=1.5", "-o", pngPath, "--size", "1200x900px")
	if code != 0 || !strings.Contains(errs, "1200×900 px") {
		t.Fatalf("png: exit %d, %q", code, errs)
	}
	f, err := os.Open(pngPath)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	if b := img.Bounds(); b.Dx() != 1200 || b.Dy() != 900 {
		t.Errorf("png %d×%d", b.Dx(), b.Dy())
	}
}

// attr returns an attribute of the root svg element.
func attr(data []byte, name string) string {
	i := bytes.Index(data, []byte("<svg "))
	if i < 0 {
		return ""
	}
	rest := data[i:]
	j := bytes.Index(rest, []byte(" "+name+`="`))
	if j < 0 {
		return ""
	}
	v := rest[j+len(name)+3:]
	return string(v[:bytes.IndexByte(v, '"')])
}

// The baseline is the --baseline file, else the scenario's own baseline,
// else the scenario without --set; with none of them the loop stands alone.
func TestFigureBaseline(t *testing.T) {
	dir := t.TempDir()
	base := filepath.Join(dir, "calm.yaml")
	os.WriteFile(base, []byte("version: 1\nname: calm\nbase: normal\nparams:\n  heart_rate_bpm: 55\n"), 0o644)
	withBase := filepath.Join(dir, "study.yaml")
	os.WriteFile(withBase, []byte("version: 1\nname: study\nbase: normal\nparams:\n  ees_mmhg_per_ml: 1.5\n"+
		"baseline:\n  ees_mmhg_per_ml: 2.5\n"), 0o644)
	for _, c := range []struct {
		args []string
		want []string
	}{
		{[]string{"--baseline", base}, []string{"Heart rate 55 → 70 bpm", "scenario calm (calm.yaml)", "Changed readouts"}},
		{[]string{"--scenario", withBase}, []string{"Ees 2.5 → 1.5", "baseline of scenario study"}},
		{[]string{"--preset", "hfpef"}, []string{"Scenario hfpef", ">Readouts<", ">Loop<"}},
		{[]string{"--set", "heart_rate_bpm=70"}, []string{"Scenario normal", ">Readouts<"}}, // a --set to the same value changes nothing
		{[]string{"--set", "heart_rate_bpm=90", "--title", "Tachycardia"}, []string{">Tachycardia<", "What-if loop"}},
	} {
		out := filepath.Join(dir, "f.svg")
		code, _, errs := runCLI(t, append([]string{"figure", "-o", out, "--force"}, c.args...)...)
		if code != 0 {
			t.Errorf("%v: exit %d, %s", c.args, code, errs)
			continue
		}
		data, _ := os.ReadFile(out)
		for _, w := range c.want {
			if !bytes.Contains(data, []byte(w)) {
				t.Errorf("%v: SVG lacks %q", c.args, w)
			}
		}
	}
}

func TestFigureBadInput(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "f.svg")
	for _, c := range []struct {
		args []string
		code int
		want []string
	}{
		{nil, 2, []string{"-o FILE.svg"}},
		{[]string{"-o", filepath.Join(dir, "f.pdf")}, 2, []string{`".pdf"`, ".svg or .png"}},
		{[]string{"-o", filepath.Join(dir, "f")}, 2, []string{".svg or .png"}},
		{[]string{"-o", out, "--size", "16x11"}, 2, []string{"--size", "no unit"}},
		{[]string{"-o", out, "--size", "2x2cm"}, 2, []string{"--size", "allowed 5 to 100 cm"}},
		{[]string{"-o", out, "--dpi", "5"}, 2, []string{"--dpi 5", "allowed 50 to 1200"}},
		{[]string{"-o", out, "--set", "ees_mmhg_per_ml=40"}, 2, []string{"ees_mmhg_per_ml = 40", "allowed 0.2 to 10 mmHg/mL"}},
		{[]string{"-o", out, "--baseline", filepath.Join(dir, "none.yaml")}, 1, []string{"--baseline", "none.yaml"}},
		{[]string{"-o", filepath.Join(dir, "no", "such", "dir.svg")}, 1, []string{"cannot write", "dir.svg"}},
		{[]string{"-o", out, "extra"}, 2, []string{"no arguments"}},
	} {
		code, stdout, errs := runCLI(t, append([]string{"figure"}, c.args...)...)
		if code != c.code || stdout != "" {
			t.Errorf("%v: exit %d, want %d; stdout %q", c.args, code, c.code, stdout)
		}
		for _, w := range c.want {
			if !strings.Contains(errs, w) {
				t.Errorf("%v: stderr %q lacks %q", c.args, errs, w)
			}
		}
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("a failed run left a file")
	}
}
