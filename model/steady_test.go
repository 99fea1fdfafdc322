package model_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"pvcouple/model"
	"pvcouple/presets"
)

func solve(t *testing.T, p model.Params) *model.Steady {
	t.Helper()
	st, err := model.NewSolver().SteadyState(p, nil)
	if err != nil {
		t.Fatalf("steady state: %v", err)
	}
	return st
}

func relDiff(a, b float64) float64 { return math.Abs(a-b) / math.Max(math.Abs(b), 1e-12) }

// One more beat from the steady state must end where it started: the check
// that the solver's fixed point is a periodic solution, made by integrating
// the beat again rather than trusting the solver's own residual.
func TestSteadyStateIsPeriodic(t *testing.T) {
	p := normalParams(t)
	st := solve(t, p)
	if st.Residual >= model.SteadyTol {
		t.Fatalf("residual %g not below %g", st.Residual, model.SteadyTol)
	}
	b, err := model.NewSolver().Step(p, st.Start)
	if err != nil {
		t.Fatal(err)
	}
	if relDiff(b.End.V, st.Start.V) > 1e-6 || relDiff(b.End.Pc, st.Start.Pc) > 1e-6 {
		t.Errorf("beat from %+v ends at %+v", st.Start, b.End)
	}
}

// Plain repetition of beats converges slowly (rate exp(−T/RC)) but surely;
// after 150 beats it must agree with the Newton–Broyden fixed point.
func TestSteadyStateMatchesPlainRepetition(t *testing.T) {
	p := normalParams(t)
	st := solve(t, p)
	s := model.NewSolver()
	x := model.State{V: 100, Pc: 60}
	var b *model.Beat
	var err error
	for i := 0; i < 150; i++ {
		if b, err = s.Step(p, x); err != nil {
			t.Fatal(err)
		}
		x = b.End
	}
	for _, c := range []struct {
		name      string
		got, want float64
	}{{"EDV", b.Metrics.EDV, st.Metrics.EDV}, {"SV", b.Metrics.SV, st.Metrics.SV},
		{"ESP", b.Metrics.ESP, st.Metrics.ESP}, {"MAP", b.Metrics.MAP, st.Metrics.MAP}} {
		if relDiff(c.got, c.want) > 1e-5 {
			t.Errorf("%s after 150 plain beats %.6f, Newton fixed point %.6f", c.name, c.got, c.want)
		}
	}
	if st.Beats > 8 {
		t.Errorf("cold solve took %d beats; the fixed-point solver should need far fewer than plain repetition", st.Beats)
	}
}

func TestWarmStartAgreesAndIsCheaper(t *testing.T) {
	p := normalParams(t)
	s := model.NewSolver()
	base, err := s.SteadyState(p, nil)
	if err != nil {
		t.Fatal(err)
	}
	q := p
	q.FillingPressure *= 1.05
	warm, err := s.SteadyState(q, &base.Warm)
	if err != nil {
		t.Fatal(err)
	}
	cold := solve(t, q)
	for _, ms := range model.MetricSpecs {
		a, b := ms.Get(&warm.Metrics), ms.Get(&cold.Metrics)
		if relDiff(a, b) > 1e-4 {
			t.Errorf("%s warm %.8g cold %.8g", ms.Key, a, b)
		}
	}
	if warm.Beats >= cold.Beats {
		t.Errorf("warm start used %d beats, cold %d", warm.Beats, cold.Beats)
	}
}

// Three-element Windkessel with the aortic valve shut: Pc − Pv decays as
// exp(−t/(R·C)) exactly (docs/science.md §2, derived). Proximal aortic pressure
// equals Pc while there is no flow.
func TestWindkesselDiastolicDecayIsExponential(t *testing.T) {
	for _, name := range []string{"normal", "hfref", "exercise"} {
		p := preset(t, name)
		st := solve(t, p)
		tac := st.Valves.AorticClose
		if math.IsNaN(tac) {
			t.Fatalf("%s: aortic valve never closed", name)
		}
		i0 := -1
		for i, tt := range st.T {
			if tt >= tac {
				i0 = i
				break
			}
		}
		p0 := st.PAO[i0] - p.VenousPressure
		rc := p.Resistance * p.Compliance
		worst := 0.0
		for i := i0; i < len(st.T); i++ {
			want := p.VenousPressure + p0*math.Exp(-(st.T[i]-st.T[i0])/rc)
			worst = math.Max(worst, relDiff(st.PAO[i], want))
		}
		// The integrator runs at rtol 1e-8; 1e-6 leaves room for its global error.
		if worst > 1e-6 {
			t.Errorf("%s: diastolic aortic pressure departs from the exponential by %.2g (relative)", name, worst)
		}
	}
}

