package main

import (
	"runtime"
	"runtime/metrics"
	"syscall"
	"testing"
	"time"
)

// cpuTime returns the process's user plus system CPU time so far.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// idlePTime returns the Go runtime's estimate of the time its Ps (the
// GOMAXPROCS slots that run goroutines) had nothing to run, summed over
// the Ps, in seconds. The runtime brings the figure up to date at the end
// of a collection, so it collects first.
func idlePTime() float64 {
	runtime.GC()
	s := []metrics.Sample{{Name: "/cpu/classes/idle:cpu-seconds"}}
	metrics.Read(s)
	if s[0].Value.Kind() != metrics.KindFloat64 {
		return 0
	}
	return s[0].Value.Float64()
}

// cpuMeter reports the CPU time per op of a benchmark beside its wall time
// (the machine is shared: CPU seconds say what the code costs, wall seconds
// what the load let it have), and the seconds per op the Ps had no
// goroutine to run (idle-P-s/op: how far the run falls short of keeping
// both cores busy; a P whose thread waits for the CPU still has work, but
// the idle stretches with the wall time the load allows, so compare runs
// interleaved at the same load). Start it after the setup; call stop at
// the end.
func cpuMeter(b *testing.B) (stop func()) {
	i0 := idlePTime()
	t0 := cpuTime()
	return func() {
		b.ReportMetric(float64(cpuTime()-t0)/1e9/float64(b.N), "cpu-s/op")
		b.ReportMetric((idlePTime()-i0)/float64(b.N), "idle-P-s/op")
	}
}
