package model

import (
	"errors"
	"fmt"
	"math"
)

// Metrics are the measurements of one beat, as a catheter laboratory takes
// them. A value that cannot be measured from the beat at hand (say MAP from an
// LV-only recording) is NaN. Units are those of the keys in MetricSpecs.
type Metrics struct {
	EDV, ESV, SV float64 // mL; SV is the volume ejected (see Measure)
	VMin         float64 // smallest volume of the beat, mL
	EF           float64 // %
	EDP, ESP     float64 // mmHg
	Ea, Ees      float64 // mmHg/mL
	EaEes        float64 // Ea/Ees, dimensionless
	EaRT         float64 // Ea ≈ R_total/T (Sunagawa et al. 1983), mmHg/mL
	EaSegers     float64 // Ea ≈ −0.13 + 1.02·R_total/T + 0.31/C (Segers et al. 2002), mmHg/mL
	HR           float64 // bpm
	CO           float64 // L/min
	MAP          float64 // time-mean proximal aortic pressure, mmHg
	SBP, DBP     float64 // mmHg
	SW, PE, PVA  float64 // mmHg·mL
	Efficiency   float64 // SW/PVA, fraction
	VO2          float64 // mL O2 per beat, whole LV
	VO2Per100g   float64 // mL O2 per beat per 100 g of LV
	MechEff      float64 // SW/VO2 in joules, fraction
	DPdtMax      float64 // mmHg/s
	DPdtMin      float64 // mmHg/s
	Tau          float64 // ms
	EDStress     float64 // end-diastolic meridional wall stress, 10³ dyn/cm²
	ESStress     float64 // end-systolic meridional wall stress, 10³ dyn/cm²
	TED, TES     float64 // times of end-diastole and end-systole, s from the first sample

	// The rest of the circulation (metrics_circulation.go); NaN where the
	// model or the recording does not have it.
	LAPMean       float64 // mean left-atrial pressure, mmHg
	AtrialFilling float64 // share of LV filling during atrial contraction, %
	CVP           float64 // mean right-atrial (central venous) pressure, mmHg
	PAPMean       float64 // mean pulmonary arterial pressure, mmHg
	RVSV          float64 // right-ventricular stroke volume, mL

	// Valve lesions and support devices (metrics_devices.go); NaN for a
	// recording, which has no flows, and where the beat has no such phase.
	AVMeanGradient      float64 // mean LV − aortic pressure during forward aortic flow, mmHg
	AVPeakGradient      float64 // peak LV − aortic pressure during forward aortic flow, mmHg
	MVMeanGradient      float64 // mean LA − LV pressure during forward mitral flow, mmHg
	RegurgitantVolume   float64 // backflow through the mitral and aortic valves per beat, mL
	RegurgitantFraction float64 // regurgitant volume over total SV, %
	ForwardSV           float64 // net flow through the aortic valve per beat, mL
	TotalSV             float64 // all the ventricle ejects, every way: SV, mL
	AVOpen              float64 // time the aortic valve passes forward flow, ms (0: it stays shut)
	PumpCO              float64 // mean flow of the pump, L/min
	TotalCO             float64 // net aortic valve flow plus pump flow, L/min
	DiastolicAugment    float64 // rise of aortic pressure in diastole above its value at its start, mmHg
	AorticEDP           float64 // aortic pressure at the end of the beat's diastole, mmHg
}

// BeatSamples are the samples of one cardiac cycle. The first and last
// samples are the same phase of consecutive cycles (the last closes the loop),
// so Period = T[n−1] − T[0].
type BeatSamples struct {
	T []float64 // s, increasing
	P []float64 // LV pressure, mmHg
	V []float64 // LV volume, mL
	// DPdt is dP/dt of LV pressure, mmHg/s. If nil it is taken from P by central differences.
	DPdt []float64
	// Pao is proximal aortic pressure, mmHg. If nil, MAP, SBP and DBP are NaN.
	Pao []float64
	// QIn is the flow through the mitral valve, mL/s, negative backward. If
	// given (a model beat), end-diastole is the mitral valve's closure (see
	// Measure). A recording has none.
	QIn []float64
	// EDAtStart marks a beat cut at end-diastole, as recorded beats are: its
	// first sample is end-diastole. Otherwise end-diastole is the sample of
	// largest volume, which noise would move along the isovolumic plateau.
	EDAtStart bool
}

// Known is what is known of the heart and its load beyond the samples: exact
// for the model, estimated for a recording. NaN marks an unknown value and
// makes the metrics that need it NaN (V0 then defaults to 0 for finding end-systole).
type Known struct {
	V0, Ees        float64 // ESPVR intercept (mL) and slope (mmHg/mL)
	EdpvrA, EdpvrB float64 // EDPVR P = A·(exp(B·(V−V0)) − 1), mmHg and 1/mL
	WallVolume     float64 // LV wall volume, mL
	Resistance     float64 // total systemic resistance Zc + R, mmHg·s/mL
	Compliance     float64 // arterial compliance, mL/mmHg
}

