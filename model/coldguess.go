package model

import "math"

// coldGuess estimates the start-of-beat state without integrating.
func (p Params) coldGuess() State {
	if p.Circulation == Closed {
		return p.coldClosed()
	}
	// Held: the ventricle filled to the filling pressure, and the arterial
	// pressure of a two-element Windkessel fed by the stroke volume of the
	// coupling estimate SV = (EDV − V0)·Ees/(Ees + Ea) with Ea ≈ R_total/T
	// (docs/science.md §3).
	period := 60 / p.HeartRate
	edv := p.FilledVolume()
	ea := (p.Resistance + p.Zc) / period
	sv := math.Max(0, (edv-p.V0)*p.Ees/(p.Ees+ea))
	pc := windkesselLow(sv, period, p.VenousPressure, p.Resistance, p.Compliance)
	var x State
	x.V[LeftVentricle] = edv
	x.V[SystemicArteries] = unstressedSystemicArteries + p.Compliance*pc
	return x
}

// windkesselLow is the lowest pressure of a two-element Windkessel (r, c)
// draining to pressure downstream and fed the stroke volume sv once a
// period: the pressure jumps by sv/c at ejection, then decays by
// q = exp(−period/(r·c)) over the beat.
func windkesselLow(sv, period, downstream, r, c float64) float64 {
	q := math.Exp(-period / (r * c))
	return downstream + sv/c*q/(1-q)
}

// coldClosed is the cold guess of the closed circulation at p's stressed
// volume: the static estimate of coldClosedAt at the mean LAP whose volume is
// p's, found by bisection (the estimate's volume rises with LAP).
func (p Params) coldClosed() State {
	lo, hi := 0.5, 60.0
	for i := 0; i < 50; i++ {
		mid := 0.5 * (lo + hi)
		if _, v := p.coldClosedAt(mid); v < p.StressedVolume {
			lo = mid
		} else {
			hi = mid
		}
	}
	x, _ := p.coldClosedAt(0.5 * (lo + hi))
	return x
}

// coldClosedAt estimates the closed circulation's start-of-beat state at a
// mean left-atrial pressure lap, from mean flows through its resistances: the
// left ventricle fills to its EDPVR at lap and ejects the coupling estimate's
// stroke volume; that flow sets the pressure drops along the circuit; the
// right ventricle holds that stroke volume above its end-systolic volume at
// the pulmonary pressure. At the start of a beat the arteries are at their
// diastolic low (the two-element Windkessel's, as in the held guess) and the
// atria at their mean pressure under their elastance of that moment, just
// after their contraction. It returns the state and its stressed volume.
func (p Params) coldClosedAt(lap float64) (State, float64) {
	period := 60 / p.HeartRate
	edv := p.volumeAt(lap)
	ea := (p.Resistance + p.Zc) / period
	sv := math.Max(1, (edv-p.V0)*p.Ees/(p.Ees+ea))
	q := sv / period
	ppv := lap + q*pulmonaryVeinToAtrium
	ppa := ppv + q*p.PulmonaryResistance
	edvRV := p.RVV0 + 1.2*ppa/p.RVEes + sv
	pra := math.Max(0.5, p.RVEdpvrA*math.Expm1(p.RVEdpvrB*(edvRV-p.RVV0)))
	psv := pra + q*p.VenousReturnResistance/(1-p.CavalOcclusion/100)
	psa := psv + q*p.Resistance
	diastolic := func(mean, downstream, r, c float64) float64 {
		return math.Min(windkesselLow(sv, period, downstream, r, c), mean)
	}
	atr := newAtrialActivation(p.HeartRate, p.PRInterval)
	eAtria := p.AtrialEmin + atr.E(0)*(p.AtrialEmax-p.AtrialEmin)
	var x State
	x.V[LeftVentricle] = edv
	x.V[SystemicArteries] = unstressedSystemicArteries + p.Compliance*diastolic(psa, psv, p.Resistance, p.Compliance)
	x.V[SystemicVeins] = unstressedSystemicVeins + p.VenousCompliance*psv
	x.V[RightAtrium] = atrialV0 + pra/eAtria
	x.V[RightVentricle] = edvRV
	x.V[PulmonaryArteries] = unstressedPulmonaryArtery + p.PulmonaryCompliance*diastolic(ppa, ppv, p.PulmonaryResistance, p.PulmonaryCompliance)
	x.V[PulmonaryVeins] = unstressedPulmonaryVeins + p.PulmonaryVenousComp*ppv
	x.V[LeftAtrium] = atrialV0 + lap/eAtria
	return x, p.stressedVolumeOf(x)
}
