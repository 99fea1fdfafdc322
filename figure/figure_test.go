package figure

import (
	"bytes"
	"encoding/xml"
	"gonum.org/v1/plot/vg"
	"image/png"
	"math"
	"strings"
	"testing"

	"pvcouple/model"
	"pvcouple/presets"
)

func steady(t *testing.T, p model.Params) *model.Beat {
	t.Helper()
	st, err := model.NewSolver().SteadyState(p, nil)
	if err != nil {
		t.Fatal(err)
	}
	return st.Beat
}

// afterload is the normal preset with its resistance doubled, over the normal preset.
func afterload(t *testing.T) *Figure {
	t.Helper()
	sc, err := presets.Get("normal")
	if err != nil {
		t.Fatal(err)
	}
	// Held: the filling pressure, and so EDV, stay as the resistance doubles.
	if err := sc.SetCirculation(model.Held); err != nil {
		t.Fatal(err)
	}
	what := sc.Params
	what.Resistance *= 2
	return &Figure{Title: "What-if: resistance doubled\nBaseline: normal", WhatIf: steady(t, what), Baseline: steady(t, sc.Params)}
}

// svgDoc is the root of an SVG file with the texts it draws.
type svgDoc struct {
	XMLName xml.Name `xml:"svg"`
	Width   string   `xml:"width,attr"`
	Height  string   `xml:"height,attr"`
	ViewBox string   `xml:"viewBox,attr"`
}

// svgTexts returns the contents of every text element, at any depth.
func svgTexts(t *testing.T, data []byte) []string {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(data))
	var texts []string
	in := false
	for {
		tok, err := dec.Token()
		if err != nil {
			break
		}
		switch tk := tok.(type) {
		case xml.StartElement:
			in = tk.Name.Local == "text"
			if in {
				texts = append(texts, "")
			}
		case xml.EndElement:
			in = false
		case xml.CharData:
			if in {
				texts[len(texts)-1] += string(tk)
			}
		}
	}
	return texts
}

// The SVG is well-formed XML whose root is an svg element of the asked size
// in the asked unit, and it draws the axis titles with units, the legend,
// the table and the caption.
func TestSVG(t *testing.T) {
	f := afterload(t)
	for _, size := range []string{"16x11cm", "120x90mm", "6x4in", "1800x1200px"} {
		sz, err := ParseSize(size, DefaultDPI)
		if err != nil {
			t.Fatal(err)
		}
		var buf bytes.Buffer
		if err := f.Render(&buf, "svg", sz); err != nil {
			t.Fatal(err)
		}
		var doc svgDoc
		if err := xml.Unmarshal(buf.Bytes(), &doc); err != nil {
			t.Fatalf("%s: not XML: %v", size, err)
		}
		w, h, _ := strings.Cut(size, "x")
		unit := size[len(size)-2:]
		if doc.Width != w+unit || doc.Height != strings.TrimSuffix(h, unit)+unit {
			t.Errorf("%s: svg width %q height %q", size, doc.Width, doc.Height)
		}
		// The view box is the physical size in points (1 pt = 1/72 in).
		var vw, vh float64
		if _, err := fmtSscan(doc.ViewBox, &vw, &vh); err != nil || math.Abs(vw-float64(sz.Width)) > 0.01 || math.Abs(vh-float64(sz.Height)) > 0.01 {
			t.Errorf("%s: viewBox %q, want %v × %v pt", size, doc.ViewBox, sz.Width, sz.Height)
		}
		all := strings.Join(svgTexts(t, buf.Bytes()), " ")
		for _, want := range []string{"Volume (mL)", "Pressure (mmHg)", "What-if loop", "Baseline (dashed)", "ESPVR",
			"EDPVR", "Ea line", "Changed readouts", "SV (mL)", "research and education planning", "What-if: resistance doubled"} {
			if !strings.Contains(all, want) {
				t.Errorf("%s: no text %q in %q", size, want, all)
			}
		}
	}
}

