package model

import "math"

// Compartment names one volume of the model's state.
type Compartment int

// The compartments in the order blood passes them, starting at the left
// ventricle. A held circulation has the first two only.
const (
	LeftVentricle Compartment = iota
	SystemicArteries
	SystemicVeins
	RightAtrium
	RightVentricle
	PulmonaryArteries
	PulmonaryVeins
	LeftAtrium
	NumCompartments
)

// CompartmentKeys are the short names of the compartments in output columns
// (v_KEY_ml, p_KEY_mmhg).
var CompartmentKeys = [NumCompartments]string{"lv", "sa", "sv", "ra", "rv", "pa", "pv", "la"}

// CompartmentNames are the compartments' names for screens.
var CompartmentNames = [NumCompartments]string{"left ventricle", "systemic arteries", "systemic veins",
	"right atrium", "right ventricle", "pulmonary arteries", "pulmonary veins", "left atrium"}

// State is the model's state at the start of a beat (the onset of
// ventricular activation): the volume of every compartment, mL. A held
// circulation uses the left ventricle and the systemic arteries only.
type State struct {
	V [NumCompartments]float64
	// BalloonRested says that the beat which ended here did not inflate an
	// aortic balloon, so that at 1:2 the next beat does (balloon.go).
	BalloonRested bool
}

// Dimensions of the ODE system: the held circuit's two volumes; the closed
// circuit's eight volumes and the running integral of left-atrial pressure.
const (
	heldDim   = 2
	closedDim = int(NumCompartments) + 1
	lapInt    = int(NumCompartments) // index of ∫P_LA dt
)

// circuit assembles the parts of the circulation for one parameter set and
// evaluates its equations. The parts, each in its own file:
//
//   - left and right ventricle: time-varying elastance (ventricle.go), one
//     activation (activation.go);
//   - left and right atrium: contracting elastance (atrium.go), activated a
//     PR interval before the ventricles;
//   - systemic arteries: a three-element Windkessel, compliance C with the
//     characteristic impedance Zc at its inlet and the peripheral resistance R
//     at its outlet (docs/science.md §2);
//   - systemic veins, pulmonary arteries and pulmonary veins: compliances
//     (vessel.go) joined by the venous return, pulmonary and pulmonary-venous
//     resistances;
//   - mitral, aortic, tricuspid and pulmonary valves (valve.go), the left
//     heart's with their lesions (lesion.go);
//   - support devices: a pump from the left ventricle to the systemic
//     arteries (pump.go) and a balloon inside them (balloon.go).
//
// Blood runs LV → aortic valve → Zc → systemic arteries → R → systemic veins →
// venous return resistance → RA → tricuspid valve → RV → pulmonary valve →
// pulmonary arteries → pulmonary resistance → pulmonary veins → LA → mitral
// valve → LV. In the held circuit the left atrium is a pressure source at the
// filling pressure and the systemic veins a sink at the venous pressure.
// A pump runs from the LV to the systemic arteries beside the aortic valve.
type circuit struct {
	closed    bool
	lv, rv    ventricle
	atria     atrium
	sa        vessel // systemic arteries: compliance C
	sv        vessel // systemic veins
	pa, pv    vessel // pulmonary arteries and veins
	valves    [numValves]valve
	pump      pump
	bal       balloon
	zc, r     float64 // Windkessel Zc and R
	rvr, rp   float64 // venous return (with any caval occlusion) and pulmonary resistance
	fill, pv0 float64 // held: left-atrial and venous pressure
	act       Activation
	table     *activationTable             // act on knots, for the right-hand side
	tables    map[float64]*activationTable // kept by heart rate, a few
	atr       atrialActivation

	// Cache of the pressures of the last (t, y) evaluated: the events are
	// evaluated at the end of each step, where rhs has just been (FSAL).
	cacheT float64
	cacheY [closedDim]float64
	cacheP [NumCompartments]float64
}

