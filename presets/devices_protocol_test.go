package presets

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat"

	"pvcouple/model"
)

// runProtocol runs a built-in protocol on a preset in circulation c and
// returns its beats with their plan.
func runProtocol(t *testing.T, protocol, preset string, c model.Circulation) (*Plan, []*model.RunBeat) {
	t.Helper()
	pr, err := GetProtocol(protocol)
	if err != nil {
		t.Fatal(err)
	}
	sc, err := Get(preset)
	if err != nil {
		t.Fatal(err)
	}
	if err := sc.SetCirculation(c); err != nil {
		t.Fatal(err)
	}
	pl, err := pr.Expand(sc.Params)
	if err != nil {
		t.Fatal(err)
	}
	tr, err := model.NewTransient(pl.Initial, pl.Params, model.TransientOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var beats []*model.RunBeat
	for rb, err := range tr.All() {
		if err != nil {
			t.Fatalf("%s on %s %s: %v", protocol, preset, c, err)
		}
		beats = append(beats, rb)
	}
	return pl, beats
}

// lastOf returns the metrics of the last beat of step label.
func lastOf(pl *Plan, beats []*model.RunBeat, label string) model.Metrics {
	var m model.Metrics
	for _, b := range beats {
		if pl.Label(b.Index) == label {
			m = b.Metrics
		}
	}
	return m
}

// The lesion and support protocols run on the presets they are written for,
// in both circulations, and do what their notes say.
func TestDeviceProtocolsDoWhatTheySay(t *testing.T) {
	for _, c := range []model.Circulation{model.Held, model.Closed} {
		pl, b := runProtocol(t, "stenosis-relief", "aortic-stenosis", c)
		before, after := lastOf(pl, b, "baseline"), lastOf(pl, b, "valve implant")
		if !(after.AVMeanGradient < before.AVMeanGradient/4 && after.ESP < before.ESP) {
			t.Errorf("%s stenosis-relief: mean gradient %.1f → %.1f mmHg, ESP %.0f → %.0f", c,
				before.AVMeanGradient, after.AVMeanGradient, before.ESP, after.ESP)
		}

		pl, b = runProtocol(t, "mr-reduction", "mitral-regurgitation", c)
		before, after = lastOf(pl, b, "baseline"), lastOf(pl, b, "second clip")
		if !(after.RegurgitantFraction < before.RegurgitantFraction/2 && after.ForwardSV > before.ForwardSV &&
			after.ESV > before.ESV && after.AVOpen > before.AVOpen) {
			t.Errorf("%s mr-reduction: RF %.0f → %.0f %%, forward SV %.0f → %.0f, ESV %.0f → %.0f, AV open %.0f → %.0f ms", c,
				before.RegurgitantFraction, after.RegurgitantFraction, before.ForwardSV, after.ForwardSV,
				before.ESV, after.ESV, before.AVOpen, after.AVOpen)
		}

		pl, b = runProtocol(t, "pump-ramp", "shock", c)
		before, top, off := lastOf(pl, b, "baseline"), lastOf(pl, b, "pump 4.5"), lastOf(pl, b, "pump off")
		if !(top.EDV < before.EDV && top.PVA < before.PVA && top.PumpCO > 2 && top.AVOpen < before.AVOpen && off.PumpCO == 0) {
			t.Errorf("%s pump-ramp: EDV %.0f → %.0f, PVA %.0f → %.0f, pump %.2f L/min, AV open %.0f → %.0f ms", c,
				before.EDV, top.EDV, before.PVA, top.PVA, top.PumpCO, before.AVOpen, top.AVOpen)
		}

		pl, b = runProtocol(t, "balloon-on-off", "shock", c)
		before, on, done := lastOf(pl, b, "baseline"), lastOf(pl, b, "balloon 1:1"), lastOf(pl, b, "balloon off")
		if !(on.DiastolicAugment > 10 && on.AorticEDP < before.AorticEDP && done.DiastolicAugment < 1) {
			t.Errorf("%s balloon-on-off: augmentation %.1f (off %.1f) mmHg, aortic EDP %.1f → %.1f", c,
				on.DiastolicAugment, done.DiastolicAugment, before.AorticEDP, on.AorticEDP)
		}
		inflated := 0
		for _, rb := range b {
			if pl.Label(rb.Index) == "balloon 1:2" && !math.IsNaN(rb.BalloonOnset) {
				inflated++
			}
		}
		if inflated != 5 {
			t.Errorf("%s balloon-on-off: %d of the 10 beats at 1:2 inflate, want 5", c, inflated)
		}

		pl, b = runProtocol(t, "supported-preload-reduction", "shock", c)
		if m := lastOf(pl, b, "supported"); !(m.PumpCO > 2) {
			t.Errorf("%s supported-preload-reduction: pump %.2f L/min", c, m.PumpCO)
		}
	}
}

// The claims of preload-reduction-mr's notes, on the model: the iterated
// maximal-elastance fit still finds Ees and V0, but a line through the
// points at aortic valve closure puts V0 far from the one set (near 18 mL
// against 10), where on normal it finds it.
func TestMRPreloadReductionESPVR(t *testing.T) {
	for _, c := range []model.Circulation{model.Held, model.Closed} {
		for _, tc := range []struct {
			preset string
			off    float64 // least and most V0 error at aortic closure, mL
			within float64
		}{{"mitral-regurgitation", 5, 12}, {"normal", 0, 1}} {
			pl, beats := runProtocol(t, "preload-reduction-mr", tc.preset, c)
			sc, _ := Get(tc.preset)
			var vs, ps, ve, pe []float64
			for _, rb := range beats {
				if l := pl.Label(rb.Index); l != "occlusion" && l != "caval occlusion" {
					continue
				}
				for i, tt := range rb.T {
					if tt == rb.Valves.AorticClose {
						vs, ps = append(vs, rb.VLV[i]), append(ps, rb.PLV[i])
					}
				}
				ve, pe = append(ve, rb.Metrics.ESV), append(pe, rb.Metrics.ESP)
			}
			if len(vs) != 12 {
				t.Fatalf("%s %s: %d occlusion beats with an aortic closure", tc.preset, c, len(vs))
			}
			a, slope := stat.LinearRegression(vs, ps, nil, false)
			v0 := -a / slope
			a2, slope2 := stat.LinearRegression(ve, pe, nil, false)
			t.Logf("%s %s: at aortic closure Ees %.3f V0 %.1f mL; at maximal elastance Ees %.3f V0 %.1f mL",
				tc.preset, c, slope, v0, slope2, -a2/slope2)
			if d := math.Abs(v0 - sc.Params.V0); d < tc.off || d > tc.within {
				t.Errorf("%s %s: V0 at aortic closure %.1f mL, set %g", tc.preset, c, v0, sc.Params.V0)
			}
			if math.Abs(slope2/sc.Params.Ees-1) > 0.03 || math.Abs(-a2/slope2-sc.Params.V0) > 1 {
				t.Errorf("%s %s: maximal-elastance ESPVR Ees %.3f V0 %.1f, set %g and %g", tc.preset, c, slope2, -a2/slope2, sc.Params.Ees, sc.Params.V0)
			}
		}
	}
}

// A scenario that leaves the lesion and support keys out (every one written
// before they existed) has them off: normal valves, no pump, no balloon.
func TestScenarioWithoutDeviceKeysHasNone(t *testing.T) {
	sc, err := Get("normal")
	if err != nil {
		t.Fatal(err)
	}
	src, _ := Source("normal")
	if strings.Contains(string(src), "valve_area") {
		t.Fatal("the normal preset names a lesion key; this test needs a file without them")
	}
	p := sc.Params
	if p.HasDevice() || p.AorticValveArea != model.NormalAorticValveArea || p.MitralValveArea != model.NormalMitralValveArea ||
		p.PumpHead != 150 || p.BalloonRatio != 1 {
		t.Errorf("devices of a file without their keys: %+v", p)
	}
}
