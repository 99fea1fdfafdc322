package presets_test

import (
	"fmt"

	"pvcouple/model"
	"pvcouple/model/analysis"
	"pvcouple/presets"
)

// Picking and playing a protocol, as a front end does: expand it for the
// current parameters, pull the beats one by one (each with its samples for
// the loop and its measurements for the readouts), and fit the ESPVR to the
// loops so far.
func Example_playProtocol() {
	pr, err := presets.GetProtocol("preload-reduction")
	if err != nil {
		panic(err)
	}
	sc, _ := presets.Get("normal")
	plan, err := pr.Expand(sc.Params) // errors name the file, line and lever
	if err != nil {
		panic(err)
	}
	run, err := model.NewTransient(plan.Initial, plan.Params, model.TransientOptions{})
	if err != nil {
		panic(err)
	}
	var loops []model.BeatSamples
	for beat, err := range run.All() { // or run.Next() on each tick; stop at will
		if err != nil {
			panic(err)
		}
		loops = append(loops, beat.Samples())
		if beat.Index%4 == 0 {
			m := beat.Metrics
			fmt.Printf("beat %2d  %-15s t %5.2f s  EDV %5.1f mL  ESV %4.1f mL  ESP %5.1f mmHg\n",
				beat.Index+1, plan.Label(beat.Index), beat.TStart, m.EDV, m.ESV, m.ESP)
		}
	}
	if ok, _ := pr.ESPVRFixed(); ok {
		fit, err := analysis.FitESPVR(loops, 0)
		if err != nil {
			panic(err)
		}
		fmt.Printf("ESPVR of %d loops: Ees %.2f mmHg/mL, V0 %.1f mL\n", fit.Beats, fit.Ees, fit.V0)
	}
	// Output:
	// beat  1  baseline        t  0.00 s  EDV 137.7 mL  ESV 51.3 mL  ESP 115.9 mmHg
	// beat  5  baseline        t  3.43 s  EDV 137.7 mL  ESV 51.3 mL  ESP 115.9 mmHg
	// beat  9  caval occlusion t  6.86 s  EDV 118.3 mL  ESV 47.2 mL  ESP 105.5 mmHg
	// beat 13  caval occlusion t 10.29 s  EDV  92.0 mL  ESV 38.1 mL  ESP  82.8 mmHg
	// beat 17  caval occlusion t 13.71 s  EDV  85.0 mL  ESV 35.0 mL  ESP  74.9 mmHg
	// beat 21  recovery        t 17.14 s  EDV 117.6 mL  ESV 42.1 mL  ESP  92.9 mmHg
	// beat 25  recovery        t 20.57 s  EDV 133.1 mL  ESV 49.2 mL  ESP 110.6 mmHg
	// ESPVR of 25 loops: Ees 2.50 mmHg/mL, V0 5.0 mL
}