// The PNG decodes and has the asked pixel size: cm at the given dpi, or px exactly.
func TestPNG(t *testing.T) {
	f := afterload(t)
	for _, c := range []struct {
		size string
		dpi  int
		w, h int
	}{
		{"16x11cm", 300, 1890, 1299}, // 16/2.54·300 = 1889.8, 11/2.54·300 = 1299.2
		{"16x11cm", 100, 630, 433},
		{"1200x800px", 300, 1200, 800},
		{"1000x1400px", 150, 1000, 1400},
	} {
		sz, err := ParseSize(c.size, c.dpi)
		if err != nil {
			t.Fatal(err)
		}
		if w, h := sz.Pixels(); w != c.w || h != c.h {
			t.Errorf("%s at %d dpi: Pixels %d×%d, want %d×%d", c.size, c.dpi, w, h, c.w, c.h)
		}
		var buf bytes.Buffer
		if err := f.Render(&buf, "png", sz); err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(&buf)
		if err != nil {
			t.Fatalf("%s: not a PNG: %v", c.size, err)
		}
		if b := img.Bounds(); b.Dx() != c.w || b.Dy() != c.h {
			t.Errorf("%s at %d dpi: %d×%d px, want %d×%d", c.size, c.dpi, b.Dx(), b.Dy(), c.w, c.h)
		}
	}
}

func TestRenderRefuses(t *testing.T) {
	sz, _ := ParseSize(DefaultSize, DefaultDPI)
	var buf bytes.Buffer
	if err := (&Figure{}).Render(&buf, "svg", sz); err == nil {
		t.Error("figure without a what-if rendered")
	}
	if err := afterload(t).Render(&buf, "gif", sz); err == nil || !strings.Contains(err.Error(), "svg, png") {
		t.Errorf("gif: %v", err)
	}
}

func TestParseSize(t *testing.T) {
	sz, err := ParseSize(" 16X11CM ", 300)
	if err != nil || sz.Unit != "cm" || sz.W != 16 || sz.H != 11 || sz.String() != "16x11cm" {
		t.Errorf("%+v, %v", sz, err)
	}
	for _, c := range []struct {
		size string
		dpi  int
		want string
	}{
		{"16x11", 300, "no unit"},
		{"16cm", 300, "WxH"},
		{"axbcm", 300, "WxH"},
		{"2x11cm", 300, "2 cm is out of range; allowed 5 to 100 cm"},
		{"16x200cm", 300, "200 cm"},
		{"1200.5x800px", 300, "whole numbers 400 to 8000 px"},
		{"100x800px", 300, "100 px"},
		{"600x800px", 300, "5.08 cm"}, // allowed in px, too small as paper
		{"500x800px", 300, "4.23 cm is out of range"},
		{"60x60cm", 600, "lower --dpi"},
		{"16x11cm", 20, "dpi 20 is out of range; allowed 50 to 1200"},
		{"NaNxNaNcm", 300, "WxH"},
	} {
		_, err := ParseSize(c.size, c.dpi)
		if c.size == "600x800px" {
			if err != nil {
				t.Errorf("%s: %v", c.size, err)
			}
			continue
		}
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s at %d dpi: %v, want %q", c.size, c.dpi, err, c.want)
		}
	}
}

