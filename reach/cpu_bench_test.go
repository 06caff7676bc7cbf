package reach

import (
	"sync"
	"testing"
	"time"

	"glidereach/internal/benchmeter"
)

// cpuMeter reports the CPU time per op of a benchmark beside its wall time
// (the machine is shared: CPU seconds say what the code costs, wall seconds
// what the load let it have), and, when cells > 0, the peak heap in use
// above the level at the start per cell (sampled every 5 ms, so a lower
// bound of the true peak, and including garbage not yet collected). Start
// it after the setup; call stop at the end.
func cpuMeter(b *testing.B, cells int) (stop func()) {
	base := benchmeter.HeapLive()
	var peak uint64
	done := make(chan struct{})
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		t := time.NewTicker(5 * time.Millisecond)
		defer t.Stop()
		for {
			if h := benchmeter.HeapLive(); h > peak {
				peak = h
			}
			select {
			case <-done:
				return
			case <-t.C:
			}
		}
	}()
	t0 := benchmeter.CPUTime()
	return func() {
		cpu := benchmeter.CPUTime() - t0
		close(done)
		wg.Wait()
		b.ReportMetric(cpu.Seconds()/float64(b.N), "cpu-s/op")
		if cells > 0 && peak > base {
			b.ReportMetric(float64(peak-base)/float64(cells), "peak-B/cell")
		}
	}
}
