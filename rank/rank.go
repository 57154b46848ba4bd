package rank

import (
	"cmp"
	"runtime"
	"slices"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// Options tune Rank.
type Options struct {
	// Workers is the number of goroutines evaluating parts. 0 means
	// runtime.GOMAXPROCS(0); 1 evaluates on the calling goroutine. The
	// result does not depend on it.
	Workers int
	// Progress, when not nil, is called as work finishes with the number
	// of parts just done (from the worker goroutines: it must be safe for
	// concurrent use). It does not change the result.
	Progress func(parts int)
}

// WorkerCount is the number of goroutines for n parts handed out in chunks of
// chunk: Workers, or every processor when it is 0; one when there are
// fewer than two chunks.
func (o Options) WorkerCount(n, chunk int) int {
	if n < 2*chunk {
		return 1
	}
	if o.Workers > 0 {
		return o.Workers
	}
	return runtime.GOMAXPROCS(0)
}

// Rank evaluates every device at pt and returns the results in rank order:
// parts that pass every screen by increasing total stage loss, then the
// screened parts by increasing loss; ties by name. partner, when non-nil,
// fills the other place of a synchronous cell.
func Rank(pt *stage.Point, devs []fit.Device, partner *fit.Device, opt Options) []evaluate.Result {
	out := make([]evaluate.Result, len(devs))
	const chunk = 1024
	ForChunks(len(devs), opt.WorkerCount(len(devs), chunk), chunk, func(lo, hi int) {
		for i := lo; i < hi; i++ {
			evaluate.EvaluateInto(&out[i], pt, &devs[i], partner, nil)
		}
	})
	return sortResults(out)
}

// sortResults puts results in rank order in place and returns rs. The
// results are large: it sorts a permutation and then follows its cycles,
// moving each result once, with one result of scratch space.
func sortResults(rs []evaluate.Result) []evaluate.Result {
	idx := make([]int32, len(rs))
	for i := range idx {
		idx[i] = int32(i)
	}
	slices.SortFunc(idx, func(i, j int32) int { return CompareRef(&rs[i], &rs[j]) })
	// Place i takes rs[idx[i]]; a placed slot is marked −1.
	var tmp evaluate.Result
	for i := range idx {
		if idx[i] < 0 || int(idx[i]) == i {
			continue
		}
		tmp = rs[i]
		j := i
		for {
			k := int(idx[j])
			idx[j] = -1
			if k == i {
				rs[j] = tmp
				break
			}
			rs[j] = rs[k]
			j = k
		}
	}
	return rs
}

// Compare orders results: passing before screened, then by total loss,
// then by part name.
func Compare(a, b evaluate.Result) int { return CompareRef(&a, &b) }

// CompareRef is Compare on pointers.
func CompareRef(a, b *evaluate.Result) int {
	if sa, sb := a.Screened(), b.Screened(); sa != sb {
		if sa {
			return 1
		}
		return -1
	}
	if c := cmp.Compare(a.Losses.Total(), b.Losses.Total()); c != 0 {
		return c
	}
	return cmp.Compare(a.Dev.Part.Name, b.Dev.Part.Name)
}
