package model

import "math"

// sample turns the dense record of the last integrated beat into a measured
// Beat; a beat checkBeat refuses comes with its error.
func (s *Solver) sample(start, end State, lap float64) (*Beat, error) {
	c := &s.c
	period := c.act.Period
	dt := s.SampleInterval
	if !(dt > 0) {
		dt = DefaultSampleInterval
	}
	n := int(math.Floor(period/dt+1e-9)) + 1
	extra := append([]float64{s.diastoleStart()}, s.leftEvents...)
	if c.closed {
		// The atria's contraction starts and ends on a sample, so that the
		// filling measured during it is exact (metrics_circulation.go).
		extra = append(extra, c.atr.bounds()...)
	}
	times := make([]float64, 0, n+len(extra)+1)
	for i := 0; i < n; i++ {
		times = append(times, float64(i)*dt)
	}
	if last := times[len(times)-1]; period-last > 1e-9 {
		times = append(times, period)
	} else {
		times[len(times)-1] = period
	}
	times = mergeTimes(times, extra)

	b := &Beat{Params: s.p, Start: start, End: end, Period: period, T: times, Valves: s.valves, LAPMean: lap,
		DiastoleStart: s.diastoleStart(), BalloonOnset: c.bal.onset}
	m := len(times)
	dim := c.dim()
	comps := dim
	if c.closed {
		comps = int(NumCompartments)
	}
	// One allocation: the volumes (and ∫P_LA), the pressures, then the flows.
	nflow := 5
	if c.closed {
		nflow = 7
	}
	buf := make([]float64, (dim+comps+nflow)*m)
	cols := make([][]float64, dim)
	for i := range cols {
		cols[i], buf = buf[:m:m], buf[m:]
	}
	for i := 0; i < comps; i++ {
		b.V[i] = cols[i]
		b.P[i], buf = buf[:m:m], buf[m:]
	}
	b.PAO, buf = buf[:m:m], buf[m:]
	b.QIn, buf = buf[:m:m], buf[m:]
	b.QOut, buf = buf[:m:m], buf[m:]
	b.DPdt, buf = buf[:m:m], buf[m:]
	b.QPump, buf = buf[:m:m], buf[m:]
	if c.closed {
		b.QTricuspid, buf = buf[:m:m], buf[m:]
		b.QPulmonic = buf[:m:m]
	}
	b.VLV, b.PLV = b.V[LeftVentricle], b.P[LeftVentricle]
	s.dense.Eval(times, cols)

	grid := s.activationGrid(dt, n)
	mitral, aortic := &c.valves[mitralValve], &c.valves[aorticValve]
	var y [closedDim]float64
	var pr [NumCompartments]float64
	j := 0 // next time of the uniform grid
	for i, t := range times {
		var e, de float64
		if j < len(grid.e) && t == float64(j)*dt {
			e, de = grid.e[j], grid.de[j]
			j++
		} else {
			e, de = c.table.at(t)
		}
		// The flows as the valves let them pass: a valve is open where its
		// driving pressure is positive (the events put the switches on zeros).
		for k, col := range cols {
			y[k] = col[i]
		}
		plv, dpdv, dpde := c.lv.pressureAndSlopes(e, y[LeftVentricle])
		c.loadPressuresInto(&pr, t, e, y[:dim])
		pr[LeftVentricle] = plv
		for k := range comps {
			b.P[k][i] = pr[k]
		}
		psa, pla := pr[SystemicArteries], pr[LeftAtrium]
		if c.closed {
			prv := pr[RightVentricle]
			b.QTricuspid[i] = c.valves[tricuspidValve].sampleFlow(pr[RightAtrium] - prv)
			b.QPulmonic[i] = c.valves[pulmonicValve].sampleFlow(prv - pr[PulmonaryArteries])
		}
		qin := mitral.sampleFlow(pla - plv)
		qout := aortic.sampleFlow(plv - psa)
		qpump := c.pump.flow(plv, psa)
		b.QIn[i], b.QOut[i], b.QPump[i] = qin, qout, qpump
		b.PAO[i] = psa + c.zc*qout
		b.DPdt[i] = dpde*de + dpdv*(qin-qout-qpump)
	}
	if err := checkSuction(b); err != nil {
		return nil, err
	}
	m2, err := Measure(b.Samples(), s.p.Known())
	if err != nil {
		return nil, err
	}
	b.Metrics = m2
	s.measureCirculation(b)
	s.measureDevices(b)
	return b, checkBeat(b)
}

// actGrid holds e(t) and de/dt on the uniform sample grid of one beat period.
type actGrid struct {
	period, dt float64 // the period sets the activation (its peak too)
	e, de      []float64
}

// activationGrid returns the activation on the first n times of the grid
// i·dt, computed once per heart rate and sample interval: the steady states
// of a session share them, and evaluating them is a good part of sampling.
func (s *Solver) activationGrid(dt float64, n int) *actGrid {
	g := &s.grid
	a := &s.c.act
	if g.period != a.Period || g.dt != dt || len(g.e) != n {
		g.period, g.dt = a.Period, dt
		g.e, g.de = make([]float64, n), make([]float64, n)
		for i := range g.e {
			g.e[i], g.de[i] = s.c.table.at(float64(i) * dt)
		}
	}
	return g
}

// mergeTimes inserts the finite values of extra into the sorted times, skipping
// ones that fall on an existing time.
func mergeTimes(times, extra []float64) []float64 {
	for _, t := range extra {
		if !finite(t) {
			continue
		}
		i := 0
		for i < len(times) && times[i] < t {
			i++
		}
		if i < len(times) && times[i]-t < 1e-9 || i > 0 && t-times[i-1] < 1e-9 {
			continue
		}
		times = append(times, 0)
		copy(times[i+1:], times[i:])
		times[i] = t
	}
	return times
}

// Known returns what the model knows of its own heart and load, for Measure.
func (p Params) Known() Known {
	return Known{
		V0: p.V0, Ees: p.Ees, EdpvrA: p.EdpvrA, EdpvrB: p.EdpvrB,
		WallVolume: p.WallVolume, Resistance: p.Resistance + p.Zc, Compliance: p.Compliance,
	}
}