// setParams builds the circuit of p, keeping the activations when the heart
// rate and PR interval stay.
func (c *circuit) setParams(p *Params) {
	c.closed = p.Circulation == Closed
	c.lv, c.rv, c.atria = p.lv(), p.rv(), p.atria()
	c.sa = vessel{p.Compliance, unstressedSystemicArteries}
	c.sv = vessel{p.VenousCompliance, unstressedSystemicVeins}
	c.pa = vessel{p.PulmonaryCompliance, unstressedPulmonaryArtery}
	c.pv = vessel{p.PulmonaryVenousComp, unstressedPulmonaryVeins}
	c.valves[mitralValve].r = p.MitralResistance
	c.valves[aorticValve].r = p.AorticResistance + p.Zc
	c.valves[tricuspidValve].r = tricuspidResistance
	c.valves[pulmonicValve].r = pulmonicResistance
	c.setLesions(p)
	c.pump = p.pumpOf()
	c.zc, c.r = p.Zc, p.Resistance
	c.rvr = p.VenousReturnResistance / (1 - p.CavalOcclusion/100)
	c.rp = p.PulmonaryResistance
	c.fill, c.pv0 = p.FillingPressure, p.VenousPressure
	if c.act.Period == 0 || c.act.Period != 60/p.HeartRate {
		c.act = NewActivation(p.HeartRate)
		c.table = c.tables[p.HeartRate]
		if c.table == nil {
			if len(c.tables) >= maxTables {
				clear(c.tables) // a sweep over many rates: start afresh
			}
			if c.tables == nil {
				c.tables = map[float64]*activationTable{}
			}
			c.table = newActivationTable(&c.act)
			c.tables[p.HeartRate] = c.table
		}
		c.bal.relax = math.NaN() // found when a balloon needs it
	}
	c.bal.vol, c.bal.ratio, c.bal.period = p.BalloonVolume, int(p.BalloonRatio), c.act.Period
	if c.closed && (c.atr.period != c.act.Period || c.atr.pr != p.PRInterval/1000) {
		c.atr = newAtrialActivation(p.HeartRate, p.PRInterval)
	}
	c.cacheT = -1
}

// maxTables caps the activation tables a circuit keeps, one per heart rate.
const maxTables = 16

// dim is the dimension of the circuit's ODE system.
func (c *circuit) dim() int {
	if c.closed {
		return closedDim
	}
	return heldDim
}

// unstressed returns the unstressed volume of every compartment, mL: the
// chambers' V0 and the vessels' Vu. The stressed volume is the sum of the
// volumes above them.
func (p *Params) unstressed() [NumCompartments]float64 {
	return [NumCompartments]float64{p.V0, unstressedSystemicArteries, unstressedSystemicVeins, atrialV0,
		p.RVV0, unstressedPulmonaryArtery, unstressedPulmonaryVeins, atrialV0}
}

// pressures returns the pressure of every compartment at time t of the beat
// and state y; cached for the last (t, y).
func (c *circuit) pressures(t float64, y []float64) *[NumCompartments]float64 {
	if t == c.cacheT && c.sameY(y) {
		return &c.cacheP
	}
	e, _ := c.table.at(t)
	c.pressuresInto(&c.cacheP, t, e, y)
	c.cacheT = t
	copy(c.cacheY[:], y)
	return &c.cacheP
}

// pressuresInto writes the pressures at (t, y), with the ventricular
// activation e given, into p.
func (c *circuit) pressuresInto(p *[NumCompartments]float64, t, e float64, y []float64) {
	p[LeftVentricle] = c.lv.pressure(e, y[LeftVentricle])
	c.loadPressuresInto(p, t, e, y)
}

// loadPressuresInto writes every pressure at (t, y) but the left
// ventricle's into p.
func (c *circuit) loadPressuresInto(p *[NumCompartments]float64, t, e float64, y []float64) {
	p[SystemicArteries] = c.sa.pressure(y[SystemicArteries] + c.bal.volume(t))
	if c.closed {
		ea := c.atr.E(t)
		p[SystemicVeins] = c.sv.pressure(y[SystemicVeins])
		p[RightAtrium] = c.atria.pressure(ea, y[RightAtrium])
		p[RightVentricle] = c.rv.pressure(e, y[RightVentricle])
		p[PulmonaryArteries] = c.pa.pressure(y[PulmonaryArteries])
		p[PulmonaryVeins] = c.pv.pressure(y[PulmonaryVeins])
		p[LeftAtrium] = c.atria.pressure(ea, y[LeftAtrium])
	} else {
		p[SystemicVeins] = c.pv0
		p[LeftAtrium] = c.fill
	}
}