// Unknown returns a Known with every value unknown.
func Unknown() Known {
	n := math.NaN()
	return Known{n, n, n, n, n, n, n}
}

// Constants of the energetics (docs/science.md §4). Per 100 g of LV, VO2 per
// beat = vo2Slope·PVA + vo2Intercept, mL O2 with PVA in mmHg·mL per 100 g
// (Khalafbeigui, Suga & Sagawa 1979, Am J Physiol 237:H566) [paper]; the LV's
// mass is its wall volume times the density of myocardium [memory]. An mmHg·mL
// is 1.333e-4 J and a mL of O2 yields about 20 J [memory].
const (
	vo2Slope          = 1.75e-5
	vo2Intercept      = 0.031
	myocardialDensity = 1.05     // g/mL
	joulePerMmHgML    = 1.333e-4 // J
	joulePerMLO2      = 20       // J
)

// tauWindowAboveEDP ends the Weiss fit where pressure falls to EDP plus this
// much, mmHg, before filling begins (common practice, no source).
const tauWindowAboveEDP = 5

// Measure takes the measurements of one beat from its samples.
//
// End-diastole is the sample of largest volume before the peak of dP/dt
// (the largest of the beat when it is periodic), or the first sample when
// b.EDAtStart is set. With the mitral flow b.QIn, the search ends where
// forward mitral flow ends before that peak (the valve's closure; the first
// sample when the valve is shut there): with aortic regurgitation the
// ventricle goes on filling through the leak during isovolumic contraction,
// and the largest volume, at aortic opening, would read the aortic diastolic
// pressure as EDP. End-systole is the sample of
// maximal P/(V − V0) (docs/science.md §6), among samples with V − V0 above 2 % of
// EDV − V0 (and 1 mL), so a near-empty ventricle cannot give a spurious
// maximum. SV is the volume ejected: EDV less the smallest volume of the
// beat or, with b.QIn, the largest volume from end-diastole to end-systole
// (EDV but for that leak) less the smallest;
// Ea = ESP/SV (Kelly et al. 1992). Stroke work is
// the loop area. PE = ½·ESP·(ESV − V0) less the area under the EDPVR from V0 to
// ESV when the EDPVR is known; PVA = SW + PE (Suga). VO2 follows from PVA by
// Suga's per-mass relation and SW/VO2 is the mechanical efficiency, both NaN
// when the wall volume is unknown. τ is Weiss's: the
// least-squares slope of ln P against t from peak −dP/dt until pressure falls
// to EDP + 5 mmHg, zero asymptote (Weiss, Frederiksen & Weisfeldt 1976). Wall
// stress is the thick-wall meridional stress of a sphere holding the cavity
// volume inside the wall volume (Grossman et al. 1975, docs/science.md §7).
func Measure(b BeatSamples, k Known) (Metrics, error) {
	n := len(b.T)
	if n < 8 {
		return Metrics{}, fmt.Errorf("a beat needs at least 8 samples, got %d", n)
	}
	if len(b.P) != n || len(b.V) != n || (b.DPdt != nil && len(b.DPdt) != n) || (b.Pao != nil && len(b.Pao) != n) || (b.QIn != nil && len(b.QIn) != n) {
		return Metrics{}, errors.New("beat samples have columns of different lengths")
	}
	period := b.T[n-1] - b.T[0]
	if !(period > 0) {
		return Metrics{}, fmt.Errorf("beat has no duration (%g s)", period)
	}
	v0 := k.V0
	if math.IsNaN(v0) {
		v0 = 0
	}
	var m Metrics
	nan := math.NaN()

	dpdt := b.DPdt
	if dpdt == nil {
		dpdt = centralDiff(b.T, b.P)
	}
	imax, imin := 0, 0
	for i, d := range dpdt {
		if d > dpdt[imax] {
			imax = i
		}
		if d < dpdt[imin] {
			imin = i
		}
	}

	// End-diastole: largest volume before the peak rate of pressure rise, so
	// that in a beat whose filling changes (a transient) the filling at its
	// end, which feeds the next beat, is not taken for this beat's preload.
	// In a periodic beat this is the largest volume of the beat.
	last := imax
	if last == 0 {
		last = n - 1
	}
	if b.QIn != nil {
		closed := 0 // the sample after the last of forward flow: the closure
		for i := 0; i < last; i++ {
			if b.QIn[i] > 0 {
				closed = i + 1
			}
		}
		last = closed
	}
	ied := 0
	for i := 1; i <= last && !b.EDAtStart; i++ {
		if b.V[i] > b.V[ied] {
			ied = i
		}
	}
	m.EDV, m.EDP, m.TED = b.V[ied], b.P[ied], b.T[ied]-b.T[0]

	// End-systole: maximal P/(V − V0).
	floor := math.Max(1, 0.02*(m.EDV-v0))
	ies, best := -1, math.Inf(-1)
	for i := range b.V {
		x := b.V[i] - v0
		if x > floor {
			if r := b.P[i] / x; r > best {
				ies, best = i, r
			}
		}
	}
	if ies < 0 {
		return Metrics{}, fmt.Errorf("no sample has a volume above V0 = %g mL: cannot find end-systole", v0)
	}
	m.ESV, m.ESP, m.TES = b.V[ies], b.P[ies], b.T[ies]-b.T[0]

	_, m.VMin = extremes(b.V)
	top := m.EDV // a recording's volume on the isovolumic plateau is noise
	if b.QIn != nil && ies > ied {
		top, _ = extremes(b.V[ied : ies+1])
	}
	m.SV = top - m.VMin
	m.EF = 100 * m.SV / m.EDV
	m.Ea = m.ESP / m.SV
	m.Ees = k.Ees
	m.EaEes = m.Ea / k.Ees
	m.HR = 60 / period
	m.CO = m.SV * m.HR / 1000
	m.EaRT = k.Resistance / period
	m.EaSegers = -0.13 + 1.02*k.Resistance/period + 0.31/k.Compliance

	if b.Pao != nil {
		m.MAP = timeMean(b.T, b.Pao)
		m.SBP, m.DBP = extremes(b.Pao)
	} else {
		m.MAP, m.SBP, m.DBP = nan, nan, nan
	}

	m.SW = loopArea(b.V, b.P)
	m.PE = 0.5 * m.ESP * (m.ESV - v0)
	if x := m.ESV - v0; !math.IsNaN(k.EdpvrA) && !math.IsNaN(k.EdpvrB) && x > 0 {
		m.PE -= k.EdpvrA*math.Expm1(k.EdpvrB*x)/k.EdpvrB - k.EdpvrA*x
	}
	if math.IsNaN(k.V0) {
		m.PE = nan
	}
	m.PVA = m.SW + m.PE
	m.Efficiency = m.SW / m.PVA
	mass := myocardialDensity * k.WallVolume
	m.VO2Per100g = vo2Slope*m.PVA*100/mass + vo2Intercept
	m.VO2 = m.VO2Per100g * mass / 100
	m.MechEff = m.SW * joulePerMmHgML / (m.VO2 * joulePerMLO2)

	m.DPdtMax, m.DPdtMin = dpdt[imax], dpdt[imin]
	m.Tau = weissTau(b.T, b.P, imin, m.EDP+tauWindowAboveEDP)

	m.EDStress = wallStress(m.EDP, m.EDV, k.WallVolume)
	m.ESStress = wallStress(m.ESP, m.ESV, k.WallVolume)
	m.LAPMean, m.AtrialFilling, m.CVP, m.PAPMean, m.RVSV = nan, nan, nan, nan, nan
	m.noDeviceMetrics()
	return m, nil
}

