package spicecheck

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"path/filepath"
	"sync"
	"time"

	"github.com/gocarina/gocsv"

	"swrank/devices"
)

// SuiteOptions tune RunSuite.
type SuiteOptions struct {
	// Workers is the number of ngspice processes run at once. Default 2.
	Workers int
	// OutDir receives the characterised parts library (parts.csv) and the
	// report (report.txt). Required.
	OutDir string
	// Cell tunes the cell simulations.
	Cell CellOptions
}

// Suite is the outcome of a full cross-check run.
type Suite struct {
	Config   *Config
	Sheets   map[string]*Datasheet // by device name
	Library  string                // path of the characterised parts CSV
	Rows     []Row                 // every simulated device at every point, in config order
	Elapsed  time.Duration
	Compared map[string][]Row // by point: the rows swrank did not screen out
}

// RunSuite characterises every device, writes the parts library, loads it
// back (so that swrank sees only the CSV), simulates every device whose
// rating suits each point and pairs the simulation with swrank's prediction.
func RunSuite(ctx context.Context, r *Runner, cfg *Config, o SuiteOptions) (*Suite, error) {
	start := time.Now()
	if o.Workers <= 0 {
		o.Workers = 2
	}
	if o.OutDir == "" {
		return nil, fmt.Errorf("spicecheck: no output directory")
	}
	if err := os.MkdirAll(o.OutDir, 0o755); err != nil {
		return nil, err
	}
	s := &Suite{Config: cfg, Sheets: map[string]*Datasheet{}, Compared: map[string][]Row{}}

	// 1. Characterisation.
	sheets := make([]*Datasheet, len(cfg.Devices))
	err := parallel(ctx, len(cfg.Devices), o.Workers, func(ctx context.Context, i int) error {
		ds, err := Characterise(ctx, r, &cfg.Devices[i])
		sheets[i] = ds
		return err
	})
	if err != nil {
		return nil, err
	}
	parts := make([]devices.Part, len(cfg.Devices))
	for i := range cfg.Devices {
		s.Sheets[cfg.Devices[i].Name] = sheets[i]
		parts[i] = sheets[i].Part(&cfg.Devices[i])
	}

	// 2. The parts library, written atomically and read back.
	s.Library = filepath.Join(o.OutDir, "parts.csv")
	if err := WriteParts(s.Library, parts); err != nil {
		return nil, err
	}
	lib, err := devices.Load(s.Library)
	if err != nil {
		return nil, fmt.Errorf("reading back the characterised library: %w", err)
	}
	byName := map[string]*devices.Part{}
	for i := range lib.Parts {
		byName[lib.Parts[i].Name] = &lib.Parts[i]
	}
	for _, m := range cfg.Devices {
		if byName[m.Name] == nil {
			return nil, fmt.Errorf("%s: part %s missing after loading", s.Library, m.Name)
		}
	}

	// 3. Cell simulations of every device rated for each point.
	type job struct {
		p *Point
		m *Model
	}
	var jobs []job
	for pi := range cfg.Points {
		p := &cfg.Points[pi]
		for di := range cfg.Devices {
			m := &cfg.Devices[di]
			if p.Candidate(m) {
				jobs = append(jobs, job{p, m})
			}
		}
	}
	sims := make([]*CellEnergies, len(jobs))
	err = parallel(ctx, len(jobs), o.Workers, func(ctx context.Context, i int) error {
		e, err := SimulateCell(ctx, r, jobs[i].m, jobs[i].p, o.Cell)
		sims[i] = e
		return err
	})
	if err != nil {
		return nil, err
	}

	// 4. swrank's prediction for the same cell.
	for i, j := range jobs {
		res, err := Predict(byName[j.m.Name], j.p, sims[i])
		if err != nil {
			return nil, err
		}
		row := NewRow(j.m.Name, j.p, &res, sims[i])
		s.Rows = append(s.Rows, row)
		if !row.Screened {
			s.Compared[j.p.Name] = append(s.Compared[j.p.Name], row)
		}
	}
	s.Elapsed = time.Since(start)
	return s, nil
}

// Compared rows over all points, in config order.
func (s *Suite) AllCompared() []Row {
	var out []Row
	for _, p := range s.Config.Points {
		out = append(out, s.Compared[p.Name]...)
	}
	return out
}

// parallel runs fn(0..n-1) on at most workers goroutines and returns the
// first error; the others are cancelled through the context.
func parallel(ctx context.Context, n, workers int, fn func(context.Context, int) error) error {
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	next := make(chan int)
	var wg sync.WaitGroup
	var once sync.Once
	var first error
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				if err := fn(ctx, i); err != nil {
					once.Do(func() { first = err; cancel() })
				}
			}
		}()
	}
feed:
	for i := 0; i < n; i++ {
		select {
		case next <- i:
		case <-ctx.Done():
			break feed
		}
	}
	close(next)
	wg.Wait()
	if first == nil && ctx.Err() != nil && n > 0 {
		return ctx.Err()
	}
	return first
}

// WriteParts writes parts as a swrank parts library with gocsv, atomically:
// a temporary file in the same directory, synced, then renamed over path.
func WriteParts(path string, parts []devices.Part) error {
	var buf bytes.Buffer
	if err := gocsv.Marshal(&parts, &buf); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	return writeAtomic(path, buf.Bytes())
}

func writeAtomic(path string, b []byte) error {
	f, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*")
	if err != nil {
		return err
	}
	tmp := f.Name()
	_, werr := f.Write(b)
	if werr == nil {
		werr = f.Sync()
	}
	if cerr := f.Close(); werr == nil {
		werr = cerr
	}
	if werr == nil {
		werr = os.Rename(tmp, path)
	}
	if werr != nil {
		os.Remove(tmp)
		return fmt.Errorf("writing %s: %w", path, werr)
	}
	return nil
}
