package presets

import (
	"testing"

	"pvcouple/model"
)

// The resting adult promises the resting adult's values: solved, none of its
// measurements lies outside model.NormalRanges (docs/science.md §3 and §8), so the
// explorer opens on it with no readout marked.
func TestNormalPresetWithinNormalRanges(t *testing.T) {
	sc, err := Get(Default)
	if err != nil {
		t.Fatal(err)
	}
	st, err := model.NewSolver().SteadyState(sc.Params, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range model.NormalRanges {
		spec, _ := model.MetricByKey(r.Key)
		if v := spec.Get(&st.Metrics); r.Classify(v) != 0 {
			t.Errorf("%s = %.3g lies outside %g–%g (%s)", r.Key, v, r.Low, r.High, r.Source)
		}
	}
}