// timeMean is the trapezoidal time average of y over the span of t.
func timeMean(t, y []float64) float64 {
	var s float64
	for i := 1; i < len(t); i++ {
		s += 0.5 * (y[i] + y[i-1]) * (t[i] - t[i-1])
	}
	return s / (t[len(t)-1] - t[0])
}

func extremes(y []float64) (hi, lo float64) {
	hi, lo = y[0], y[0]
	for _, v := range y {
		// Plain comparisons: math.Max and math.Min handle NaN and signed
		// zeros and are several times slower in this hot loop.
		if v > hi {
			hi = v
		}
		if v < lo {
			lo = v
		}
	}
	return hi, lo
}

// loopArea is the area enclosed by the closed polygon (V, P), positive when
// the loop runs counter-clockwise in the PV plane (filling along the bottom,
// ejection along the top): the external work −∮P dV.
func loopArea(v, p []float64) float64 {
	n := len(v)
	var s float64
	for i := 0; i < n; i++ {
		j := (i + 1) % n
		s += v[i]*p[j] - v[j]*p[i]
	}
	return 0.5 * s
}

// centralDiff differentiates y(t) by central differences (one-sided at the ends).
func centralDiff(t, y []float64) []float64 {
	n := len(t)
	d := make([]float64, n)
	for i := 1; i < n-1; i++ {
		d[i] = (y[i+1] - y[i-1]) / (t[i+1] - t[i-1])
	}
	d[0] = (y[1] - y[0]) / (t[1] - t[0])
	d[n-1] = (y[n-1] - y[n-2]) / (t[n-1] - t[n-2])
	return d
}
