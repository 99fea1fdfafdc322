package analysis

import (
	"errors"
	"fmt"
	"math"
)

// ChenEes is the single-beat estimate of end-systolic elastance of Chen et
// al. 2001 (JACC 38:2028; docs/science.md §5):
//
//	Ees(sb) = [Pd − ENd(est)·Pes] / [ENd(est)·SV],  Pes = 0.9·Ps
//	ENd(avg) = 0.35695 − 7.2266t + 74.249t² − 307.39t³ + 684.54t⁴ − 856.92t⁵ + 571.95t⁶ − 159.1t⁷,  t = tNd
//	ENd(est) = 0.0275 − 0.165·EF + 0.3656·(Pd/Pes) + 0.515·ENd(avg)
//
// ps and pd are systolic and diastolic arterial pressure (mmHg), sv stroke
// volume (mL), ef the ejection fraction as a fraction, tnd the pre-ejection
// time over the total systolic time.
type ChenEes struct {
	Ees    float64 // mmHg/mL
	ENdAvg float64 // group-averaged normalised elastance at aortic opening
	ENdEst float64 // its estimate for this beat
}

// Chen2001 computes the Chen et al. 2001 single-beat Ees.
func Chen2001(ps, pd, sv, ef, tnd float64) (ChenEes, error) {
	if !(ps > 0 && pd > 0 && sv > 0 && ef > 0 && ef < 1 && tnd > 0 && tnd < 1) {
		return ChenEes{}, fmt.Errorf("single-beat Ees needs positive pressures and SV, EF and tNd between 0 and 1 (Ps %.3g, Pd %.3g, SV %.3g, EF %.3g, tNd %.3g)",
			ps, pd, sv, ef, tnd)
	}
	t := tnd
	avg := 0.35695 + t*(-7.2266+t*(74.249+t*(-307.39+t*(684.54+t*(-856.92+t*(571.95+t*(-159.1)))))))
	pes := 0.9 * ps
	est := 0.0275 - 0.165*ef + 0.3656*(pd/pes) + 0.515*avg
	ees := (pd - est*pes) / (est * sv)
	if !(ees > 0) || !(est > 0) {
		return ChenEes{ees, avg, est}, fmt.Errorf("single-beat Ees is not positive (%.3g mmHg/mL): the beat is outside the method's range", ees)
	}
	return ChenEes{Ees: ees, ENdAvg: avg, ENdEst: est}, nil
}

// KlotzEDPVR is the single-beat end-diastolic pressure–volume relation of
// Klotz et al. 2006 (Am J Physiol Heart; 2007 Nat Protoc; docs/science.md §5),
// P = Alpha·V^Beta, estimated from one end-diastolic point.
type KlotzEDPVR struct {
	V0    float64 // mL, EDV·(0.6 − 0.006·EDP)
	V30   float64 // mL, volume at 30 mmHg
	Alpha float64 // mmHg/mL^Beta
	Beta  float64
}

// Klotz2006 estimates the EDPVR from end-diastolic volume (mL) and pressure
// (mmHg):
//
//	V0 = EDV·(0.6 − 0.006·EDP);  V30 = V0 + (EDV − V0)/(EDP/An)^(1/Bn), An = 27.78 mmHg, Bn = 2.76
//	EDP ≤ 22: β = ln(EDP/30)/ln(EDV/V30), α = 30/V30^β
//	EDP > 22: V15 = 0.8·(V30 − V0) + V0, β = ln(EDP/15)/ln(EDV/V15), α = EDP/EDV^β
func Klotz2006(edv, edp float64) (KlotzEDPVR, error) {
	if !(edv > 0 && edp > 0) {
		return KlotzEDPVR{}, fmt.Errorf("the single-beat EDPVR needs positive EDV and EDP (got %.3g mL, %.3g mmHg)", edv, edp)
	}
	const an, bn = 27.78, 2.76
	var k KlotzEDPVR
	k.V0 = edv * (0.6 - 0.006*edp)
	k.V30 = k.V0 + (edv-k.V0)/math.Pow(edp/an, 1/bn)
	if edp <= 22 {
		k.Beta = math.Log(edp/30) / math.Log(edv/k.V30)
		k.Alpha = 30 / math.Pow(k.V30, k.Beta)
	} else {
		v15 := 0.8*(k.V30-k.V0) + k.V0
		k.Beta = math.Log(edp/15) / math.Log(edv/v15)
		k.Alpha = edp / math.Pow(edv, k.Beta)
	}
	if math.IsNaN(k.Beta) || math.IsInf(k.Beta, 0) || !(k.Beta > 0) {
		return k, errors.New("the single-beat EDPVR has no rising solution for this end-diastolic point")
	}
	return k, nil
}

// Pressure is the EDPVR's pressure at volume v, mmHg.
func (k KlotzEDPVR) Pressure(v float64) float64 { return k.Alpha * math.Pow(v, k.Beta) }
