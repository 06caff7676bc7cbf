// Package benchmeter holds the process meters the benchmarks of several
// packages report beside their wall time: CPU seconds (the machine the
// figures come from is shared, so CPU time says what the code costs and
// wall time what the load let it have), the live heap and the Go
// runtime's idle time. Only test files import it.
package benchmeter

import (
	"runtime"
	"runtime/metrics"
	"syscall"
	"time"
)

// CPUTime returns the process's user plus system CPU time so far
// (getrusage(2), RUSAGE_SELF); 0 if the call fails.
func CPUTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// HeapLive returns the bytes of live and not yet swept heap objects
// (runtime/metrics "/memory/classes/heap/objects:bytes").
func HeapLive() uint64 {
	s := []metrics.Sample{{Name: "/memory/classes/heap/objects:bytes"}}
	metrics.Read(s)
	return s[0].Value.Uint64()
}

// IdlePTime returns the Go runtime's estimate of the time its Ps (the
// GOMAXPROCS slots that run goroutines) had nothing to run, summed over
// the Ps, in seconds ("/cpu/classes/idle:cpu-seconds"). The runtime brings
// the figure up to date at the end of a collection, so it collects first.
func IdlePTime() float64 {
	runtime.GC()
	s := []metrics.Sample{{Name: "/cpu/classes/idle:cpu-seconds"}}
	metrics.Read(s)
	if s[0].Value.Kind() != metrics.KindFloat64 {
		return 0
	}
	return s[0].Value.Float64()
}
