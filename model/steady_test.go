package model_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
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

// solveAtFill solves p with its filling pressure as the mean LAP: held, as
// solve; closed, by giving or taking volume (a fluid challenge).
func solveAtFill(t *testing.T, p model.Params) *model.Steady {
	t.Helper()
	st, err := model.NewSolver().SteadyStateAtFillingPressure(p, nil)
	if err != nil {
		t.Fatalf("steady state at the filling pressure: %v", err)
	}
	return st
}

// circulations are the two circulations every general property is checked in.
var circulations = []model.Circulation{model.Held, model.Closed}

// inCirculation returns preset name's parameters in circulation c.
func inCirculation(t testing.TB, name string, c model.Circulation) model.Params {
	t.Helper()
	sc, err := presets.Get(name)
	if err != nil {
		t.Fatal(err)
	}
	if err := sc.SetCirculation(c); err != nil {
		t.Fatal(err)
	}
	return sc.Params
}

func relDiff(a, b float64) float64 { return math.Abs(a-b) / math.Max(math.Abs(b), 1e-12) }

// stateDiff is the largest relative difference of two states' volumes.
func stateDiff(a, b model.State) float64 {
	var d float64
	for i := range a.V {
		if a.V[i] != 0 || b.V[i] != 0 {
			d = math.Max(d, relDiff(a.V[i], b.V[i]))
		}
	}
	return d
}

// One more beat from the steady state must end where it started: the check
// that the solver's fixed point is a periodic solution, made by integrating
// the beat again rather than trusting the solver's own residual.
func TestSteadyStateIsPeriodic(t *testing.T) {
	for _, c := range circulations {
		p := inCirculation(t, "normal", c)
		st := solve(t, p)
		if st.Residual >= model.SteadyTol {
			t.Fatalf("%s: residual %g not below %g", c, st.Residual, model.SteadyTol)
		}
		b, err := model.NewSolver().Step(p, st.Start)
		if err != nil {
			t.Fatal(err)
		}
		if d := stateDiff(b.End, st.Start); d > 1e-6 {
			t.Errorf("%s: beat from %+v ends at %+v", c, st.Start, b.End)
		}
	}
}

// Plain repetition of beats converges slowly (at the rate of the slowest
// compartment) but surely; after 300 beats it must agree with the
// Newton–Broyden fixed point, which needs far fewer.
func TestSteadyStateMatchesPlainRepetition(t *testing.T) {
	for _, circ := range circulations {
		p := inCirculation(t, "normal", circ)
		st := solve(t, p)
		s := model.NewSolver()
		x := st.Start
		// Move blood from the arteries into the ventricle: the blood volume stays.
		x.V[model.LeftVentricle] -= 30
		x.V[model.SystemicArteries] += 30
		var b *model.Beat
		var err error
		for i := 0; i < 300; i++ {
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
				t.Errorf("%s: %s after 300 plain beats %.6f, Newton fixed point %.6f", circ, c.name, c.got, c.want)
			}
		}
		if limit := map[model.Circulation]int{model.Held: 8, model.Closed: 16}[circ]; st.Beats > limit {
			t.Errorf("%s: cold solve took %d beats; the fixed-point solver should need far fewer than plain repetition", circ, st.Beats)
		}
	}
}

func TestWarmStartAgreesAndIsCheaper(t *testing.T) {
	for _, c := range circulations {
		p := inCirculation(t, "normal", c)
		s := model.NewSolver()
		base, err := s.SteadyStateAtFillingPressure(p, nil)
		if err != nil {
			t.Fatal(err)
		}
		q := base.Params
		q.FillingPressure *= 1.05
		warm, err := s.SteadyStateAtFillingPressure(q, &base.Warm)
		if err != nil {
			t.Fatal(err)
		}
		cold := solveAtFill(t, q)
		for _, ms := range model.MetricSpecs {
			a, b := ms.Get(&warm.Metrics), ms.Get(&cold.Metrics)
			if relDiff(a, b) > 1e-4 {
				t.Errorf("%s: %s warm %.8g cold %.8g", c, ms.Key, a, b)
			}
		}
		if warm.Beats >= cold.Beats {
			t.Errorf("%s: warm start used %d beats, cold %d", c, warm.Beats, cold.Beats)
		}
	}
}

