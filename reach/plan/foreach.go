package plan

import (
	"context"
	"sync"
)

// ForEach runs fn(k) for k in 0..n−1 on at most w goroutines and returns
// the first error by index (so the same error whatever the timing); it
// stops handing out work after an error or when ctx is done, and then
// returns ctx's error if no fn failed. The use cases run independent solver
// runs (the winds of a wind-uncertainty set, the fields) through it, two at
// a time on the two-core machines the project targets.
func ForEach(ctx context.Context, n, w int, fn func(k int) error) error {
	errs := make([]error, n)
	next := make(chan int)
	var wg sync.WaitGroup
	var failed sync.Once
	stop := make(chan struct{})
	for g := 0; g < min(w, n); g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := range next {
				if errs[k] = fn(k); errs[k] != nil {
					failed.Do(func() { close(stop) })
				}
			}
		}()
	}
loop:
	for k := 0; k < n; k++ {
		select {
		case next <- k:
		case <-stop:
			break loop
		case <-ctx.Done():
			break loop
		}
	}
	close(next)
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return ctx.Err()
}
