package render

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

// cpuMeter reports a benchmark's CPU seconds per op beside its wall time
// (the machine is shared: CPU seconds say what the code costs). Start it
// after the setup; call stop at the end.
func cpuMeter(b *testing.B) (stop func()) {
	t0 := cpuTime()
	return func() { b.ReportMetric((cpuTime()-t0).Seconds()/float64(b.N), "cpu-s/op") }
}
