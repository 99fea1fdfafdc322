package analysis

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat"

	"pvcouple/internal/synthrec"
)

// occlusionBeats marks the simulated beats of a spec that belong to an
// occlusion (its truth).
func occlusionBeats(spec synthrec.Spec, n int) []bool {
	occ := make([]bool, n)
	cycle := spec.SteadyBeats + spec.OcclusionBeats + spec.RecoveryBeats
	for i := range occ {
		c := i % cycle
		occ[i] = c >= spec.SteadyBeats && c < spec.SteadyBeats+spec.OcclusionBeats
	}
	return occ
}

// A recording with several occlusions of our own (synthetic, seeds 1–2)
// gives one run per occlusion, each lying within its occlusion's beats, each
// with its own ESPVR within 5 % of the Ees set; the steady segments hold no
// occlusion beat; a drift-free recording warns of no drift.
func TestSeveralOcclusionRuns(t *testing.T) {
	for seed := uint64(1); seed <= 2; seed++ {
		p := presetParams(t, "normal")
		spec := occlusion(p)
		spec.SteadyBeats, spec.RecoveryBeats, spec.Repeats = 12, 12, 3
		spec.NoiseP, spec.NoiseV, spec.Seed = 1, 1, seed
		sr, rec := makeRecording(t, spec, ReadOptions{})
		a, err := Analyze(rec, Options{})
		if err != nil {
			t.Fatal(err)
		}
		occ := occlusionBeats(spec, len(sr.Beats))
		if len(a.Runs) != 3 {
			t.Fatalf("seed %d: %d runs, want 3 (notes %v)", seed, len(a.Runs), a.Notes)
		}
		seen := map[int]bool{}
		for _, run := range a.Runs {
			cycle := -1
			for _, b := range run.Beats {
				k := beatAt(sr.Starts, b.Start)
				if !occ[k] {
					t.Errorf("seed %d: run %d–%d holds beat %d, not an occlusion beat", seed, run.First(), run.Last(), b.Index)
				}
				cycle = k / (spec.SteadyBeats + spec.OcclusionBeats + spec.RecoveryBeats)
			}
			seen[cycle] = true
			if len(run.Beats) < spec.OcclusionBeats-2 {
				t.Errorf("seed %d: run %d–%d has %d of the %d occlusion beats", seed, run.First(), run.Last(), len(run.Beats), spec.OcclusionBeats)
			}
			if run.ESPVR == nil || math.Abs(run.ESPVR.Ees/p.Ees-1) > 0.05 {
				t.Errorf("seed %d: run %d–%d ESPVR %+v, Ees set %g", seed, run.First(), run.Last(), run.ESPVR, p.Ees)
			}
		}
		if len(seen) != 3 {
			t.Errorf("seed %d: runs in cycles %v, want one in each of 3", seed, seen)
		}
		for _, b := range a.Steady {
			if occ[beatAt(sr.Starts, b.Start)] {
				t.Errorf("seed %d: steady beat %d is an occlusion beat", seed, b.Index)
			}
		}
		if len(a.SteadySegments) < 3 {
			t.Errorf("seed %d: %d steady segments", seed, len(a.SteadySegments))
		}
		for _, w := range a.Warnings {
			if strings.Contains(w, "drift") {
				t.Errorf("seed %d: drift-free recording warns: %s", seed, w)
			}
		}
	}
}

// A drift-free recording of about 9 minutes (five occlusions of our own,
// seed 5) and the 1-minute one of the benchmark warn of no drift: the trends
// they measure are not significant and add less than 0.5 % of EDV across the
// steady beats.
func TestNoDriftOnDriftFreeRecordings(t *testing.T) {
	if testing.Short() {
		t.Skip("long recording")
	}
	p := presetParams(t, "normal")
	long := occlusion(p)
	long.SteadyBeats, long.RecoveryBeats, long.Repeats, long.Seed = 60, 60, 5, 5
	long.NoiseP, long.NoiseV = 0.5, 0.5
	short := occlusion(p)
	short.SteadyBeats, short.OcclusionBeats, short.RecoveryBeats = 20, 10, 41
	short.NoiseP, short.NoiseV = 0.5, 0.5
	for name, spec := range map[string]synthrec.Spec{"9 min": long, "1 min": short} {
		_, rec := makeRecording(t, spec, ReadOptions{})
		a, err := Analyze(rec, Options{})
		if err != nil {
			t.Fatal(err)
		}
		for _, w := range a.Warnings {
			if strings.Contains(w, "drift") {
				t.Errorf("%s: %s", name, w)
			}
		}
		want := max(1, spec.Repeats)
		if len(a.Runs) != want {
			t.Errorf("%s: %d runs, want %d", name, len(a.Runs), want)
		}
		if d := a.Drift; d == nil || d.EDV.Significant || d.EDP.Significant || math.Abs(d.EDV.Slope*d.Span) > 0.005*a.Steady[0].Metrics.EDV {
			t.Errorf("%s: drift %+v", name, d)
		}
	}
}

// PRSW (Glower et al. 1985: SW = Mw·(EDV − Vw)) from a synthetic occlusion
// agrees within 2 % with the same line fitted (gonum) to the model's own
// per-beat stroke work and EDV of those beats, the truth of the recording;
// Emax(t) across the beats within 5 % of the Ees set (docs/science.md §1
// [derived]: at end-systole the model's elastance is Ees); and the dP/dt
// max–EDV slope (Little 1985) within 3 % of the model's own beats' on a
// clean recording with the least smoothing (smoothing lowers each peak of
// dP/dt a little differently, and the slope rests on small differences).
func TestOcclusionIndicesAgainstModel(t *testing.T) {
	for _, name := range []string{"normal", "hfref", "hypertensive"} {
		p := presetParams(t, name)
		spec := occlusion(p)
		spec.NoiseP, spec.NoiseV, spec.Seed = 0.5, 0.5, 3
		sr, rec := makeRecording(t, spec, ReadOptions{})
		a, err := Analyze(rec, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if len(a.Runs) != 1 {
			t.Fatalf("%s: %d runs", name, len(a.Runs))
		}
		run := a.Runs[0]
		var edv, sw, dp []float64
		for _, b := range run.Beats {
			m := sr.Beats[beatAt(sr.Starts, b.Start)].Metrics
			edv, sw, dp = append(edv, m.EDV), append(sw, m.SW), append(dp, m.DPdtMax)
		}
		_, mw := stat.LinearRegression(edv, sw, nil, false)
		_, slope := stat.LinearRegression(edv, dp, nil, false)
		if run.PRSW == nil || math.Abs(run.PRSW.Mw/mw-1) > 0.02 {
			t.Errorf("%s: PRSW %+v, the model's beats give Mw %.4g", name, run.PRSW, mw)
		}
		clean := spec
		clean.NoiseP, clean.NoiseV = 0, 0
		_, rec = makeRecording(t, clean, ReadOptions{})
		c, err := Analyze(rec, Options{SmoothWindow: minWindow / rec.Rate})
		if err != nil || len(c.Runs) != 1 {
			t.Fatalf("%s clean: %v", name, err)
		}
		if d := c.Runs[0].DPdtEDV; d == nil || math.Abs(d.Slope/slope-1) > 0.03 {
			t.Errorf("%s: dP/dt–EDV %+v, the model's beats give %.4g", name, d, slope)
		}
		if run.Emax == nil || math.Abs(run.Emax.Emax/p.Ees-1) > 0.05 {
			t.Errorf("%s: Emax %+v, Ees set %g", name, run.Emax, p.Ees)
		}
	}
}