// A readout is listed when its two values differ as printed, and then with
// the change from model.CompareMetrics. Doubling the resistance at a fixed
// filling pressure leaves EDV (set by the EDPVR and filling) and Ees (a
// parameter) unchanged and changes SV.
func TestChangedReadouts(t *testing.T) {
	f := afterload(t)
	tab := f.table()
	rows := map[string][]string{}
	for _, r := range tab.rows {
		rows[r[0]] = r
	}
	for _, k := range readoutKeys {
		spec, _ := model.MetricByKey(k)
		b, w := fmtValue(spec.Get(&f.Baseline.Metrics)), fmtValue(spec.Get(&f.WhatIf.Metrics))
		if _, listed := rows[label(spec)]; listed != (b != w) {
			t.Errorf("%s: %s → %s, listed %v", k, b, w, listed)
		}
	}
	if _, ok := rows["EDV (mL)"]; ok {
		t.Error("EDV listed as changed")
	}
	sv := rows["SV (mL)"]
	m0, m1 := f.Baseline.Metrics.SV, f.WhatIf.Metrics.SV
	if sv == nil || sv[1] != fmtValue(m0)+" → "+fmtValue(m1) || sv[2] != fmtSigned(m1-m0) || sv[3] != fmtPercent(100*(m1-m0)/m0) {
		t.Errorf("SV row %q for %g → %g", sv, m0, m1)
	}
	if !strings.HasPrefix(sv[2], "−") {
		t.Errorf("SV falls with afterload; Δ %q", sv[2])
	}

	// The same beat twice: nothing changed.
	same := &Figure{WhatIf: f.WhatIf, Baseline: f.WhatIf}
	if tab := same.table(); len(tab.rows) != 0 || tab.note != "No readout changed." {
		t.Errorf("same beat: %d rows, note %q", len(tab.rows), tab.note)
	}
	// No baseline: the readouts themselves.
	alone := &Figure{WhatIf: f.WhatIf}
	if tab := alone.table(); len(tab.rows) != len(readoutKeys) || tab.title != "Readouts" {
		t.Errorf("alone: %d rows, title %q", len(tab.rows), tab.title)
	}
}

// A table too tall for its box shrinks its text, then leaves rows out with a note.
func TestTableFit(t *testing.T) {
	tab := (&Figure{WhatIf: afterload(t).WhatIf}).table()
	h := tab.height()
	tab.fit(tab.width(), h*0.8)
	if tab.size != 0.8*tableSize || len(tab.rows) != len(readoutKeys) {
		t.Errorf("size %v, %d rows", tab.size, len(tab.rows))
	}
	tab.fit(tab.width(), h*0.5)
	if tab.size != minTableScale*tableSize || tab.height() > h*0.5 || !strings.HasPrefix(tab.note, "… and ") {
		t.Errorf("size %v, height %v of %v, note %q", tab.size, tab.height(), h*0.5, tab.note)
	}
}

// A table too wide for its box shrinks its text until it fits, however narrow
// the box (a small figure in pixels at a high dpi once overflowed the page).
func TestTableFitsWidth(t *testing.T) {
	for _, f := range []float64{0.9, 0.6, 0.4} {
		tab := (&Figure{WhatIf: afterload(t).WhatIf}).table()
		w := tab.width() * vg.Length(f)
		tab.fit(w, 10*tab.height())
		if got := tab.width(); got > w*1.0001 {
			t.Errorf("box %.0f%% of the natural width: table is %v wide, box %v", 100*f, got, w)
		}
	}
}

func TestFormatting(t *testing.T) {
	for _, c := range []struct{ got, want string }{
		{fmtValue(math.NaN()), "—"}, {fmtValue(-1.5), "−1.500"}, {fmtValue(12345.6), "12346"},
		{fmtSigned(2.25), "+2.250"}, {fmtSigned(0), "0.000"}, {fmtPercent(-21.84), "−21.8"}, {fmtPercent(math.Inf(1)), "—"},
	} {
		if c.got != c.want {
			t.Errorf("got %q, want %q", c.got, c.want)
		}
	}
	ticks := niceTicks{}.Ticks(0, 152)
	var labels []string
	for _, tk := range ticks {
		if tk.Label != "" {
			labels = append(labels, tk.Label)
		}
	}
	if strings.Join(labels, " ") != "0 50 100 150" || len(ticks) != 7 {
		t.Errorf("ticks %v", ticks)
	}
}
