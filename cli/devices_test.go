package cli

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// loopSeries runs `loop` and returns its columns by name.
func loopSeries(t *testing.T, args ...string) map[string][]float64 {
	t.Helper()
	code, out, errs := runCLI(t, append([]string{"loop"}, args...)...)
	if code != 0 {
		t.Fatalf("loop %v: exit %d: %s", args, code, errs)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	cols := map[string][]float64{}
	for _, r := range rows[1:] {
		for j, name := range rows[0] {
			v, _ := strconv.ParseFloat(r[j], 64)
			cols[name] = append(cols[name], v)
		}
	}
	return cols
}

// solveMetrics runs `solve --format json` and returns its metrics.
func solveMetrics(t *testing.T, args ...string) map[string]float64 {
	t.Helper()
	code, out, errs := runCLI(t, append([]string{"solve", "--format", "json"}, args...)...)
	if code != 0 {
		t.Fatalf("solve %v: exit %d: %s", args, code, errs)
	}
	var doc struct {
		Metrics map[string]float64 `json:"metrics"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	return doc.Metrics
}

// What a user computes from the `loop` samples agrees with `solve`: the
// regurgitant fraction from the signed valve flows and the volume curve, and
// the mean pump flow.
func TestLoopSamplesCarryLesionsAndPump(t *testing.T) {
	for _, circ := range []string{"held", "closed"} {
		args := []string{"--preset", "mitral-regurgitation", "--circulation", circ, "--set", "pump_flow_l_per_min=1.5"}
		s := loopSeries(t, args...)
		m := solveMetrics(t, args...)
		var back, pumped float64
		lo, hi := math.Inf(1), math.Inf(-1)
		ts := s["t_s"]
		for i := 1; i < len(ts); i++ {
			dt := ts[i] - ts[i-1]
			if q := 0.5 * (s["q_in_ml_s"][i] + s["q_in_ml_s"][i-1]); q < 0 {
				back -= q * dt
			}
			pumped += 0.5 * (s["q_pump_ml_s"][i] + s["q_pump_ml_s"][i-1]) * dt
		}
		for _, v := range s["v_lv_ml"] {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		rf := 100 * back / (hi - lo)
		pump := pumped / (ts[len(ts)-1] - ts[0]) * 60 / 1000
		if math.Abs(rf-m["regurgitant_fraction_pct"]) > 0.05 || !(rf > 40) {
			t.Errorf("%s: RF from the samples %.3f %%, solve says %.3f %%", circ, rf, m["regurgitant_fraction_pct"])
		}
		if math.Abs(pump-m["pump_co_l_per_min"]) > 1e-3 || !(pump > 0.5) {
			t.Errorf("%s: mean pump flow from the samples %.4f L/min, solve says %.4f", circ, pump, m["pump_co_l_per_min"])
		}
	}
}

// Bad lesion and device levers on the command line name the key, the value,
// the range and the unit.
func TestDeviceLeverErrors(t *testing.T) {
	for _, tc := range []struct{ set, want string }{
		{"aortic_valve_area_cm2=0", "aortic_valve_area_cm2 = 0: out of range; allowed 0.3 to 4 cm²"},
		{"mitral_valve_area_cm2=9", "allowed 0.5 to 6 cm²"},
		{"pump_head_mmhg=20", "allowed 60 to 300 mmHg"},
		{"balloon_volume_ml=70", "allowed 0 to 50 mL"},
		{"balloon_ratio=3", "balloon_ratio = 3"},
	} {
		code, _, errs := runCLI(t, "solve", "--set", tc.set)
		if code == 0 || !strings.Contains(errs, tc.want) {
			t.Errorf("--set %s: exit %d, %q lacks %q", tc.set, code, errs, tc.want)
		}
	}
}

// The notes of preload-reduction-mr, through the commands a user runs: on a
// heart with mitral regurgitation the recorded occlusion still gives the
// ESPVR set (iterated maximal elastance), while the single-beat Ees of Chen
// et al. reads about half of it, against about three quarters on normal.
func TestMRPreloadReductionAnalysed(t *testing.T) {
	for _, tc := range []struct {
		preset       string
		ees          float64
		chenLo, chen float64 // the single-beat reading as a share of Ees
	}{{"mitral-regurgitation", 2.0, 0.4, 0.6}, {"normal", 2.5, 0.65, 0.85}} {
		file := filepath.Join(t.TempDir(), "run.csv")
		if code, _, errs := runCLI(t, "protocol", "run", "preload-reduction-mr", "--preset", tc.preset, "--samples", file); code != 0 {
			t.Fatalf("%s: exit %d: %s", tc.preset, code, errs)
		}
		code, out, errs := runCLI(t, "analyze", file, "--format", "json")
		if code != 0 {
			t.Fatalf("%s: analyze: exit %d: %s", tc.preset, code, errs)
		}
		var doc struct {
			ESPVR struct {
				Ees float64 `json:"ees_mmhg_per_ml"`
			} `json:"espvr"`
			SingleBeat struct {
				Chen struct {
					Ees float64 `json:"ees_mmhg_per_ml"`
				} `json:"chen_2001"`
			} `json:"single_beat"`
		}
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		share := doc.SingleBeat.Chen.Ees / tc.ees
		t.Logf("%s: ESPVR Ees %.3f, single-beat %.3f (%.2f of the Ees set)", tc.preset, doc.ESPVR.Ees, doc.SingleBeat.Chen.Ees, share)
		if math.Abs(doc.ESPVR.Ees/tc.ees-1) > 0.01 {
			t.Errorf("%s: ESPVR Ees %.3f, set %g", tc.preset, doc.ESPVR.Ees, tc.ees)
		}
		if share < tc.chenLo || share > tc.chen {
			t.Errorf("%s: single-beat Ees %.3f is %.2f of the Ees set, want %g–%g", tc.preset, doc.SingleBeat.Chen.Ees, share, tc.chenLo, tc.chen)
		}
	}
}
