package analysis

import (
	"fmt"
	"math"

	"pvcouple/model"
)

// Run is one preload run with what is fitted to its beats.
type Run struct {
	Beats   []*Beat
	Falling bool // EDV falls (an occlusion) rather than rises
	ESPVR   *ESPVRFit
	EDPVR   *EDPVRFit
	PRSW    *PRSWFit  // Glower et al. 1985
	DPdtEDV *SlopeFit // Little 1985
	Emax    *EmaxFit  // isochronal time-varying elastance
	Notes   []string  // fits that failed, and why
}

// First and Last are the run's first and last beat numbers.
func (r *Run) First() int { return r.Beats[0].Index }

// Last is the run's last beat number.
func (r *Run) Last() int { return r.Beats[len(r.Beats)-1].Index }

func (r *Run) notef(format string, x ...any) { r.Notes = append(r.Notes, fmt.Sprintf(format, x...)) }

// known is base with the run's ESPVR and EDPVR.
func (r *Run) known(base model.Known) model.Known {
	k := base
	if r.ESPVR != nil {
		k.V0, k.Ees = r.ESPVR.V0, r.ESPVR.Ees
	}
	if r.EDPVR != nil {
		k.EdpvrA, k.EdpvrB = r.EDPVR.A, r.EDPVR.B
	}
	return k
}

// fitRuns finds the preload runs and fits each.
func (a *Analysis) fitRuns() {
	var kept []*Beat
	for _, b := range a.Beats {
		if b.Kept() && b.Measured {
			kept = append(kept, b)
		}
	}
	for k, beats := range findRuns(kept, a.sdEDV) {
		run := &Run{Beats: beats, Falling: beats[len(beats)-1].Metrics.EDV < beats[0].Metrics.EDV}
		for _, b := range beats {
			b.Run = k
		}
		a.fitRun(run)
		a.Runs = append(a.Runs, run)
	}
	if len(a.Runs) == 0 {
		a.notef("no ESPVR or EDPVR: end-diastolic volume does not change by %.0f %% across %d or more kept beats in a row",
			minPreloadChange*100, MinESPVRBeats)
		return
	}
	first := a.Runs[0]
	for _, run := range a.Runs {
		if run.ESPVR != nil {
			first = run
			break
		}
	}
	a.PreloadRun, a.ESPVR, a.EDPVR = first.Beats, first.ESPVR, first.EDPVR
	a.Known = first.known(a.Known)
	if a.ESPVR != nil {
		a.V0Source, a.EesSource = SourceESPVR, SourceESPVR
	}
	for _, run := range a.Runs {
		for _, n := range run.Notes {
			a.notef("beats %d–%d: %s", run.First(), run.Last(), n)
		}
	}
}

// fitRun fits the relations and indices of one run.
func (a *Analysis) fitRun(run *Run) {
	samples := make([]model.BeatSamples, len(run.Beats))
	for i, b := range run.Beats {
		samples[i] = b.Samples()
	}
	v0Start := 0.0
	if a.V0Source == SourceVolumeFloor {
		v0Start = a.Known.V0
	}
	var fit ESPVRFit
	var err error
	if a.Options.ESPVR == "quadratic" {
		fit, err = FitESPVRQuadratic(samples, v0Start)
	} else {
		fit, err = FitESPVR(samples, v0Start)
	}
	if err != nil {
		run.notef("ESPVR not fitted: %v", err)
	} else {
		run.ESPVR = &fit
		if fit.R2 < 0.9 {
			a.warnf("the ESPVR of beats %d–%d fits its end-systolic points poorly (r² %.3f)", run.First(), run.Last(), fit.R2)
		}
	}
	v0 := 0.0
	if run.ESPVR != nil {
		v0 = run.ESPVR.V0
	} else {
		run.notef("EDPVR fitted with V0 = 0 mL, as no ESPVR gives V0")
	}
	n := len(run.Beats)
	pts := make([]Point, n)
	edv, sw, dpdt := make([]float64, n), make([]float64, n), make([]float64, n)
	for i, b := range run.Beats {
		pts[i] = Point{b.Metrics.EDV, b.Metrics.EDP}
		edv[i], sw[i], dpdt[i] = b.Metrics.EDV, b.Metrics.SW, b.Metrics.DPdtMax
	}
	if ed, err := FitEDPVR(pts, v0); err != nil {
		run.notef("EDPVR not fitted: %v", err)
	} else {
		run.EDPVR = &ed
	}
	if p, err := FitPRSW(edv, sw); err != nil {
		run.notef("PRSW not fitted: %v", err)
	} else {
		run.PRSW = &p
	}
	if d, err := FitDPdtEDV(edv, dpdt); err != nil {
		run.notef("dP/dt max–EDV slope not fitted: %v", err)
	} else {
		run.DPdtEDV = &d
	}
	// Isochrones up to a tenth of a beat past the latest end of ejection.
	end := 0.0
	for _, b := range run.Beats {
		if b.Ejection.Found() {
			end = math.Max(end, b.Ejection.Close+float64(b.from-b.onset)*b.seg.dt)
		}
	}
	if end == 0 {
		run.notef("Emax(t) not fitted: no beat of the run has a clear end of ejection")
		return
	}
	if e, err := fitEmax(run.Beats, end+0.1*a.Period); err != nil {
		run.notef("Emax(t) not fitted: %v", err)
	} else {
		run.Emax = e
	}
}
