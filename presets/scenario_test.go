package presets

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"

	"pvcouple/model"
)

const validHead = "version: 1\nname: t\n"

func fullParams(indent string) string {
	sc, err := Get("normal")
	if err != nil {
		panic(err)
	}
	var b strings.Builder
	for _, s := range model.Specs {
		b.WriteString(indent + s.Key + ": " + strconv.FormatFloat(s.Get(sc.Params), 'g', -1, 64) + "\n")
	}
	return b.String()
}

func TestParseFullScenario(t *testing.T) {
	sc, err := ParseScenario([]byte(validHead+"notes: hello\nparams:\n"+fullParams("  ")), "x.yaml")
	if err != nil {
		t.Fatal(err)
	}
	def, _ := Get("normal")
	if sc.Params != def.Params || sc.Baseline != nil || sc.Notes != "hello" || sc.Name != "t" {
		t.Errorf("parsed %+v", sc)
	}
	if sc.BaselineOrParams() != sc.Params {
		t.Error("without a baseline the parameters are the baseline")
	}
}

func TestBaseFillsMissingKeys(t *testing.T) {
	sc, err := ParseScenario([]byte(validHead+"base: hfref\nparams:\n  heart_rate_bpm: 100\nbaseline:\n  heart_rate_bpm: 80\n"), "x.yaml")
	if err != nil {
		t.Fatal(err)
	}
	hf, _ := Get("hfref")
	want := hf.Params
	want.HeartRate = 100
	// The stressed volume is calibrated again for the new rate: the mean LAP
	// stays the filling pressure.
	want.StressedVolume = sc.Params.StressedVolume
	if sc.Params != want || sc.Params.StressedVolume == hf.Params.StressedVolume {
		t.Errorf("params %+v, want hfref with heart rate 100 and its volume calibrated again", sc.Params)
	}
	if st, err := model.NewSolver().SteadyState(sc.Params, nil); err != nil || math.Abs(st.Metrics.LAPMean-want.FillingPressure) > 1e-3 {
		t.Errorf("mean LAP %v, want the filling pressure %g (%v)", st.Metrics.LAPMean, want.FillingPressure, err)
	}
	if sc.Baseline == nil || sc.Baseline.HeartRate != 80 || sc.Baseline.Ees != hf.Params.Ees {
		t.Errorf("baseline %+v", sc.Baseline)
	}
}

// Every malformed file is refused with the file, the line and the key.
func TestStrictLoadingErrors(t *testing.T) {
	cases := []struct {
		name, doc string
		want      []string // substrings of the message
	}{
		{"unknown top key", validHead + "colour: red\nbase: normal\nparams: {}\n", []string{"x.yaml:3", "colour", "unknown key"}},
		{"unknown param", validHead + "base: normal\nparams:\n  heart_rate: 70\n", []string{"x.yaml:5", "params.heart_rate", "unknown parameter"}},
		{"duplicate top key", validHead + "name: u\nbase: normal\nparams: {}\n", []string{"x.yaml:3", "name", "duplicate"}},
		{"duplicate param", validHead + "base: normal\nparams:\n  heart_rate_bpm: 70\n  heart_rate_bpm: 80\n", []string{"x.yaml:6", "duplicate"}},
		{"wrong type", validHead + "base: normal\nparams:\n  heart_rate_bpm: fast\n", []string{"x.yaml:5", "params.heart_rate_bpm", `"fast" is not a number`, "30 to 180 bpm"}},
		{"list value", validHead + "base: normal\nparams:\n  heart_rate_bpm: [70]\n", []string{"x.yaml:5", "not a number"}},
		{"nan", validHead + "base: normal\nparams:\n  ees_mmhg_per_ml: .nan\n", []string{"x.yaml:5", "ees_mmhg_per_ml", "not a finite number", "mmHg/mL"}},
		{"inf", validHead + "base: normal\nparams:\n  ees_mmhg_per_ml: .inf\n", []string{"x.yaml:5", "not a finite number"}},
		{"out of range", validHead + "base: normal\nparams:\n  heart_rate_bpm: 250\n", []string{"x.yaml:5", "heart_rate_bpm = 250", "out of range", "allowed 30 to 180 bpm"}},
		{"second document", validHead + "base: normal\nparams: {}\n---\nversion: 1\n", []string{"x.yaml", "second YAML document"}},
		{"missing keys", validHead + "params:\n  heart_rate_bpm: 70\n", []string{"x.yaml:4", "missing filling_pressure_mmhg", "base:"}},
		{"missing params", validHead, []string{"x.yaml:1", "params", "missing"}},
		{"missing version", "name: t\nbase: normal\nparams: {}\n", []string{"version", "missing"}},
		{"bad version", "version: 7\nbase: normal\nparams: {}\n", []string{"x.yaml:1", "version 7 is not supported"}},
		{"unknown base", validHead + "base: nosuch\nparams: {}\n", []string{"base", `unknown preset "nosuch"`, "normal"}},
		{"not a mapping", "- 1\n- 2\n", []string{"x.yaml:1", "mapping"}},
		{"broken yaml", "version: 1\nparams: [\n", []string{"x.yaml", "not valid YAML"}},
		{"empty", "", []string{"x.yaml", "empty"}},
		{"text name", validHead[:11] + "name: [a]\nbase: normal\nparams: {}\n", []string{"name", "must be text"}},
		{"unfillable", validHead + "base: normal\nparams:\n  filling_pressure_mmhg: 1\n  edpvr_a_mmhg: 9\n  edpvr_b_per_ml: 0.2\n",
			[]string{"x.yaml:5", "fill only", "filling_pressure_mmhg"}},
	}
	for _, c := range cases {
		_, err := ParseScenario([]byte(c.doc), "x.yaml")
		checkRefused(t, c.name, err, c.want)
	}
}

// checkRefused checks that err refuses a file as a *FileError whose message
// holds every string of want.
func checkRefused(t *testing.T, name string, err error, want []string) {
	t.Helper()
	if err == nil {
		t.Errorf("%s: accepted", name)
		return
	}
	var fe *FileError
	if !errors.As(err, &fe) {
		t.Errorf("%s: error %T is not a *FileError: %v", name, err, err)
	}
	for _, w := range want {
		if !strings.Contains(err.Error(), w) {
			t.Errorf("%s: %q lacks %q", name, err.Error(), w)
		}
	}
}
