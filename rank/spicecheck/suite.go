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
	q "swrank/devices/quantity"
	"swrank/rank/spice"
)

// SuiteOptions tune RunSuite.
type SuiteOptions struct {
	// Workers is the number of ngspice processes run at once. Default 2.
	Workers int
	// OutDir receives the characterised parts library (parts.csv) and the
	// report (report.txt). Required.
	OutDir string
	// Cell tunes the cell simulations.
	Cell spice.CellOptions
}

// Suite is the outcome of a full cross-check run.
type Suite struct {
	// The simulations and the library rows the predictions come from
	// (RunSuite; Without changes the rows).
	jobs   []suiteJob
	sims   []*spice.CellEnergies
	nPlain int
	parts  map[string]*devices.Part

	Config   *Config                     // the configuration run
	Sheets   map[string]*spice.Datasheet // by device name
	Library  string                      // path of the characterised parts CSV
	Rows     []Row                       // every simulated device at every point, in config order
	Elapsed  time.Duration               // wall-clock time of RunSuite
	Compared map[string][]Row            // by point: the rows swrank did not screen out
	// ParRows are the cells with parasitic inductance: every variant on
	// every listed device at every listed point where it is a candidate,
	// in config order (variant, point, device).
	ParRows []Row
}

// RunSuite characterises every device, writes the parts library, loads it
// back (so that swrank sees only the CSV), simulates every device whose
// rating suits each point and pairs the simulation with swrank's prediction.
func RunSuite(ctx context.Context, r *spice.Runner, cfg *Config, o SuiteOptions) (*Suite, error) {
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
	s := &Suite{Config: cfg, Sheets: map[string]*spice.Datasheet{}, Compared: map[string][]Row{}}

	// 1. Characterisation.
	sheets, err := characteriseAll(ctx, r, cfg.Devices, o.Workers)
	if err != nil {
		return nil, err
	}
	parts := make([]devices.Part, len(cfg.Devices))
	for i := range cfg.Devices {
		s.Sheets[cfg.Devices[i].Name] = sheets[i]
		parts[i] = sheets[i].Part(&cfg.Devices[i])
	}
	// The same dies in packages with a common-source inductance: one row
	// each, with l_cs and l_loop (docs/spice-crosscheck.md).
	for vi := range cfg.Parasitics.Variants {
		v := &cfg.Parasitics.Variants[vi]
		if v.Lcs == 0 {
			continue
		}
		for _, dn := range cfg.Parasitics.Devices {
			m := cfg.model(dn)
			parts = append(parts, PackagedPart(s.Sheets[dn].Part(m), v))
		}
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
	for _, p := range parts {
		if byName[p.Name] == nil {
			return nil, fmt.Errorf("%s: part %s missing after loading", s.Library, p.Name)
		}
	}

	// 3. Cell simulations of every device rated for each point, then the
	// cells with parasitic inductance.
	var jobs []suiteJob
	for pi := range cfg.Points {
		p := &cfg.Points[pi]
		for di := range cfg.Devices {
			m := &cfg.Devices[di]
			if p.Candidate(m) {
				jobs = append(jobs, suiteJob{p: p, m: m, part: m.Name})
			}
		}
	}
	nPlain := len(jobs)
	for vi := range cfg.Parasitics.Variants {
		v := &cfg.Parasitics.Variants[vi]
		for _, pn := range cfg.Parasitics.Points {
			p := cfg.point(pn)
			for _, dn := range cfg.Parasitics.Devices {
				m := cfg.model(dn)
				if !p.Candidate(m) {
					continue
				}
				part := m.Name
				if v.Lcs > 0 {
					part = PackagedName(m.Name, v)
				}
				jobs = append(jobs, suiteJob{p: p, m: m, v: v, part: part})
			}
		}
	}
	sims := make([]*spice.CellEnergies, len(jobs))
	err = parallel(ctx, len(jobs), o.Workers, func(ctx context.Context, i int) error {
		co := o.Cell
		if v := jobs[i].v; v != nil {
			co.Par = v.Par()
		}
		e, err := spice.SimulateCell(ctx, r, jobs[i].m, jobs[i].p, co)
		sims[i] = e
		return err
	})
	if err != nil {
		return nil, err
	}

	// 4. swrank's prediction for the same cell.
	s.jobs, s.sims, s.nPlain, s.parts = jobs, sims, nPlain, byName
	if err := s.predict(); err != nil {
		return nil, err
	}
	s.Elapsed = time.Since(start)
	return s, nil
}

// suiteJob is one cell simulation of the suite.
type suiteJob struct {
	p    *spice.Point
	m    *spice.Model
	v    *Variant // nil: the plain cell
	part string   // the library row swrank evaluates
}

// predict pairs every simulation with swrank's prediction from the
// library rows s.parts.
func (s *Suite) predict() error {
	s.Rows, s.ParRows, s.Compared = nil, nil, map[string][]Row{}
	for i, j := range s.jobs {
		res, err := Predict(s.parts[j.part], j.p, s.sims[i])
		if err != nil {
			return err
		}
		row := NewRow(j.m.Name, j.p, &res, s.sims[i])
		if i >= s.nPlain {
			row.Variant, row.Part = j.v.Name, j.part
			s.ParRows = append(s.ParRows, row)
			continue
		}
		s.Rows = append(s.Rows, row)
		if !row.Screened {
			s.Compared[j.p.Name] = append(s.Compared[j.p.Name], row)
		}
	}
	return nil
}

// Without is the suite's comparison again, on the same simulations, with
// blank applied to a copy of each library row: what swrank predicts for a
// user who leaves those values out of the CSV (the datasheet's table
// without its curves, say).
func (s *Suite) Without(blank func(p *devices.Part)) (*Suite, error) {
	w := *s
	w.parts = make(map[string]*devices.Part, len(s.parts))
	for n, p := range s.parts {
		c := *p
		blank(&c)
		w.parts[n] = &c
	}
	if err := w.predict(); err != nil {
		return nil, err
	}
	return &w, nil
}

// AllCompared returns the compared rows over all points, in config order.
func (s *Suite) AllCompared() []Row {
	var out []Row
	for _, p := range s.Config.Points {
		out = append(out, s.Compared[p.Name]...)
	}
	return out
}

// PackagedName is the library name of device dev in the package of
// variant v, e.g. "sim-mid-60+lcs-0.5n".
func PackagedName(dev string, v *Variant) string { return dev + "+" + v.Name }

// PackagedPart is part p (a characterised die) in a package with variant
// v's common-source inductance: l_cs = Lcs and, because the power loop runs
// through the same inductance, l_loop = Lcs (the package's whole share of
// the loop, as docs/second-order.md asks for).
func PackagedPart(p devices.Part, v *Variant) devices.Part {
	p.Name = PackagedName(p.Name, v)
	p.Notes = fmt.Sprintf("%s; package with %g nH common-source inductance", p.Notes, v.Lcs*1e9)
	p.Lcs = q.Some(q.Inductance(v.Lcs))
	p.Lloop = q.Some(q.Inductance(v.Lcs))
	return p
}

// ParCompared are the parasitic rows whose energies are compared: those
// swrank did not screen out, and those it screened only for the drain
// voltage rating (the overshoot these cells add is what the voltage screen
// is for; the simulated energies exist all the same).
func (s *Suite) ParCompared() []Row {
	var out []Row
	for _, r := range s.ParRows {
		if !r.Screened || r.VoltageOnly {
			out = append(out, r)
		}
	}
	return out
}

// Plain returns the plain-cell row of the same device at the same point,
// or nil.
func (s *Suite) Plain(r *Row) *Row {
	for i := range s.Rows {
		if s.Rows[i].Device == r.Device && s.Rows[i].Point == r.Point {
			return &s.Rows[i]
		}
	}
	return nil
}

func (c *Config) model(name string) *spice.Model {
	for i := range c.Devices {
		if c.Devices[i].Name == name {
			return &c.Devices[i]
		}
	}
	return nil
}

func (c *Config) point(name string) *spice.Point {
	for i := range c.Points {
		if c.Points[i].Name == name {
			return &c.Points[i]
		}
	}
	return nil
}

// characteriseAll characterises every model (spice.Characterise) on at
// most workers ngspice processes, in the models' order.
func characteriseAll(ctx context.Context, r *spice.Runner, models []spice.Model, workers int) ([]*spice.Datasheet, error) {
	sheets := make([]*spice.Datasheet, len(models))
	err := parallel(ctx, len(models), workers, func(ctx context.Context, i int) error {
		ds, err := spice.Characterise(ctx, r, &models[i])
		sheets[i] = ds
		return err
	})
	return sheets, err
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
