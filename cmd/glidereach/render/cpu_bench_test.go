package render

import (
	"testing"

	"glidereach/internal/benchmeter"
)

// cpuMeter reports a benchmark's CPU seconds per op beside its wall time
// (the machine is shared: CPU seconds say what the code costs). Start it
// after the setup; call stop at the end.
func cpuMeter(b *testing.B) (stop func()) {
	t0 := benchmeter.CPUTime()
	return func() { b.ReportMetric((benchmeter.CPUTime()-t0).Seconds()/float64(b.N), "cpu-s/op") }
}
