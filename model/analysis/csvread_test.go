package analysis

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// pvRows writes n samples of a loop-like signal at rate Hz: pressure 5–120
// mmHg and volume 50–130 mL, with the given header and unit scales.
func pvRows(header string, n int, rate, tScale, pScale, vScale float64, sep string) string {
	var b strings.Builder
	b.WriteString(header + "\n")
	for i := 0; i < n; i++ {
		t := float64(i) / rate
		ph := 2 * math.Pi * t / 0.8
		p := 60 - 55*math.Cos(ph)
		v := 90 + 40*math.Sin(ph)
		fmt.Fprintf(&b, "%g%s%g%s%g\n", t*tScale, sep, p*pScale, sep, v*vScale)
	}
	return b.String()
}

// Header variants of the trade and their units (common practice, no source):
// each file holds the same signal, so each must read back the same numbers.
func TestReadCSVHeaderVariants(t *testing.T) {
	cases := []struct {
		name, header string
		ts, ps, vs   float64
		sep          string
		wantP, wantV string
	}{
		{"plain", "time_s,pressure_mmhg,volume_ml", 1, 1, 1, ",", "pressure_mmhg", "volume_ml"},
		{"lab style", "Time (ms),LV Pressure (mmHg),LV Volume [ml]", 1e3, 1, 1, ",", "LV Pressure (mmHg)", "LV Volume [ml]"},
		{"microlitres", "t,P,V (µl)", 1, 1, 1e3, ",", "P", "V (µl)"},
		{"kPa", "time;LVP [kPa];LVV", 1, 1 / 7.50062, 1, ";", "LVP [kPa]", "LVV"},
		{"tabs and extra columns", "Time\tdP/dt\tPressure\tVolume\tECG", 1, 1, 1, "\t", "Pressure", "Volume"},
		{"our loop output", "t_s,p_lv_mmhg,v_lv_ml,p_ao_mmhg", 1, 1, 1, ",", "p_lv_mmhg", "v_lv_ml"},
	}
	for _, c := range cases {
		data := pvRows(c.header, 2000, 1000, c.ts, c.ps, c.vs, c.sep)
		if c.name == "tabs and extra columns" {
			// Put the signal in the right places: Time, dP/dt (junk), Pressure, Volume, ECG (junk).
			var b strings.Builder
			b.WriteString(c.header + "\n")
			for _, line := range strings.Split(strings.TrimSpace(data), "\n")[1:] {
				f := strings.Split(line, "\t")
				b.WriteString(strings.Join([]string{f[0], "0", f[1], f[2], "1"}, "\t") + "\n")
			}
			data = b.String()
		}
		if c.name == "our loop output" {
			var b strings.Builder
			for i, line := range strings.Split(strings.TrimSpace(data), "\n") {
				if i == 0 {
					b.WriteString(line + "\n")
					continue
				}
				b.WriteString(line + ",80\n")
			}
			data = b.String()
		}
		rec, err := ReadCSV(strings.NewReader(data), c.name, ReadOptions{})
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if rec.Columns.Pressure != c.wantP || rec.Columns.Volume != c.wantV {
			t.Errorf("%s: read %q and %q", c.name, rec.Columns.Pressure, rec.Columns.Volume)
		}
		if math.Abs(rec.Rate-1000) > 1e-6 || rec.Len() != 2000 {
			t.Errorf("%s: rate %g, %d samples", c.name, rec.Rate, rec.Len())
		}
		// Sample 100: t 0.1 s.
		ph := 2 * math.Pi * 0.1 / 0.8
		if math.Abs(rec.Time(100)-0.1) > 1e-9 || math.Abs(rec.Pressure(100)-(60-55*math.Cos(ph))) > 1e-4 || math.Abs(rec.Volume(100)-(90+40*math.Sin(ph))) > 1e-6 {
			t.Errorf("%s: sample 100 = %g s, %g mmHg, %g mL", c.name, rec.Time(100), rec.Pressure(100), rec.Volume(100))
		}
		if c.name == "our loop output" && !rec.HasAortic() {
			t.Errorf("%s: aortic column not found", c.name)
		}
	}
}

