package analysis

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// The Baan et al. 1984 parallel-volume method on a synthetic saline run with
// a known parallel volume (the model's beats seen through a conductance
// signal V_signal = α·g(t)·V + Vp, g rising to 1.25 and back over 16 beats;
// seeds 1–3,
// noise added) recovers Vp within 5 % (it reads 1–2 mL low: the line is
// extrapolated far beyond the points, so a smaller Vp is recovered less well
// in relative terms); α from the reference SV (the model's
// own SV, as a flow probe would give it) within 5 %; and the calibrated
// recording gives back the model's volumes.
func TestSalineRunRecoversParallelVolume(t *testing.T) {
	for seed := uint64(1); seed <= 3; seed++ {
		for _, c := range []struct{ vp, alpha float64 }{{40, 0.8}, {60, 1.2}} {
			spec := occlusion(presetParams(t, "normal"))
			spec.SteadyBeats, spec.OcclusionBeats, spec.RecoveryBeats = 28, 0, 0
			spec.SalineStart, spec.SalineBeats, spec.SalineGain = 6, 16, 0.25
			spec.OffsetV, spec.Alpha = c.vp, c.alpha
			spec.NoiseP, spec.NoiseV, spec.Seed = 0.5, 0.5, seed
			sr, rec := makeRecording(t, spec, ReadOptions{})
			a, err := Analyze(rec, Options{})
			if err != nil {
				t.Fatal(err)
			}
			f, err := FitSaline(a)
			if err != nil {
				t.Fatalf("seed %d, %+v: %v", seed, c, err)
			}
			if math.Abs(f.ParallelVolume/c.vp-1) > 0.05 {
				t.Errorf("seed %d: parallel volume %.4g mL, set %g (fit %+v)", seed, f.ParallelVolume, c.vp, f)
			}
			m := sr.Beats[0]
			sv := m.VLV[0]
			for _, v := range m.VLV {
				sv = math.Max(sv, v)
			}
			lo := sv
			for _, v := range m.VLV {
				lo = math.Min(lo, v)
			}
			sv -= lo // the volume the model ejects
			sig, err := a.StrokeSignal()
			if err != nil {
				t.Fatal(err)
			}
			alpha, err := Alpha(sig, sv)
			if err != nil || math.Abs(alpha/c.alpha-1) > 0.05 {
				t.Errorf("seed %d: α %.4g (%v), set %g", seed, alpha, err, c.alpha)
			}
			// Read again with the calibration: the steady EDV is the model's.
			var b strings.Builder
			if err := sr.WriteCSV(&b, "time_s", "pressure_mmhg", "volume_ml", ""); err != nil {
				t.Fatal(err)
			}
			cal, err := ReadCSV(strings.NewReader(b.String()), "cal.csv", ReadOptions{VolumeOffset: f.ParallelVolume, Alpha: alpha})
			if err != nil {
				t.Fatal(err)
			}
			ca, err := Analyze(cal, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if edv := ca.SteadyMedians()["edv_ml"]; math.Abs(edv/m.Metrics.EDV-1) > 0.05 {
				t.Errorf("seed %d: calibrated EDV %.4g mL, the model's %.4g", seed, edv, m.Metrics.EDV)
			}
		}
	}
}

// A steady recording is no saline run: FitSaline says so.
func TestSalineNeedsABolus(t *testing.T) {
	_, _, a := analysedSteady(t, "normal", 0.5, 1)
	if _, err := FitSaline(a); err == nil || !strings.Contains(err.Error(), "no saline bolus") {
		t.Errorf("steady recording: %v", err)
	}
	if _, err := Alpha(70, 0); err == nil {
		t.Error("reference SV 0 accepted")
	}
	if _, err := Alpha(70, 7); err == nil || !strings.Contains(err.Error(), "outside 0.1 to 5") {
		t.Errorf("α 10: %v", err)
	}
}

// A calibration file written is read back exactly; bad files are refused
// with the file, line, column and key.
func TestCalibrationFile(t *testing.T) {
	c := &CalibrationFile{Calibration: Calibration{ParallelVolume: 12.345678901, Alpha: 0.8125}, Source: "saline: \"run 1\".csv", Notes: "two\nlines"}
	back, err := ReadCalibration(strings.NewReader(string(c.Marshal())), "c.yaml")
	if err != nil {
		t.Fatalf("%v\n%s", err, c.Marshal())
	}
	if *back != *c {
		t.Errorf("read back %+v, wrote %+v", back, c)
	}
	for _, bad := range []struct{ data, want string }{
		{"", "c.yaml:1:1: file is empty"},
		{"version: 1\nalpha: 0.8\n", "c.yaml:1:1: column \"parallel_volume_ml\": missing"},
		{"version: 1\nparallel_volume_ml: 10\nalpha: 9\n", "c.yaml:3:8: column \"alpha\": 9 is out of range; allowed 0.1 to 5"},
		{"version: 1\nparallel_volume_ml: ten\nalpha: 1\n", "c.yaml:2:21: column \"parallel_volume_ml\": \"ten\" is not a number"},
		{"version: 1\nparallel_volume_ml: 1\nalpha: 1\nalfa: 2\n", "c.yaml:4:1: column \"alfa\": unknown key"},
		{"version: 1\nparallel_volume_ml: 1\nparallel_volume_ml: 2\nalpha: 1\n", "c.yaml:3:1: column \"parallel_volume_ml\": duplicate key"},
		{"version: 2\nparallel_volume_ml: 1\nalpha: 1\n", "c.yaml:1:10: column \"version\": \"2\": this program reads version 1"},
		{"version: 1\nparallel_volume_ml: 1\nalpha: [1]\n", "c.yaml:3:8: column \"alpha\""},
		{"version: 1\n\tparallel_volume_ml: 1\n", "c.yaml:"},
		{"version: 1\nsource: \x1b]0;x\x07\n", "c.yaml:2:9: control character U+001B"},
		{"- 1\n- 2\n", "c.yaml:1:1: a calibration file must be a mapping"},
	} {
		_, err := ReadCalibration(strings.NewReader(bad.data), "c.yaml")
		var ie *InputError
		if !errors.As(err, &ie) || !strings.HasPrefix(err.Error(), bad.want) || ie.Line < 1 || ie.Col < 1 {
			t.Errorf("%q: got %v, want %q…", bad.data, err, bad.want)
		}
	}
}