// Three-element Windkessel with the aortic valve shut, draining to the held
// circulation's fixed venous pressure: Pc − Pv decays as exp(−t/(R·C))
// exactly (docs/science.md §2, derived). Proximal aortic pressure equals Pc
// while there is no flow.
func TestWindkesselDiastolicDecayIsExponential(t *testing.T) {
	for _, name := range []string{"normal", "hfref", "exercise"} {
		p := inCirculation(t, name, model.Held)
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
// ventricle, so mean (Pc − Pv) = Q̄·R exactly, with Pv the venous pressure
// (held, fixed; closed, the systemic veins' over the beat) (docs/science.md
// §2, derived); and on every preset the aortic outflow over a beat equals the
// volume ejected, EDV − minimal volume, which is SV: SV·HR is the mean aortic
// flow (mass balance). A pump's flow joins the aortic outflow; where blood also
// leaves the ventricle backwards or through a pump, SV is more than the aortic
// outflow (devices_test.go checks those beats).
func TestSteadyStateMassBalance(t *testing.T) {
	for _, c := range circulations {
		for _, name := range presets.Names() {
			p := inCirculation(t, name, c)
			st := solve(t, p)
			var outflow, drop float64
			vmin := st.VLV[0]
			pv := func(i int) float64 {
				if c == model.Closed {
					return st.P[model.SystemicVeins][i]
				}
				return p.VenousPressure
			}
			for i := 1; i < len(st.T); i++ {
				dt := st.T[i] - st.T[i-1]
				outflow += 0.5 * (st.QOut[i] + st.QOut[i-1] + st.QPump[i] + st.QPump[i-1]) * dt
				d0 := st.P[model.SystemicArteries][i-1] - pv(i-1)
				d1 := st.P[model.SystemicArteries][i] - pv(i)
				drop += 0.5 * (d0 + d1) * dt
				vmin = math.Min(vmin, st.VLV[i])
			}
			drop /= st.Period
			if want := outflow / st.Period * p.Resistance; relDiff(drop, want) > 0.002 {
				t.Errorf("%s %s: mean Pc − Pv %.3f mmHg, Q̄·R = %.3f", c, name, drop, want)
			}
			if p.MitralRegurgitantArea > 0 || p.AorticRegurgitantArea > 0 || p.PumpFlow > 0 {
				continue
			}
			ejected := st.Metrics.EDV - vmin
			// Trapezoidal sums on a 1 kHz grid: 0.2 % covers their error at the ejection edges.
			if relDiff(outflow, ejected) > 0.002 {
				t.Errorf("%s %s: aortic outflow %.3f mL per beat, EDV − Vmin %.3f mL", c, name, outflow, ejected)
			}
			if relDiff(st.Metrics.SV, outflow) > 0.002 {
				t.Errorf("%s %s: SV %.3f mL is not the volume ejected, %.3f mL", c, name, st.Metrics.SV, outflow)
			}
		}
	}
}

// The coupling identity EDV − ESV = (EDV − V0)·Ees/(Ees + Ea') with
// Ea' = ESP/(EDV − ESV) (docs/science.md §3, derived from ESP = Ees·(ESV − V0))
// holds for the model's own beats because end-systole lies on the ESPVR. (SV
// itself is the volume ejected, a little more than EDV − ESV.)
func TestCouplingIdentityOnModelBeats(t *testing.T) {
	for _, c := range circulations {
		for _, name := range []string{"normal", "hfref", "hfpef", "hypertensive", "exercise"} {
			st := solve(t, inCirculation(t, name, c))
			m := st.Metrics
			dv := m.EDV - m.ESV
			want := (m.EDV - st.Params.V0) * m.Ees / (m.Ees + m.ESP/dv)
			if relDiff(dv, want) > 0.01 {
				t.Errorf("%s %s: EDV − ESV %.2f, coupling formula %.2f", c, name, dv, want)
			}
		}
	}
}

// Published ranges for the resting adult. Sources are named per row; rows
// marked [memory] come from docs/science.md items recalled, not checked.
func TestNormalPresetInPublishedRanges(t *testing.T) {
	for _, c := range circulations {
		normalInPublishedRanges(t, c, solve(t, inCirculation(t, "normal", c)).Metrics)
	}
}

func normalInPublishedRanges(t *testing.T, c model.Circulation, m model.Metrics) {
	t.Helper()
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
			t.Errorf("%s: %s = %.4g outside %.4g–%.4g (%s)", c, r.name, r.got, r.lo, r.hi, r.source)
		}
	}
}

