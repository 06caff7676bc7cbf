package reach

import "math"

// bucketQueue is a monotone bucket priority queue (Dial's algorithm for
// real-valued keys): keys are sorted into buckets of width w and cells are
// taken from the highest non-empty bucket, in any order within it. The
// propagation tolerates that order by re-opening a closed cell whose value
// improves later (label correcting), so the result does not depend on w;
// w only trades re-openings for bucket scans. Stale entries (cells pushed
// again with a better key, or closed) are skipped when popped.
type bucketQueue struct {
	lo, w   float64
	buckets [][]int32
	top     int       // highest bucket that may be non-empty
	n       int       // entries, stale ones included
	free    [][]int32 // emptied buckets' storage, reused by push (the front moves through the buckets, so a few suffice)
}

func newBucketQueue(lo, hi, w float64) *bucketQueue {
	nb := int(math.Ceil((hi-lo)/w)) + 2
	return &bucketQueue{lo: lo, w: w, buckets: make([][]int32, nb), top: -1}
}

// bucket returns the bucket index of key k, clamped to the queue's range.
func (q *bucketQueue) bucket(k float32) int {
	b := int((float64(k) - q.lo) / q.w)
	if b < 0 {
		return 0
	}
	if b >= len(q.buckets) {
		return len(q.buckets) - 1
	}
	return b
}

func (q *bucketQueue) push(c int32, k float32) {
	b := q.bucket(k)
	if q.buckets[b] == nil && len(q.free) > 0 {
		q.buckets[b] = q.free[len(q.free)-1]
		q.free = q.free[:len(q.free)-1]
	}
	q.buckets[b] = append(q.buckets[b], c)
	if b > q.top {
		q.top = b
	}
	q.n++
}

// pop returns an entry from the highest non-empty bucket and its bucket
// index, or ok false when the queue is empty.
func (q *bucketQueue) pop() (c int32, b int, ok bool) {
	for q.top >= 0 {
		bk := q.buckets[q.top]
		if len(bk) > 0 {
			c = bk[len(bk)-1]
			q.buckets[q.top] = bk[:len(bk)-1]
			q.n--
			return c, q.top, true
		}
		if bk != nil && len(q.free) < 64 {
			q.free = append(q.free, bk[:0]) // keep the storage for the next buckets
		}
		q.buckets[q.top] = nil
		q.top--
	}
	return 0, 0, false
}
