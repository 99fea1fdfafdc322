package model

// vessel is a compliant vascular compartment: V = Vu + C·P, so
// P = (V − Vu)/C, with Vu its unstressed volume (docs/science.md §9).
type vessel struct {
	c, vu float64 // compliance (mL/mmHg) and unstressed volume (mL)
}

// pressure returns the transmural pressure (mmHg) at volume v (mL).
func (s *vessel) pressure(v float64) float64 { return (v - s.vu) / s.c }

// Unstressed volumes of the vascular compartments of an adult, mL, which with
// the stressed volume of about 1.3–1.5 L make a blood volume near 5 L
// (stressed volume 20–30 % of the total) [memory, docs/science.md §9]. They do
// not change the dynamics, only how much blood the compartments hold.
const (
	unstressedSystemicArteries = 600
	unstressedSystemicVeins    = 2500
	unstressedPulmonaryArtery  = 90
	unstressedPulmonaryVeins   = 400
)

// Resistances of the closed circulation that are not levers, mmHg·s/mL: the
// open tricuspid and pulmonary valves (a few mmHg at peak flow, as the left
// valves) and the pulmonary veins' entry to the left atrium [memory].
const (
	tricuspidResistance   = 0.005
	pulmonicResistance    = 0.003
	pulmonaryVeinToAtrium = 0.015
)
