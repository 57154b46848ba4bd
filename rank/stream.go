package rank

import (
	"cmp"
	"slices"
	"sync"

	"swrank/devices"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// Stream ranks parts as a reader hands them out, without holding the
// library: each part is prepared (fit.Prepare), evaluated at the point and
// offered to a Best. The parts are copied into batches that worker
// goroutines prepare and evaluate, each into a Best of its own; Close
// merges those into the caller's. Best keeps the same results whatever
// order they are offered in (Compare is a total order: names are unique in
// a library), so the ranking is that of one goroutine taking the parts in
// turn (TestStreamMatchesSequential), and the parts set aside are returned
// in the order they were added.
type Stream struct {
	pt      *stage.Point
	partner *fit.Device
	best    *Best

	cur   *streamBatch
	added int // parts added so far: the next part's ordinal
	work  chan *streamBatch
	free  chan *streamBatch
	ws    []*streamWorker
	wg    sync.WaitGroup
	solo  *streamWorker // the worker on the caller's goroutine (one worker)
}

// streamBatchParts is the number of parts a worker takes at a time: a few
// hundred microseconds of work, long beside a channel's hand-over.
const streamBatchParts = 128

// streamBatch is a run of parts on their way to a worker.
type streamBatch struct {
	first int // ordinal of parts[0]
	n     int
	parts [streamBatchParts]devices.Part
}

// streamWorker prepares and evaluates batches into its own Best.
type streamWorker struct {
	best  Best
	aside []orderedAside
	dev   fit.Device
	res   evaluate.Result
}

// orderedAside is a part set aside with its ordinal in the stream.
type orderedAside struct {
	at int
	s  SetAside
}

// NewStream starts a stream that ranks at pt into best (partner as in
// evaluate.Evaluate), on opt.Workers goroutines (0: every processor; 1:
// on the caller's goroutine, in Add).
func NewStream(pt *stage.Point, partner *fit.Device, best *Best, opt Options) *Stream {
	s := &Stream{pt: pt, partner: partner, best: best}
	workers := opt.WorkerCount(2*streamBatchParts, streamBatchParts)
	if workers <= 1 {
		s.solo = &streamWorker{best: Best{N: best.N}}
		s.cur = new(streamBatch)
		return s
	}
	depth := 2 * workers
	s.work = make(chan *streamBatch, depth)
	s.free = make(chan *streamBatch, depth+1)
	for range depth + 1 {
		s.free <- new(streamBatch)
	}
	for range workers {
		w := &streamWorker{best: Best{N: best.N}}
		s.ws = append(s.ws, w)
		s.wg.Go(func() {
			for b := range s.work {
				w.rank(s, b)
				s.free <- b
			}
		})
	}
	s.cur = <-s.free
	return s
}

// Add copies part p into the stream (the caller may reuse p).
func (s *Stream) Add(p *devices.Part) {
	b := s.cur
	if b.n == 0 {
		b.first = s.added
	}
	b.parts[b.n] = *p
	b.n++
	s.added++
	if b.n < streamBatchParts {
		return
	}
	s.flush()
	if s.solo == nil {
		s.cur = <-s.free
	}
}

// flush hands the current batch to a worker (or ranks it, with one).
func (s *Stream) flush() {
	b := s.cur
	if b.n == 0 {
		return
	}
	if s.solo != nil {
		s.solo.rank(s, b)
		return
	}
	s.work <- b
}

// Close ranks what is left, merges the workers' results into the Best
// given to NewStream and returns the parts that could not be prepared, in
// the order they were added. The stream cannot be used after.
func (s *Stream) Close() []SetAside {
	s.flush()
	ws := s.ws
	if s.solo != nil {
		ws = []*streamWorker{s.solo}
	} else {
		close(s.work)
		s.wg.Wait()
	}
	var all []orderedAside
	for _, w := range ws {
		s.best.merge(&w.best)
		all = append(all, w.aside...)
	}
	slices.SortFunc(all, func(a, b orderedAside) int { return cmp.Compare(a.at, b.at) })
	out := make([]SetAside, len(all))
	for i := range all {
		out[i] = all[i].s
	}
	return out
}

// rank prepares, evaluates and offers the parts of b.
func (w *streamWorker) rank(s *Stream, b *streamBatch) {
	for i := range b.n {
		p := &b.parts[i]
		if err := fit.PrepareInto(&w.dev, p); err != nil {
			// This part costs only itself.
			w.aside = append(w.aside, orderedAside{b.first + i, SetAside{Part: p.Name, Line: p.Line, Reason: err.Error()}})
			continue
		}
		evaluate.EvaluateInto(&w.res, s.pt, &w.dev, s.partner, nil)
		w.best.Offer(&w.res)
	}
	b.n = 0
}