func (c *circuit) sameY(y []float64) bool {
	for i, v := range y {
		if c.cacheY[i] != v {
			return false
		}
	}
	return true
}

// flows are the flows of the circuit at one instant, mL/s.
type flows struct {
	mitral, aortic, tricuspid, pulmonic float64 // valves
	pump                                float64 // LV to systemic arteries
	systemic, venous, pulmonary, pvla   float64 // R, venous return, pulmonary and pulmonary-venous resistances
}

// flowsAt returns the flows at the pressures p.
func (c *circuit) flowsAt(p *[NumCompartments]float64) flows {
	var f flows
	f.mitral = c.valves[mitralValve].flow(p[LeftAtrium] - p[LeftVentricle])
	f.aortic = c.valves[aorticValve].flow(p[LeftVentricle] - p[SystemicArteries])
	f.pump = c.pump.flow(p[LeftVentricle], p[SystemicArteries])
	f.systemic = (p[SystemicArteries] - p[SystemicVeins]) / c.r
	if c.closed {
		f.venous = (p[SystemicVeins] - p[RightAtrium]) / c.rvr
		f.tricuspid = c.valves[tricuspidValve].flow(p[RightAtrium] - p[RightVentricle])
		f.pulmonic = c.valves[pulmonicValve].flow(p[RightVentricle] - p[PulmonaryArteries])
		f.pulmonary = (p[PulmonaryArteries] - p[PulmonaryVeins]) / c.rp
		f.pvla = (p[PulmonaryVeins] - p[LeftAtrium]) / pulmonaryVeinToAtrium
	}
	return f
}

// rhs is the model's equations: the rate of change of every volume is its
// inflow less its outflow, so the volumes' sum is conserved exactly.
func (c *circuit) rhs(t float64, y, dy []float64) {
	p := c.pressures(t, y)
	f := c.flowsAt(p)
	dy[LeftVentricle] = f.mitral - f.aortic - f.pump
	dy[SystemicArteries] = f.aortic + f.pump - f.systemic
	if !c.closed {
		return
	}
	dy[SystemicVeins] = f.systemic - f.venous
	dy[RightAtrium] = f.venous - f.tricuspid
	dy[RightVentricle] = f.tricuspid - f.pulmonic
	dy[PulmonaryArteries] = f.pulmonic - f.pulmonary
	dy[PulmonaryVeins] = f.pulmonary - f.pvla
	dy[LeftAtrium] = f.pvla - f.mitral
	dy[lapInt] = p[LeftAtrium]
}

// valveDrive returns the pressure across valve i (upstream less downstream)
// at (t, y): the valve opens when it rises through zero and shuts when it
// falls through zero.
func (c *circuit) valveDrive(i int, t float64, y []float64) float64 {
	p := c.pressures(t, y)
	switch i {
	case mitralValve:
		return p[LeftAtrium] - p[LeftVentricle]
	case aorticValve:
		return p[LeftVentricle] - p[SystemicArteries]
	case tricuspidValve:
		return p[RightAtrium] - p[RightVentricle]
	}
	return p[RightVentricle] - p[PulmonaryArteries]
}

// numValvesOf is the number of valves of the circuit.
func (c *circuit) numValvesOf() int {
	if c.closed {
		return numValves
	}
	return 2
}

// isovolumic reports whether a ventricle has both its valves shut, when its
// volume ignores the activation and the solver must not take long steps.
func (c *circuit) isovolumic() bool {
	v := &c.valves
	if !v[mitralValve].open && !v[aorticValve].open {
		return true
	}
	return c.closed && !v[tricuspidValve].open && !v[pulmonicValve].open
}
