package model

// Valve lesions as orifices (docs/science.md §11). Blood passing an orifice
// of effective area A at flow Q loses the pressure of its jet's velocity,
// Bernoulli's ΔP = (ρ/2)·(Q/A)², with no recovery downstream. A stenosis adds
// such a loss to the open valve; regurgitation is an orifice through the shut
// valve. The areas are effective ones (the jet's, the vena contracta), so no
// discharge coefficient is applied. The jet has no inertia here: the gradient
// follows the flow instant by instant.

// bloodDensity is ρ, g/mL [memory, docs/science.md §11].
const bloodDensity = 1.06

// dynPerMmHg converts dyn/cm² to mmHg [derived: 13.5951 g/cm³ · 980.665 cm/s² · 0.1 cm].
const dynPerMmHg = 1333.22

// Normal areas of the open valves, cm²: the upper ends of the adult normal
// ranges of 3–4 (aortic) and 4–6 cm² (mitral) [memory, docs/science.md §11].
// A valve of normal area has no lesion: its losses are in its open
// resistance.
const (
	NormalAorticValveArea = 4
	NormalMitralValveArea = 6
)

// orificeCoef is the Bernoulli coefficient k = ρ/(2A²) of an orifice of area
// a (cm²), in mmHg/(mL/s)², so that ΔP = k·Q² (0 for no orifice).
func orificeCoef(a float64) float64 {
	if !(a > 0) {
		return 0
	}
	return bloodDensity / (2 * dynPerMmHg * a * a)
}

// stenosisCoef is the orifice loss of a valve of area a beyond that of a
// normal valve of area normal, k = (ρ/2)·(1/a² − 1/normal²): zero at the
// normal area, so that the lever's normal value is exactly the valve
// without a lesion, and within 7 % of the bare orifice's at a severe
// stenosis (1 cm² or less against 4 or 6 cm²) [derived].
func stenosisCoef(a, normal float64) float64 {
	if !(a > 0) || a >= normal {
		return 0
	}
	return orificeCoef(a) - orificeCoef(normal)
}

// setLesions gives the mitral and aortic valves of c the lesions of p.
func (c *circuit) setLesions(p *Params) {
	mv, av := &c.valves[mitralValve], &c.valves[aorticValve]
	mv.k = stenosisCoef(p.MitralValveArea, NormalMitralValveArea)
	av.k = stenosisCoef(p.AorticValveArea, NormalAorticValveArea)
	mv.kr = orificeCoef(p.MitralRegurgitantArea)
	av.kr = orificeCoef(p.AorticRegurgitantArea)
}
