package analysis

import (
	"math"
	"testing"
)

// The onset and end of ejection read from a model recording agree with the
// model's own aortic valve opening and closing (the truth of a synthetic
// recording), within 5 % of the beat period (the model's
// exercise beat ends ejection with a long low tail of outflow, which
// noise hides: its end reads up to 5 % early), with noise added.
func TestEjectionTimingMatchesModelValves(t *testing.T) {
	for _, name := range []string{"normal", "hfref", "hfpef", "hypertensive", "exercise", "vasodilated"} {
		sr, _, a := analysedSteady(t, name, 1, 4)
		vt := sr.Beats[0].Valves
		period := sr.Beats[0].Period
		checked := 0
		for _, b := range a.Steady {
			e := b.Ejection
			if !e.Found() {
				t.Errorf("%s beat %d: %s", name, b.Index, e.Err)
				continue
			}
			// The model's beat starts at activation onset; this beat at its end-diastole.
			k := beatAt(sr.Starts, b.Start)
			ed := b.Start - sr.Starts[k]
			if d := e.Open + ed - vt.AorticOpen; math.Abs(d) > 0.05*period {
				t.Errorf("%s beat %d: onset of ejection %.1f ms from the model's aortic opening", name, b.Index, d*1e3)
			}
			if d := e.Close + ed - vt.AorticClose; math.Abs(d) > 0.05*period {
				t.Errorf("%s beat %d: end of ejection %.1f ms from the model's aortic closure", name, b.Index, d*1e3)
			}
			checked++
		}
		if checked < 5 {
			t.Errorf("%s: %d steady beats timed", name, checked)
		}
	}
}

// beatAt is the simulated beat starting nearest time x.
func beatAt(starts []float64, x float64) int {
	k := 0
	for i, s := range starts {
		if math.Abs(s-x) < math.Abs(starts[k]-x) {
			k = i
		}
	}
	return k
}

// tNd and Chen's single-beat Ees move by less than 5 % across the whole
// smoothing range allowed (5 samples to 1/8 of the beat), with noise: the
// timing comes from fixed filters, and smoothing changes only the pressures,
// SV and EF Chen's formula also uses.
func TestSingleBeatStableAcrossSmoothing(t *testing.T) {
	for _, name := range []string{"normal", "hfref", "hfpef", "hypertensive", "exercise"} {
		_, rec, ref := analysedSteady(t, name, 1, 2)
		w, _ := newWindows(ref.Period, rec.Rate, 0)
		for _, sm := range []float64{w.minSmooth, 0.5 * ref.Options.SmoothWindow, 2 * ref.Options.SmoothWindow, w.maxSmooth} {
			a, err := Analyze(rec, Options{SmoothWindow: sm})
			if err != nil {
				t.Fatalf("%s, %.3g ms: %v", name, sm*1e3, err)
			}
			sb, rb := a.SingleBeat, ref.SingleBeat
			if sb == nil || sb.Chen == nil || rb.Chen == nil {
				t.Fatalf("%s, %.3g ms: no Chen estimate", name, sm*1e3)
			}
			if d := sb.TNd/rb.TNd - 1; math.Abs(d) > 0.05 {
				t.Errorf("%s: tNd %.4f at %.3g ms smoothing, %.4f at the default (%+.1f %%)", name, sb.TNd, sm*1e3, rb.TNd, 100*d)
			}
			if d := sb.Chen.Ees/rb.Chen.Ees - 1; math.Abs(d) > 0.05 {
				t.Errorf("%s: Chen Ees %.4g at %.3g ms smoothing, %.4g at the default (%+.1f %%)", name, sb.Chen.Ees, sm*1e3, rb.Chen.Ees, 100*d)
			}
		}
		if sm := w.maxSmooth * 1.01; true {
			if _, err := Analyze(rec, Options{SmoothWindow: sm}); err == nil {
				t.Errorf("%s: smoothing %.3g ms beyond the range accepted", name, sm*1e3)
			}
		}
	}
}
