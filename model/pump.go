package model

// pump is a continuous-flow pump that draws from the left ventricle and
// returns into the systemic arteries (docs/science.md §12). At a set speed its
// flow falls with the head it works against, H = P_out − P_in, along the
// linear head–flow curve
//
//	Q = Q0·(1 − H/H0),
//
// a generic form for such pumps [memory]; Q0 (the flow at zero head) and H0
// (the head at zero flow) are levers, our own values, not a maker's curve.
// Above H0 the flow runs backwards through the pump, as in a pump turning
// too slowly for the aortic pressure. The outlet is the arterial compliance
// beyond Zc, so the head is P_SA − P_LV.
type pump struct {
	q0, h0 float64 // mL/s and mmHg; q0 = 0 is off
}

// defaultPumpHead is the head at zero flow of the pump levers' off setting,
// mmHg: our own round value, which with 3.5 L/min at zero head gives about
// 2.4 L/min against a mean head of 45 mmHg [derived].
const defaultPumpHead = 150

// mlPerSPerLPerMin converts L/min to mL/s.
const mlPerSPerLPerMin = 1000.0 / 60

// pumpOf returns the pump of p.
func (p *Params) pumpOf() pump {
	return pump{q0: p.PumpFlow * mlPerSPerLPerMin, h0: p.PumpHead}
}

// flow returns the pump's flow (mL/s) from inlet pressure pin to outlet
// pressure pout (mmHg).
func (q *pump) flow(pin, pout float64) float64 {
	if q.q0 == 0 {
		return 0
	}
	return q.q0 * (1 - (pout-pin)/q.h0)
}