// Bad files get an *InputError naming the problem; each row says what the
// message must mention.
func TestReadCSVRefusesBadFiles(t *testing.T) {
	good := pvRows("time_s,pressure_mmhg,volume_ml", 2000, 1000, 1, 1, 1, ",")
	lines := strings.Split(good, "\n")
	swapped := pvRows("time_s,volume_ml,pressure_mmhg", 2000, 1000, 1, 1, 1, ",")
	cases := []struct {
		name, data string
		o          ReadOptions
		want       string
	}{
		{"empty", "", ReadOptions{}, "empty"},
		{"no header", strings.Join(lines[1:], "\n"), ReadOptions{}, "numbers, not column names"},
		{"no pressure column", strings.Replace(good, "pressure_mmhg", "foo", 1), ReadOptions{}, "--pressure-col"},
		{"two pressures", strings.Replace(good, "volume_ml", "pressure2 (mmHg)", 1), ReadOptions{}, "could be the LV pressure"},
		{"text in a cell", strings.Replace(good, "\n0.5,", "\n0.5x,", 1), ReadOptions{}, `"0.5x" is not a number`},
		{"time backwards", strings.Join(append(append([]string{}, lines[:50]...), append([]string{lines[48]}, lines[50:]...)...), "\n"), ReadOptions{}, "times must increase"},
		{"time in ms read as s", pvRows("time,pressure_mmhg,volume_ml", 2000, 1000, 1e3, 1, 1, ","), ReadOptions{}, "look like milliseconds"},
		{"rate too low", pvRows("time_s,pressure_mmhg,volume_ml", 200, 100, 1, 1, 1, ","), ReadOptions{}, "outside 200 to 5000 Hz"},
		{"volume in pressure column", swapped, ReadOptions{}, "never fall below"},
		{"unit of another quantity", strings.Replace(good, "volume_ml", "volume_mmhg", 1), ReadOptions{}, "a unit of pressure"},
		{"microlitres as mL", pvRows("time_s,pressure_mmhg,volume", 2000, 1000, 1, 1, 1e3, ","), ReadOptions{}, "--volume-unit ul"},
		{"kPa as mmHg", pvRows("time_s,pressure,volume_ml", 2000, 1000, 1, 1/7.50062, 1, ","), ReadOptions{}, "--pressure-unit kpa"},
		{"unknown column flag", good, ReadOptions{PressureCol: "LVP"}, "no such column"},
		{"same column twice", good, ReadOptions{PressureCol: "volume_ml"}, "both the"},
		{"too short", pvRows("time_s,pressure_mmhg,volume_ml", 500, 1000, 1, 1, 1, ","), ReadOptions{}, "at least 1 s"},
		{"short row", good + "3.1,5\n", ReadOptions{}, "2 fields"},
		{"UTF-16 with mark", "\xff\xfe" + utf16le(good[:200]), ReadOptions{}, "UTF-16"},
		{"UTF-16 without mark", utf16le(good[:200]), ReadOptions{}, "UTF-16"},
		{"CR line ends", strings.ReplaceAll(good, "\n", "\r"), ReadOptions{}, "CR alone"},
		{"unterminated quote", strings.Replace(good, "\n0.5,", "\n\"0.5,", 1), ReadOptions{}, "not closed on this line"},
		{"text after quote", strings.Replace(good, "\n0.5,", "\n\"0.5\"x,", 1), ReadOptions{}, "after the closing quote"},
		{"control character in a name", strings.Replace(good, "pressure_mmhg", "press\x1b]0;x\x07", 1), ReadOptions{}, "control character U+001B"},
		{"NUL byte", strings.Replace(good, "\n0.5,", "\n0.5\x00,", 1), ReadOptions{}, "NUL byte"},
		{"endless line", strings.Repeat("a", 70000), ReadOptions{}, "longer than 64 KiB"},
		{"only comments", strings.Repeat("# note\n", 10002), ReadOptions{}, "no header line"},
	}
	for _, c := range cases {
		_, err := ReadCSV(strings.NewReader(c.data), "rec.csv", c.o)
		var ie *InputError
		if err == nil || !errors.As(err, &ie) || !strings.Contains(err.Error(), c.want) || !strings.HasPrefix(err.Error(), "rec.csv") {
			t.Errorf("%s: got %v, want an InputError mentioning %q", c.name, err, c.want)
		}
	}
}

