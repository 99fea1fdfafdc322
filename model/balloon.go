package model

import "math"

// balloon is an aortic counterpulsation balloon (docs/science.md §12): a gas
// volume inside the systemic arteries that displaces blood, so that the
// arterial pressure is (V_SA + Vb(t) − Vu)/C while the blood volume stays
// what it is. It inflates when the aortic valve shuts (the dicrotic notch)
// and is empty again by the end of the beat, the onset of the next
// contraction, before the aortic valve opens. Inflation and deflation each
// follow a half-cosine over balloonRamp, so the arterial pressure stays
// smooth. At 1:2 it inflates in every other beat.
//
// When the aortic valve does not open in a beat (a pump carrying the whole
// output), the balloon inflates where the ventricle's activation has fallen
// to half its peak, a stand-in for the end of systole.
type balloon struct {
	vol    float64 // mL; 0 = off
	ratio  int     // beats per inflation
	period float64 // s
	relax  float64 // stand-in for the end of systole, s
	onset  float64 // inflation onset in this beat, s; NaN until it inflates
	skip   bool    // this beat does not inflate (1:2)
}

// balloonRamp is the time the balloon takes to fill or to empty, s: our own
// round value [common practice, no source].
const balloonRamp = 0.05

// maxBalloonVolume is the largest balloon, mL: adult balloons hold 25–50 mL
// [memory, docs/science.md §12].
const maxBalloonVolume = 50

// halfRelaxed is the time after the activation peak where e falls to ½, s.
func halfRelaxed(a *Activation) float64 {
	lo, hi := a.TPeak, a.Period
	for range 60 {
		mid := 0.5 * (lo + hi)
		if a.E(mid) > 0.5 {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi)
}

// on reports whether there is a balloon.
func (b *balloon) on() bool { return b.vol > 0 }

// begin prepares a beat; rested says the previous beat did not inflate, so
// that at 1:2 this one does.
func (b *balloon) begin(rested bool) {
	b.onset = math.NaN()
	b.skip = b.ratio == 2 && !rested
}

// inflate starts inflation at t, once per beat.
func (b *balloon) inflate(t float64) {
	if b.on() && !b.skip && math.IsNaN(b.onset) {
		b.onset = t
	}
}

// inflated reports whether the balloon inflated in this beat.
func (b *balloon) inflated() bool { return !math.IsNaN(b.onset) }

// volume returns the balloon's volume at t, mL.
func (b *balloon) volume(t float64) float64 {
	if !(t > b.onset) { // NaN onset: not inflated
		return 0
	}
	v := b.vol
	if x := (t - b.onset) / balloonRamp; x < 1 {
		v *= halfCosine(x)
	}
	if x := (b.period - t) / balloonRamp; x < 1 {
		v *= halfCosine(math.Max(x, 0))
	}
	return v
}

// halfCosine rises smoothly from 0 at x = 0 to 1 at x = 1, with zero slope at both.
func halfCosine(x float64) float64 { return 0.5 * (1 - math.Cos(math.Pi*x)) }
