package devices

import (
	"runtime"
	"sync"
)

// The parallel decoder splits a read in three: one goroutine reads and
// splits rows into batches, workers decode and validate the batches, and
// the calling goroutine takes the batches back in file order to check
// names and hand out parts. Only the last step has state; it runs in the
// same order as the sequential decoder, so the parts and problems are the
// same (the tests run every fixture through both).

const batchRows = 256

// batch is a run of rows on its way through the pipeline.
type batch struct {
	n     int           // rows in use
	rows  [][]string    // records; their strings are owned by the batch
	lines []int         // file line of each row
	cells []string      // backing array of rows
	parts []Part        // decoded rows
	probs []ProblemList // problems of each row
	fatal []bool        // whether row i has a fatal problem
	// reading holds the problems met while reading, each before row at[k].
	reading ProblemList
	at      []int
	errs    []cellErr // worker scratch
	done    chan struct{}
}

func newBatch() *batch {
	return &batch{
		rows: make([][]string, batchRows), lines: make([]int, batchRows),
		parts: make([]Part, batchRows), probs: make([]ProblemList, batchRows), fatal: make([]bool, batchRows),
	}
}

// workerCount is the number of decoding goroutines.
func workerCount() int { return max(1, min(runtime.GOMAXPROCS(0), 8)) }

// readParallel is readFast spread over goroutines.
func (l *loader) readParallel(src source) {
	workers := workerCount()
	depth := 2*workers + 2
	free := make(chan *batch, depth)
	for range depth {
		free <- newBatch()
	}
	work := make(chan *batch, depth)
	order := make(chan *batch, depth)
	quit := make(chan struct{})
	var rows int

	// Reader: fills batches in file order.
	go func() {
		defer close(work)
		defer close(order)
		for {
			var b *batch
			select {
			case b = <-free:
			case <-quit:
				return
			}
			b.n, b.cells, b.reading, b.at = 0, b.cells[:0], b.reading[:0], b.at[:0]
			b.done = make(chan struct{})
			eof := false
			for b.n < batchRows {
				before := len(b.reading)
				rec, line := l.nextRow(src, &b.reading, &rows)
				for range len(b.reading) - before {
					b.at = append(b.at, b.n)
				}
				if rec == nil {
					eof = true
					break
				}
				start := len(b.cells)
				b.cells = append(b.cells, rec...)
				b.rows[b.n] = b.cells[start:len(b.cells):len(b.cells)]
				b.lines[b.n] = line
				b.n++
			}
			// Rows point into b.cells, which append may have moved: re-slice.
			off := 0
			for i := 0; i < b.n; i++ {
				k := len(b.rows[i])
				b.rows[i] = b.cells[off : off+k : off+k]
				off += k
			}
			work <- b
			order <- b
			if eof {
				return
			}
		}
	}()

	// Workers: decode and validate.
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for b := range work {
				for i := 0; i < b.n; i++ {
					b.probs[i], b.fatal[i] = l.decode(&b.parts[i], b.rows[i], b.lines[i], &b.errs)
				}
				close(b.done)
			}
		}()
	}

	// Collector: in file order.
	for b := range order {
		<-b.done
		if !l.stopped {
			l.collect(b)
		}
		free <- b
		if l.stopped {
			select {
			case <-quit:
			default:
				close(quit)
			}
		}
	}
	wg.Wait()
	l.rows += rows
}

// collect commits one decoded batch.
func (l *loader) collect(b *batch) {
	k := 0
	for i := 0; i < b.n && !l.stopped; i++ {
		for ; k < len(b.at) && b.at[k] == i; k++ {
			l.probs = append(l.probs, b.reading[k])
		}
		l.probs = append(l.probs, b.probs[i]...)
		if b.fatal[i] {
			continue
		}
		if l.names == nil {
			l.sizeFor(b.rows[i])
		}
		p := &b.parts[i]
		if l.commit(p, b.rows[i], b.lines[i]) && l.parts != nil {
			*l.parts = append(*l.parts, *p)
		}
	}
	if !l.stopped {
		l.probs = append(l.probs, b.reading[k:]...)
	}
}
