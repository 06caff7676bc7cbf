package main

import (
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

// cpuMeter reports the CPU time per op of a benchmark beside its wall time
// (the machine is shared: CPU seconds say what the code costs, wall seconds
// what the load let it have). Start it after the setup; call stop at the end.
func cpuMeter(b *testing.B) (stop func()) {
	t0 := cpuTime()
	return func() {
		b.ReportMetric(float64(cpuTime()-t0)/1e9/float64(b.N), "cpu-s/op")
	}
}
