package main

import (
	"testing"

	"glidereach/internal/benchmeter"
)

// cpuMeter reports the CPU time per op of a benchmark beside its wall time
// (the machine is shared: CPU seconds say what the code costs, wall seconds
// what the load let it have), and the seconds per op the Ps had no
// goroutine to run (idle-P-s/op: how far the run falls short of keeping
// both cores busy; a P whose thread waits for the CPU still has work, but
// the idle stretches with the wall time the load allows, so compare runs
// interleaved at the same load). Start it after the setup; call stop at
// the end.
func cpuMeter(b *testing.B) (stop func()) {
	i0 := benchmeter.IdlePTime()
	t0 := benchmeter.CPUTime()
	return func() {
		b.ReportMetric(float64(benchmeter.CPUTime()-t0)/1e9/float64(b.N), "cpu-s/op")
		b.ReportMetric((benchmeter.IdlePTime()-i0)/float64(b.N), "idle-P-s/op")
	}
}
