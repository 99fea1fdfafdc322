package model_test

import (
	"math"
	"slices"
	"testing"

	"pvcouple/model"
)

// End-diastole is where the mitral valve closes: there the ventricle's
// pressure meets the atrium's (no flow, no gradient) [derived]. When the
// leak of aortic regurgitation has lifted the ventricle above the atrium
// before contraction (premature mitral closure) it is the beat's first
// sample, the onset of contraction. The largest volume of a beat with aortic
// regurgitation comes later, at aortic opening and the aortic diastolic
// pressure, because the leak fills the ventricle during isovolumic
// contraction; a catheter lab reads LVEDP before the isovolumic upstroke,
// well below the aortic diastolic pressure in chronic regurgitation (common
// practice, no source).
func TestEndDiastoleIsMitralClosure(t *testing.T) {
	for _, c := range circulations {
		for _, name := range []string{"normal", "aortic-regurgitation", "mitral-regurgitation"} {
			p := inCirculation(t, name, c)
			st := solve(t, p)
			m := st.Metrics
			ied := -1
			for i, ti := range st.T {
				if math.Abs(ti-m.TED) < 1e-12 {
					ied = i
				}
			}
			if ied < 0 {
				t.Fatalf("%s %s: end-diastole %.4f s is no sample", c, name, m.TED)
			}
			la := p.FillingPressure
			if c == model.Closed {
				la = st.P[model.LeftAtrium][ied]
			}
			// 1 mmHg: the mitral resistance times the flow of the last
			// millisecond of filling.
			premature := ied == 0 && st.QIn[0] <= 0
			if d := m.EDP - la; d < -1 || (d > 1 && !premature) {
				t.Errorf("%s %s: EDP %.1f mmHg, left atrium %.1f mmHg at end-diastole", c, name, m.EDP, la)
			}
			if !(m.EDP < m.DBP-20) {
				t.Errorf("%s %s: EDP %.1f mmHg within 20 mmHg of the aortic diastolic %.1f mmHg", c, name, m.EDP, m.DBP)
			}
			if st.QIn[ied] > 0.01*slices.Max(st.QIn) {
				t.Errorf("%s %s: mitral flow %.3g mL/s at end-diastole", c, name, st.QIn[ied])
			}
		}
	}
}