// In steady state the mean flow through R equals the mean outflow of the
// ventricle, so mean Pc = Pv + Q̄·R exactly (docs/science.md §2, derived), and
// on every preset the aortic outflow over a beat equals the volume ejected,
// EDV − minimal volume, which is SV: SV·HR is the mean aortic flow (mass
// balance).
func TestSteadyStateMassBalance(t *testing.T) {
	for _, name := range presets.Names() {
		p := preset(t, name)
		st := solve(t, p)
		var outflow, pcMean float64
		vmin := st.VLV[0]
		for i := 1; i < len(st.T); i++ {
			dt := st.T[i] - st.T[i-1]
			outflow += 0.5 * (st.QOut[i] + st.QOut[i-1]) * dt
			pc0 := st.PAO[i-1] - p.Zc*st.QOut[i-1]
			pc1 := st.PAO[i] - p.Zc*st.QOut[i]
			pcMean += 0.5 * (pc0 + pc1) * dt
			vmin = math.Min(vmin, st.VLV[i])
		}
		pcMean /= st.Period
		ejected := st.Metrics.EDV - vmin
		// Trapezoidal sums on a 1 kHz grid: 0.2 % covers their error at the ejection edges.
		if relDiff(outflow, ejected) > 0.002 {
			t.Errorf("%s: aortic outflow %.3f mL per beat, EDV − Vmin %.3f mL", name, outflow, ejected)
		}
		if want := p.VenousPressure + outflow/st.Period*p.Resistance; relDiff(pcMean, want) > 0.002 {
			t.Errorf("%s: mean Pc %.3f mmHg, Pv + Q̄·R = %.3f", name, pcMean, want)
		}
		if relDiff(st.Metrics.SV, outflow) > 0.002 {
			t.Errorf("%s: SV %.3f mL is not the volume ejected, %.3f mL", name, st.Metrics.SV, outflow)
		}
	}
}

// The coupling identity EDV − ESV = (EDV − V0)·Ees/(Ees + Ea') with
// Ea' = ESP/(EDV − ESV) (docs/science.md §3, derived from ESP = Ees·(ESV − V0))
// holds for the model's own beats because end-systole lies on the ESPVR. (SV
// itself is the volume ejected, a little more than EDV − ESV.)
func TestCouplingIdentityOnModelBeats(t *testing.T) {
	for _, name := range []string{"normal", "hfref", "hfpef", "hypertensive", "exercise"} {
		st := solve(t, preset(t, name))
		m := st.Metrics
		dv := m.EDV - m.ESV
		want := (m.EDV - st.Params.V0) * m.Ees / (m.Ees + m.ESP/dv)
		if relDiff(dv, want) > 0.01 {
			t.Errorf("%s: EDV − ESV %.2f, coupling formula %.2f", name, dv, want)
		}
	}
}

// Published ranges for the resting adult. Sources are named per row; rows
// marked [memory] come from docs/science.md items recalled, not checked.
func TestNormalPresetInPublishedRanges(t *testing.T) {
	m := solve(t, normalParams(t)).Metrics
	rows := []struct {
		name   string
		got    float64
		lo, hi float64
		source string
	}{
		{"EDV mL", m.EDV, 135 - 2*26, 160 + 2*29, "Hudsmith et al. 2005 CMR, women 135±26 to men 160±29 (±2 SD)"},
		{"ESV mL", m.ESV, 42 - 2*12, 50 + 2*16, "Hudsmith et al. 2005 CMR, women 42±12 to men 50±16 (±2 SD)"},
		{"EF %", m.EF, 58 - 2*5, 61 + 2*5, "Petersen et al. 2017 UK Biobank, 58–61 ± 5 (±2 SD)"},
		{"EDP mmHg", m.EDP, 6, 16, "LVEDP ≈ 10, abnormal > 16 (Paulus 2007) [memory]"},
		{"MAP mmHg", m.MAP, 70, 105, "resting adult MAP [common practice, no source]"},
		{"tau ms", m.Tau, 0, 48, "τ > 48 ms is abnormal (Paulus 2007) [memory]"},
		{"dP/dt max mmHg/s", m.DPdtMax, 1200, 2000, "docs/science.md §8 [memory]"},
		{"Ees mmHg/mL", m.Ees, 1.5, 3, "healthy humans, docs/science.md §3 [memory]"},
		{"Ea mmHg/mL", m.Ea, 1.2, 2.0, "healthy humans, docs/science.md §3 [memory]"},
		{"Ea/Ees", m.EaEes, 0.5, 0.9, "healthy humans, docs/science.md §3 [memory]"},
	}
	for _, r := range rows {
		if !(r.got >= r.lo && r.got <= r.hi) {
			t.Errorf("%s = %.4g outside %.4g–%.4g (%s)", r.name, r.got, r.lo, r.hi, r.source)
		}
	}
}