// utf16le encodes ASCII text as UTF-16 little-endian.
func utf16le(s string) string {
	var b strings.Builder
	for i := 0; i < len(s); i++ {
		b.WriteByte(s[i])
		b.WriteByte(0)
	}
	return b.String()
}

// Each refusal names the file, line and column; some rows check the place.
func TestReadCSVRefusalsNamePlace(t *testing.T) {
	good := pvRows("time_s,pressure_mmhg,volume_ml", 2000, 1000, 1, 1, 1, ",")
	for _, c := range []struct {
		name, data string
		line, col  int
	}{
		{"text in a cell", strings.Replace(good, "\n0.5,", "\n0.5x,", 1), 502, 1},
		{"text in the second cell", strings.Replace(good, "\n0.5,", "\n0.5,abc", 1), 502, 5},
		{"control character", strings.Replace(good, "volume_ml", "vol\x7fume", 1), 1, 25},
		{"unterminated quote", strings.Replace(good, "\n0.5,", "\n0.5,\"", 1), 502, 5},
		{"rate", pvRows("time_s,pressure_mmhg,volume_ml", 200, 100, 1, 1, 1, ","), 1, 1},
		{"not a pressure", pvRows("time_s,volume_ml,pressure_mmhg", 2000, 1000, 1, 1, 1, ","), 1, 18},
	} {
		_, err := ReadCSV(strings.NewReader(c.data), "rec.csv", ReadOptions{})
		var ie *InputError
		if !errors.As(err, &ie) || ie.Line != c.line || ie.Col != c.col || !strings.HasPrefix(err.Error(), fmt.Sprintf("rec.csv:%d:%d: ", c.line, c.col)) {
			t.Errorf("%s: got %v, want rec.csv:%d:%d", c.name, err, c.line, c.col)
		}
	}
}

// The stated range of sampling rates is the range checked: 200 and 5000 Hz
// are read, 199 and 5001 Hz refused.
func TestReadCSVRateBounds(t *testing.T) {
	for _, c := range []struct {
		rate float64
		ok   bool
	}{{199, false}, {200, true}, {5000, true}, {5001, false}} {
		data := pvRows("time_s,pressure_mmhg,volume_ml", int(2*c.rate), c.rate, 1, 1, 1, ",")
		rec, err := ReadCSV(strings.NewReader(data), "r.csv", ReadOptions{})
		if c.ok && (err != nil || rec.Rate != c.rate) {
			t.Errorf("%g Hz: %v", c.rate, err)
		}
		if !c.ok && (err == nil || !strings.Contains(err.Error(), "outside 200 to 5000 Hz")) {
			t.Errorf("%g Hz accepted or misreported: %v", c.rate, err)
		}
	}
	if _, err := ReadCSV(strings.NewReader("t,p,v\n"), "r.csv", ReadOptions{TimeUnit: "min"}); err == nil || !strings.Contains(err.Error(), "--time-unit") {
		t.Errorf("bad --time-unit: %v", err)
	}
	if err := (ReadOptions{Rate: 5001}).Check(); err == nil || !strings.Contains(err.Error(), "200 to 5000 Hz") {
		t.Errorf("--rate 5001: %v", err)
	}
}

// Volume headers in µL are read as µL: volume_ul, [µL] (micro sign and
// Greek mu), (uL), and the Latin-1 byte B5 for µ.
func TestReadCSVMicrolitreHeaders(t *testing.T) {
	for _, h := range []string{"volume_ul", "LV Volume [µL]", "LV Volume [μL]", "LVV (uL)", "Volume [\xb5l]"} {
		data := pvRows("time_s,pressure_mmhg,"+h, 2000, 1000, 1, 1, 1e3, ",")
		rec, err := ReadCSV(strings.NewReader(data), "u.csv", ReadOptions{})
		if err != nil {
			t.Errorf("%q: %v", h, err)
			continue
		}
		if rec.Columns.VolumeUnit != "ul" || math.Abs(rec.Volume(100)-(90+40*math.Sin(2*math.Pi*0.1/0.8))) > 1e-4 {
			t.Errorf("%q: unit %q, V(100) %g mL", h, rec.Columns.VolumeUnit, rec.Volume(100))
		}
	}
}

