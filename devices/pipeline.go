package devices

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"runtime"
	"sync"
)

// The parallel decoder splits a read in three: one goroutine reads lines
// into batches, workers split, decode and validate the rows of a batch,
// and the calling goroutine takes the batches back in file order to check
// names and hand out parts. Only the last step has state; it runs in file
// order as the sequential decoder does, so the parts and problems are the
// same (the tests and the fuzz target run every input through both).

const batchRows = 256

// batch is a run of rows on its way through the pipeline.
type batch struct {
	n     int           // rows in use
	buf   []byte        // text of the unsplit rows, as read (reused)
	text  string        // buf as one string, made once per batch; the parts' strings point into it
	span  [][2]int      // unsplit row i is text[span[i][0]:span[i][1]]
	split [][]string    // or row i as split by the quoted path (nil for unsplit rows)
	lines []int         // file line of each row
	parts []Part        // decoded rows
	probs []ProblemList // problems of each row
	fatal []bool        // whether row i has a fatal problem (or is not a part at all)
	// reading holds the problems met while reading, each before row at[k].
	reading ProblemList
	at      []int
	// For Check: when final is not nil, row i decodes straight into
	// final[base+i], the library's own slice, and is not copied again.
	final []Part
	base  int
	done  chan struct{}
}

// part returns where row i decodes.
func (b *batch) part(i int) *Part {
	if b.final != nil {
		return &b.final[b.base+i]
	}
	return &b.parts[i]
}

func newBatch() *batch {
	return &batch{
		span: make([][2]int, batchRows), split: make([][]string, batchRows), lines: make([]int, batchRows),
		parts: make([]Part, batchRows), probs: make([]ProblemList, batchRows), fatal: make([]bool, batchRows),
	}
}

// workerCount is the number of decoding goroutines.
func workerCount() int { return max(1, min(runtime.GOMAXPROCS(0), 8)) }

// readParallel is readBatches spread over goroutines.
func (l *loader) readParallel(t *rowReader) {
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
		var pl placer
		for {
			var b *batch
			select {
			case b = <-free:
			case <-quit:
				return
			}
			eof := l.fill(t, b, &rows)
			pl.place(l, b)
			b.done = make(chan struct{})
			work <- b
			order <- b
			if eof {
				return
			}
		}
	}()

	// Workers: split, decode and validate.
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var w worker
			for b := range work {
				w.decode(l, b)
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
		b.final = nil
		b.text = ""
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

// readBatches is the sequential decoder: the same steps as readParallel,
// one batch at a time on the calling goroutine.
func (l *loader) readBatches(t *rowReader) {
	b := newBatch()
	var pl placer
	var w worker
	var rows int
	for !l.stopped {
		eof := l.fill(t, b, &rows)
		pl.place(l, b)
		w.decode(l, b)
		l.collect(b)
		if eof {
			break
		}
	}
	l.rows += rows
}

// placer decides where Check's parts decode: straight into the library's
// slice, sized once from the first batch and the input size, while it has
// room; after that into the batches, to be copied.
type placer struct {
	final   []Part
	next    int
	started bool
	full    bool
}

func (pl *placer) place(l *loader, b *batch) {
	if l.parts != nil && !pl.started && l.sizeHint > 0 && b.n > 0 {
		est := l.sizeHint / int64(max(len(b.text)/b.n, 16))
		pl.final = make([]Part, min(est+est/8+16, 1<<24))
	}
	pl.started = true
	b.final, b.base = nil, 0
	if pl.full = pl.full || pl.next+b.n > len(pl.final); !pl.full {
		b.final, b.base = pl.final, pl.next
		pl.next += b.n
	}
}

// worker splits, decodes and validates the rows of a batch.
type worker struct {
	errs   []cellErr
	fields []string
	last   []lastCell // per file column, the last quantity cell parsed
}

// lastCell is a parsed cell kept for the next row of the same column.
type lastCell struct {
	text string
	v    float64
	ok   bool
}

func (w *worker) decode(l *loader, b *batch) {
	for i := 0; i < b.n; i++ {
		rec := b.split[i]
		if rec == nil {
			w.fields = splitFields(w.fields[:0], b.text[b.span[i][0]:b.span[i][1]], l.dialect.Sep)
			rec = w.fields
			if len(rec) != len(l.colOf) {
				b.probs[i], b.fatal[i] = ProblemList{l.fieldCountProblem(rec, b.lines[i])}, true
				continue
			}
		}
		// The cells are substrings of b.text, which is never reused.
		b.probs[i], b.fatal[i] = l.decode(b.part(i), rec, b.lines[i], w)
	}
}

// fill reads up to batchRows rows into b and reports whether the input
// ended. Its problems and row count are those of nextRow.
func (l *loader) fill(t *rowReader, b *batch, rows *int) (eof bool) {
	b.n, b.buf, b.reading, b.at = 0, b.buf[:0], b.reading[:0], b.at[:0]
	defer func() { b.text = string(b.buf) }()
	for b.n < batchRows {
		raw, isRaw, rec, err := t.nextRaw()
		if err != nil {
			var pe *csv.ParseError
			switch {
			case errors.Is(err, io.EOF):
				return true
			case errors.As(err, &pe):
				*rows++
				b.reading = append(b.reading, &Problem{File: l.file, Line: pe.Line, Err: fmt.Errorf("byte %d of the line: %w", pe.Column, pe.Err), Fatal: true})
				b.at = append(b.at, b.n)
				continue
			default:
				b.reading = append(b.reading, &Problem{File: l.file, Err: fmt.Errorf("reading: %w", err), Fatal: true})
				b.at = append(b.at, b.n)
				return true
			}
		}
		*rows++
		if isRaw {
			start := len(b.buf)
			b.buf = append(b.buf, raw...)
			b.span[b.n], b.split[b.n] = [2]int{start, len(b.buf)}, nil
		} else {
			if len(rec) != len(l.colOf) {
				b.reading = append(b.reading, l.fieldCountProblem(rec, t.line))
				b.at = append(b.at, b.n)
				continue
			}
			b.split[b.n] = append([]string(nil), rec...)
		}
		b.lines[b.n] = t.line
		b.n++
	}
	return false
}

// fieldCountProblem reports a ragged row.
func (l *loader) fieldCountProblem(rec []string, line int) *Problem {
	col := 0
	if len(rec) > len(l.colOf) {
		col = len(l.colOf) + 1
	}
	return &Problem{File: l.file, Line: line, Column: col, Fatal: true,
		Err: fmt.Errorf("%w: the row has %d, the header %d", ErrFieldCount, len(rec), len(l.colOf))}
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
			l.sizeFor(len(b.text) / max(b.n, 1))
		}
		p := b.part(i)
		ok, first := l.commit(p, b.lines[i])
		switch {
		case ok && l.parts != nil && b.final != nil:
			// Decoded in place: compact over the rows refused so far.
			w := len(*l.parts)
			if w == b.base+i {
				*l.parts = b.final[:w+1]
			} else {
				*l.parts = append(*l.parts, *p)
			}
		case ok && l.parts != nil:
			*l.parts = append(*l.parts, *p)
		case !ok:
			cell := ""
			if rec := b.split[i]; rec != nil {
				cell = rec[l.partCol()-1]
			} else {
				cell = splitFields(nil, b.text[b.span[i][0]:b.span[i][1]], l.dialect.Sep)[l.partCol()-1]
			}
			l.duplicate(p, b.lines[i], cell, first)
		}
	}
	if !l.stopped {
		l.probs = append(l.probs, b.reading[k:]...)
	}
}