// Directional facts of ventricular–arterial coupling [common practice, no source].
func TestDirectionalFacts(t *testing.T) {
	p := normalParams(t)
	base := solve(t, p).Metrics
	with := func(key string, v float64) model.Metrics {
		q, err := p.With(key, v)
		if err != nil {
			t.Fatal(err)
		}
		return solve(t, q).Metrics
	}

	pre := with("filling_pressure_mmhg", p.FillingPressure*1.4)
	if !(pre.EDV > base.EDV && pre.SV > base.SV && pre.ESP > base.ESP && pre.ESV > base.ESV) {
		t.Errorf("more preload: EDV %.1f→%.1f SV %.1f→%.1f ESP %.1f→%.1f ESV %.1f→%.1f, want all to rise",
			base.EDV, pre.EDV, base.SV, pre.SV, base.ESP, pre.ESP, base.ESV, pre.ESV)
	}
	if pre.Ees != base.Ees || relDiff(pre.Ea, base.Ea) > 0.05 {
		t.Errorf("more preload: Ees %.3f→%.3f and Ea %.3f→%.3f should (nearly) stay", base.Ees, pre.Ees, base.Ea, pre.Ea)
	}

	ino := with("ees_mmhg_per_ml", p.Ees*1.4)
	if !(ino.SV > base.SV && ino.ESV < base.ESV) {
		t.Errorf("more Ees: SV %.1f→%.1f ESV %.1f→%.1f, want SV up, ESV down", base.SV, ino.SV, base.ESV, ino.ESV)
	}

	aft := with("resistance_mmhg_s_per_ml", p.Resistance*1.4)
	if !(aft.Ea > base.Ea && aft.ESP > base.ESP && aft.SV < base.SV) {
		t.Errorf("more R: Ea %.3f→%.3f ESP %.1f→%.1f SV %.1f→%.1f, want Ea, ESP up and SV down",
			base.Ea, aft.Ea, base.ESP, aft.ESP, base.SV, aft.SV)
	}

	fast := with("heart_rate_bpm", p.HeartRate*1.4)
	if !(fast.Ea > base.Ea) {
		t.Errorf("faster rate: Ea %.3f→%.3f, want a rise", base.Ea, fast.Ea)
	}
}

// Anywhere in the allowed ranges the solver returns finite measurements
// within its beat cap, or a clear error: never NaN, never a hang. (A run of
// 5000 such sets settled every one when this test was written.)
func TestRandomParametersSettleOrFailCleanly(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	s := model.NewSolver()
	settled, valid := 0, 0
	const n = 300
	for i := 0; i < n; i++ {
		var p model.Params
		for _, sp := range model.Specs {
			sp.Set(&p, sp.Min+(sp.Max-sp.Min)*rng.Float64())
		}
		if p.Validate() != nil {
			continue
		}
		valid++
		st, err := s.SteadyState(p, nil)
		if err != nil {
			var ns *model.NotSettledError
			t.Logf("did not settle: %+v: %v", p, err)
			if !errors.As(err, &ns) {
				t.Errorf("unexpected error type %T: %v", err, err)
			}
			continue
		}
		settled++
		if st.Beats > model.MaxSteadyBeats {
			t.Errorf("used %d beats, cap %d", st.Beats, model.MaxSteadyBeats)
		}
		for _, k := range []float64{st.Metrics.EDV, st.Metrics.ESV, st.Metrics.ESP, st.Metrics.MAP, st.Metrics.SW} {
			if math.IsNaN(k) || math.IsInf(k, 0) {
				t.Errorf("non-finite measurement for %+v: %+v", p, st.Metrics)
				break
			}
		}
	}
	if settled < valid {
		t.Errorf("%d of %d valid random parameter sets settled", settled, valid)
	}
}

func TestInvalidParametersAreRefused(t *testing.T) {
	p := normalParams(t)
	p.HeartRate = 400
	_, err := model.NewSolver().SteadyState(p, nil)
	var pe *model.ParamError
	if !errors.As(err, &pe) || pe.Key != "heart_rate_bpm" {
		t.Fatalf("got %v, want a ParamError for heart_rate_bpm", err)
	}
	p = normalParams(t)
	p.Ees = math.NaN()
	if _, err := model.NewSolver().SteadyState(p, nil); !errors.As(err, &pe) || pe.Key != "ees_mmhg_per_ml" {
		t.Fatalf("NaN Ees: got %v", err)
	}
}