// Flags name columns, give units and override the header; --rate replaces a
// missing time column; --volume-offset is subtracted.
func TestReadCSVOptions(t *testing.T) {
	data := pvRows("a,b,c", 2000, 1000, 1, 1, 1, ",")
	rec, err := ReadCSV(strings.NewReader(data), "x.csv", ReadOptions{TimeCol: "a", PressureCol: "2", VolumeCol: "C", VolumeOffset: 10})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(rec.Volume(0)-80) > 1e-9 {
		t.Errorf("offset not subtracted: V[0] = %g", rec.Volume(0))
	}
	var noTime strings.Builder
	for i, line := range strings.Split(strings.TrimSpace(pvRows("t,pressure,volume", 2000, 500, 1, 1, 1, ",")), "\n") {
		f := strings.SplitN(line, ",", 2)
		_ = i
		noTime.WriteString(f[1] + "\n")
	}
	rec, err = ReadCSV(strings.NewReader(noTime.String()), "x.csv", ReadOptions{Rate: 500})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(rec.Rate-500) > 1e-6 || math.Abs(rec.Time(10)-0.02) > 1e-12 || rec.Columns.Time != "" {
		t.Errorf("rate %g, T[10] %g", rec.Rate, rec.Time(10))
	}
	// The header says ms, the flag says s: the flag wins, with a warning.
	rec, err = ReadCSV(strings.NewReader(pvRows("time_ms,pressure,volume", 2000, 1000, 1, 1, 1, ",")), "x.csv", ReadOptions{TimeUnit: "s"})
	if err != nil || len(rec.Warnings) == 0 {
		t.Errorf("flag over header: %v, warnings %v", err, rec.Warnings)
	}
}

// Missing values, short gaps, long gaps and jitter: repaired or split, each
// with a warning, never silently.
func TestReadCSVGapsAndJitter(t *testing.T) {
	lines := strings.Split(strings.TrimSpace(pvRows("time_s,pressure_mmhg,volume_ml", 4000, 1000, 1, 1, 1, ",")), "\n")
	var b strings.Builder
	for i, l := range lines {
		switch {
		case i == 100:
			b.WriteString("0.099,NaN,\n") // a missing value
		case i >= 200 && i < 203: // a 3-sample gap: filled
		case i >= 2000 && i < 2500: // a 0.5 s gap: split
		default:
			b.WriteString(l + "\n")
		}
	}
	rec, err := ReadCSV(strings.NewReader(b.String()), "g.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(rec.Segments) != 2 || len(rec.Gaps) != 1 || math.Abs(rec.Gaps[0].From-1.998) > 1e-9 || math.Abs(rec.Gaps[0].To-2.499) > 1e-9 {
		t.Errorf("segments %v gaps %v", rec.Segments, rec.Gaps)
	}
	if n := rec.Segments[0].To - rec.Segments[0].From; n != 1999 {
		t.Errorf("first segment has %d samples, want 1999 (short gaps filled)", n)
	}
	joined := strings.Join(rec.Warnings, "\n")
	for _, w := range []string{"left out", "filled", "gap in the recording"} {
		if !strings.Contains(joined, w) {
			t.Errorf("no warning about %q in %q", w, joined)
		}
	}
	// Jitter of ±30 % on every other interval: resampled to the median rate.
	var j strings.Builder
	j.WriteString("time_s,pressure_mmhg,volume_ml\n")
	for i := 0; i < 3000; i++ {
		tt := float64(i) * 1e-3
		if i%2 == 1 {
			tt += 0.3e-3
		}
		fmt.Fprintf(&j, "%g,%g,%g\n", tt, 60-55*math.Cos(tt*8), 90+40*math.Sin(tt*8))
	}
	rec, err = ReadCSV(strings.NewReader(j.String()), "j.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for i := 1; i < rec.Len(); i++ {
		if d := rec.Time(i) - rec.Time(i-1); math.Abs(d-rec.Time(1)+rec.Time(0)) > 1e-12 {
			t.Fatalf("not uniform after resampling at %d: %g", i, d)
		}
	}
	if !strings.Contains(strings.Join(rec.Warnings, " "), "irregular") {
		t.Errorf("no warning about irregular sampling: %v", rec.Warnings)
	}
}
