package rank

import (
	"container/heap"

	"swrank/devices"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
)

// Best keeps the best results offered to it, in rank order, without holding
// the others: ranking a large library streams through it part by part. It
// keeps at most N passing and N screened results (N = 0: all of them) and
// counts what it saw.
//
// Offered results may point to a Device and Part that the caller reuses
// for the next part; Best copies the ones it keeps.
type Best struct {
	N        int // results kept of each kind; 0 keeps all
	Passed   int // passing results offered
	Screened int // screened results offered
	pass     worstFirst
	fail     worstFirst
}

// Offer considers one result.
func (b *Best) Offer(r *evaluate.Result) {
	h := &b.pass
	if r.Screened() {
		b.Screened++
		h = &b.fail
	} else {
		b.Passed++
	}
	b.keep(h, r)
}

// keep puts r in heap h when it ranks among the best N.
func (b *Best) keep(h *worstFirst, r *evaluate.Result) {
	if b.N > 0 && len(*h) == b.N {
		if CompareRef(r, &(*h)[0]) >= 0 {
			return
		}
		heap.Pop(h)
	}
	heap.Push(h, own(r))
}

// merge adds what o was offered to b: its counts and the results it kept
// (the best N of any set are among the best N of each of its parts).
func (b *Best) merge(o *Best) {
	b.Passed += o.Passed
	b.Screened += o.Screened
	for i := range o.pass {
		b.keep(&b.pass, &o.pass[i])
	}
	for i := range o.fail {
		b.keep(&b.fail, &o.fail[i])
	}
}

// Results returns the kept results in rank order: passing ones, then
// screened ones.
func (b *Best) Results() []evaluate.Result {
	out := make([]evaluate.Result, 0, len(b.pass)+len(b.fail))
	out = append(out, b.pass...)
	out = append(out, b.fail...)
	return sortResults(out)
}

// own copies the result's device and part so that the caller may reuse
// its own.
func own(r *evaluate.Result) evaluate.Result {
	c := *r
	orig := r.Dev
	p := new(devices.Part)
	*p = *orig.Part
	d := new(fit.Device)
	*d = *orig
	d.Part = p
	c.Dev = d
	for i := range c.Devices {
		if c.Devices[i].Dev == orig {
			c.Devices[i].Dev = d
		}
	}
	return c
}

// worstFirst is a heap with the worst-ranked result on top.
type worstFirst []evaluate.Result

func (h worstFirst) Len() int           { return len(h) }
func (h worstFirst) Less(i, j int) bool { return CompareRef(&h[i], &h[j]) > 0 }
func (h worstFirst) Swap(i, j int)      { h[i], h[j] = h[j], h[i] }
func (h *worstFirst) Push(x any)        { *h = append(*h, x.(evaluate.Result)) }
func (h *worstFirst) Pop() any {
	old := *h
	x := old[len(old)-1]
	*h = old[:len(old)-1]
	return x
}