// Directional facts of ventricular–arterial coupling [common practice, no
// source], in both circulations; more preload is a fluid challenge when the
// circulation is closed.
func TestDirectionalFacts(t *testing.T) {
	for _, c := range circulations {
		directionalFacts(t, inCirculation(t, "normal", c))
	}
}

func directionalFacts(t *testing.T, p model.Params) {
	base := solve(t, p).Metrics
	with := func(key string, v float64) model.Metrics {
		q, err := p.With(key, v)
		if err != nil {
			t.Fatal(err)
		}
		return solveAtFill(t, q).Metrics
	}

	pre := with("filling_pressure_mmhg", p.FillingPressure*1.4)
	if !(pre.EDV > base.EDV && pre.SV > base.SV && pre.ESP > base.ESP && pre.ESV > base.ESV) {
		t.Errorf("%s, more preload: EDV %.1f→%.1f SV %.1f→%.1f ESP %.1f→%.1f ESV %.1f→%.1f, want all to rise", p.Circulation,
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

// Anywhere in the allowed ranges, in both circulations, the solver returns
// finite measurements of a possible heart within its beat cap, or a clear
// error: never NaN, never a negative volume or an EF outside 0–100 %, never a
// hang.
func TestRandomParametersSettleOrFailCleanly(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	s := model.NewSolver()
	settled, valid, refused := map[model.Circulation]int{}, map[model.Circulation]int{}, map[model.Circulation]int{}
	const n = 300
	for i := 0; i < n; i++ {
		var p model.Params
		p.Circulation = circulations[i%2]
		for _, sp := range model.Specs {
			sp.Set(&p, sp.Min+(sp.Max-sp.Min)*rng.Float64())
		}
		if p.Validate() != nil {
			continue
		}
		valid[p.Circulation]++
		st, err := s.SteadyState(p, nil)
		if err != nil {
			var ns *model.NotSettledError
			var ie *model.ImplausibleError
			switch {
			case errors.As(err, &ie):
				// A clean refusal: it names the levers that lead there.
				if len(ie.Levers) == 0 || !strings.Contains(err.Error(), "=") {
					t.Errorf("refusal names no levers: %v", err)
				}
				refused[p.Circulation]++
			case errors.As(err, &ns):
				t.Logf("did not settle: %+v: %v", p, err)
				if !strings.Contains(err.Error(), p.Circulation.String()) {
					t.Errorf("the error does not say which circulation failed: %v", err)
				}
			default:
				t.Errorf("unexpected error type %T: %v", err, err)
			}
			continue
		}
		settled[p.Circulation]++
		if st.Beats > model.MaxSteadyBeats {
			t.Errorf("used %d beats, cap %d", st.Beats, model.MaxSteadyBeats)
		}
		for _, k := range []float64{st.Metrics.EDV, st.Metrics.ESV, st.Metrics.ESP, st.Metrics.MAP, st.Metrics.SW} {
			if math.IsNaN(k) || math.IsInf(k, 0) {
				t.Errorf("non-finite measurement for %+v: %+v", p, st.Metrics)
				break
			}
		}
		if m := st.Metrics; !(m.EF > 0 && m.EF <= 100 && m.EDV > 0 && m.VMin > 0) {
			t.Errorf("impossible heart reported as a result: EDV %g, smallest volume %g, EF %g", m.EDV, m.VMin, m.EF)
		}
	}
	// Every held set settles or is refused. A closed circulation can be made
	// too stiff to integrate at the corners of the ranges (a steep right
	// ventricle filled by a strong atrium): at least 90 % must settle or be
	// refused, and the rest fail with a NotSettledError, checked above.
	for _, c := range circulations {
		done := settled[c] + refused[c]
		if c == model.Held && done < valid[c] || c == model.Closed && float64(done) < 0.9*float64(valid[c]) {
			t.Errorf("%s: %d of %d valid random parameter sets settled and %d were refused", c, settled[c], valid[c], refused[c])
		}
		t.Logf("%s: %d valid sets, %d settled, %d refused as impossible", c, valid[c], settled[c], refused[c])
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
