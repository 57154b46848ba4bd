package rank

import "sync"

// ForChunks calls fn on the chunks [lo, hi) of [0, n), chunk long (the
// last may be shorter), from w goroutines that take the next chunk as they
// finish one; inline on the caller's goroutine when w ≤ 1 or n ≤ chunk. fn
// must be safe to call concurrently on disjoint chunks.
func ForChunks(n, w, chunk int, fn func(lo, hi int)) {
	if w <= 1 || n <= chunk {
		fn(0, n)
		return
	}
	var wg sync.WaitGroup
	next := make(chan int, w)
	for range w {
		wg.Go(func() {
			for lo := range next {
				fn(lo, min(lo+chunk, n))
			}
		})
	}
	for lo := 0; lo < n; lo += chunk {
		next <- lo
	}
	close(next)
	wg.Wait()
}
