package benchmeter

import (
	"testing"
	"time"
)

// The CPU meter advances while the process computes, and the heap meter
// sees a live allocation.
func TestMetersMove(t *testing.T) {
	t0 := CPUTime()
	x := 0.0
	for deadline := time.Now().Add(30 * time.Millisecond); time.Now().Before(deadline); {
		for i := 0; i < 1000; i++ {
			x += float64(i)
		}
	}
	if d := CPUTime() - t0; d <= 0 {
		t.Fatalf("CPU time moved %v after 30 ms of work (x=%v)", d, x)
	}
	h0 := HeapLive()
	buf := make([]byte, 64<<20)
	buf[len(buf)-1] = 1
	if h := HeapLive(); h < h0+32<<20 {
		t.Fatalf("heap %d after a 64 MiB allocation, %d before", h, h0)
	}
	_ = buf[len(buf)-1]
	if IdlePTime() < 0 {
		t.Fatal("negative idle time")
	}
}
