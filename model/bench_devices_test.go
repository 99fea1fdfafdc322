package model_test

import (
	"testing"

	"pvcouple/model"
)

// withDevices returns p with a lesion of each valve and both support
// devices on: the heaviest work the lesion and support parts add to a beat.
func withDevices(p model.Params) model.Params {
	p.AorticValveArea, p.AorticRegurgitantArea = 1.0, 0.1
	p.MitralValveArea, p.MitralRegurgitantArea = 2.0, 0.2
	p.PumpFlow, p.PumpHead = 2.5, 150
	p.BalloonVolume = 40
	return p
}

// The warm nudges of bench_test.go with every lesion and device on; each
// must stay within twice the time of the same nudge without them (see
// TestDevicesKeepWarmNudgeCheap).
func BenchmarkSteadyStateWarmDevices(b *testing.B) {
	p := withDevices(inCirculation(b, "normal", model.Held))
	q := p
	q.FillingPressure *= 1.05
	benchmarkSteadyState(b, p, q, true)
}

func BenchmarkSteadyStateClosedWarmDevices(b *testing.B) {
	p := withDevices(inCirculation(b, "normal", model.Closed))
	q := p
	q.StressedVolume *= 1.05
	benchmarkSteadyState(b, p, q, true)
}
