package design

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"path/filepath"
	"strconv"
	"strings"

	"swrank/rank/decide"
	"swrank/rank/stage"
)

// Decisions are the inputs of the decision features, shared by rank,
// compare and sweep: the design file, the load profile, paralleling and
// the light-load behaviour. A command's flags set the exported fields;
// Apply then fills the rest from the design file.
type Decisions struct {
	// Design is the design file's path; "" for none.
	Design string
	// Weighting is the load profile of the rated point over which rank
	// ranks by weighted efficiency: euro, cec, quarters, 10-20-50-100, or
	// LOAD:WEIGHT pairs such as "10%:0.2,50%:0.5,100%:0.3"
	// (decide.ParseWeighting). Default "": the rated point alone.
	Weighting string
	// Parallel is the number of paralleled devices in each place a part
	// fills: "" or "1" for one device, a count from 1 to
	// decide.MaxParallel, or "auto" for the count from 1 to ParallelMax
	// that loses least. Default "": one device.
	Parallel string
	// ParallelMax is the largest count "auto" tries, 1 to
	// decide.MaxParallel. The command line's default is
	// decide.DefaultParallelMax (4).
	ParallelMax int
	// Valley makes a diode-rectified stage in discontinuous conduction turn
	// on at the first valley of its ringing instead of at the resting
	// voltage (stage.LightLoad). Default false.
	Valley bool

	set    map[string]bool // flags given on the command line
	points []point         // the design's named points
}

// point is one [[point]] of a design file.
type point struct {
	name   string
	weight float64
	stage  stage.Stage
}

// Command is what a design file fills: a command's flags, parsed, and the
// values they are bound to. Every key of the file is the name of a flag,
// and its value the text that flag takes.
type Command struct {
	// Flags is the command's flag set, parsed. A key whose flag the
	// command line set is only checked; a key for another command's flag
	// (fitted, for compare) is skipped; any other key sets its flag.
	Flags *flag.FlagSet
	// Stage is the stage that Flags fill: each [[point]] starts from it.
	Stage *stage.Stage
	// Parts and Demo are the library flags, set from the file's parts key
	// ("demo", or a path relative to the design file) unless the command
	// line set either. Parts holds one path per --parts given.
	Parts *[]string
	Demo  *bool
	// AllFlags returns a new flag set of every flag of rank, bound to
	// values of its own: the value of a key the command line overrides is
	// checked on it.
	AllFlags func() *flag.FlagSet
	// StageFlags returns a new flag set of the stage, driver and thermal
	// flags, bound to s: a point's keys set them.
	StageFlags func(s *stage.Stage) *flag.FlagSet
}

// LightLoad is the light-load behaviour asked for.
func (d *Decisions) LightLoad() stage.LightLoad { return stage.LightLoad{Valley: d.Valley} }

// ParallelCounts returns the counts to try, ascending from 1, and whether
// the best of them is chosen (auto); an error names the flag at fault.
func (d *Decisions) ParallelCounts() (counts []int, auto bool, err error) {
	switch p := strings.TrimSpace(strings.ToLower(d.Parallel)); p {
	case "", "1":
		return []int{1}, false, nil
	case "auto":
		if d.ParallelMax < 1 || d.ParallelMax > decide.MaxParallel {
			return nil, false, fmt.Errorf("--parallel-max %d: want 1 to %d", d.ParallelMax, decide.MaxParallel)
		}
		for n := 1; n <= d.ParallelMax; n++ {
			counts = append(counts, n)
		}
		return counts, true, nil
	default:
		n, err := strconv.Atoi(p)
		if err != nil || n < 1 || n > decide.MaxParallel {
			return nil, false, fmt.Errorf("--parallel %q: want a count from 1 to %d, or auto", d.Parallel, decide.MaxParallel)
		}
		return []int{1, n}, false, nil
	}
}

// Multi reports whether the stage has several weighted points: a
// weighting, or the design's [[point]] tables (after Apply).
func (d *Decisions) Multi() bool { return d.Weighting != "" || len(d.points) > 0 }

// Paralleled reports whether Parallel asks for more than one device.
func (d *Decisions) Paralleled() bool {
	p := strings.TrimSpace(d.Parallel)
	return p != "" && p != "1"
}

// OwnPath reports whether rank needs the decision path (several points,
// paralleling or valley switching) rather than the plain ranking.
func (d *Decisions) OwnPath() bool {
	return d.Multi() || d.Paralleled() || d.Valley
}

// Apply records which flags the command line set and, with a design file,
// fills every flag of c the command line left alone from it. It then reads
// the design's points. Errors locate the key at fault in the file (*Error).
func (d *Decisions) Apply(c Command) error {
	d.set = map[string]bool{}
	c.Flags.Visit(func(f *flag.Flag) { d.set[f.Name] = true })
	if d.Design == "" {
		return nil
	}
	df, err := load(d.Design)
	if err != nil {
		return err
	}
	// The parts library, relative to the design file.
	if !d.set["parts"] && !d.set["demo"] {
		switch p := strings.TrimSpace(df.Parts.s); {
		case strings.EqualFold(p, "demo"):
			*c.Demo, *c.Parts = true, nil
		case p != "":
			if !filepath.IsAbs(p) {
				p = filepath.Join(filepath.Dir(d.Design), p)
			}
			*c.Parts = []string{p}
		}
	}
	scratch := c.AllFlags()
	scratch.SetOutput(io.Discard)
	for _, sec := range df.sections() {
		keys := sortedKeys(sec.values)
		for _, k := range keys {
			v := sec.values[k]
			if err := df.checkSection(sec.name, k, c); err != nil {
				return err
			}
			if d.set[k] {
				// The command line wins, but a bad value in the file is
				// still reported.
				if scratch.Lookup(k) != nil {
					if err := scratch.Set(k, v.s); err != nil {
						return df.errAt(sec.name+"."+k, err)
					}
				}
				continue
			}
			f := c.Flags.Lookup(k)
			if f == nil {
				continue // a choice for another command (e.g. fitted for compare)
			}
			if err := c.Flags.Set(k, v.s); err != nil {
				return df.errAt(sec.name+"."+k, err)
			}
		}
	}
	// Named points: the stage so far, with each point's own values.
	for i, p := range df.Point {
		dp, err := d.point(df, i, p, c)
		if err != nil {
			return err
		}
		d.points = append(d.points, dp)
	}
	if len(d.points) > 0 && d.Weighting != "" {
		return fmt.Errorf("%s: give a weighting or [[point]] tables, not both", d.Design)
	}
	return nil
}

// point builds the stage of the design's point i from the stage so far.
func (d *Decisions) point(df *file, i int, p map[string]rawValue, c Command) (point, error) {
	where := fmt.Sprintf("point.%d", i+1)
	s := *c.Stage
	fs := c.StageFlags(&s)
	fs.SetOutput(io.Discard)
	scratch := c.AllFlags()
	scratch.SetOutput(io.Discard)
	dp := point{name: fmt.Sprintf("point %d", i+1), weight: 1}
	weightGiven := false
	for _, k := range sortedKeys(p) {
		v := p[k]
		switch k {
		case "name":
			dp.name = strings.TrimSpace(v.s)
			continue
		case "weight":
			w, err := strconv.ParseFloat(strings.TrimSpace(v.s), 64)
			if err != nil || !(w > 0) || w > 1e12 {
				return dp, df.errAt(where+".weight", fmt.Errorf("%q: want a number > 0", v.s))
			}
			dp.weight, weightGiven = w, true
			continue
		}
		if fs.Lookup(k) == nil || nonStageKeys[k] {
			return dp, df.errAt(where+"."+k, fmt.Errorf("unknown key for a point (want name, weight or a stage, driver or thermal value)"))
		}
		target := fs
		if d.set[k] {
			target = scratch // the command line wins; still check the value
		}
		if err := target.Set(k, v.s); err != nil {
			return dp, df.errAt(where+"."+k, err)
		}
	}
	if !weightGiven {
		return dp, df.errAt(where, errors.New("a point needs a weight"))
	}
	dp.stage = s
	return dp, nil
}

// Profile builds the weighted points of the stage from base (the rated
// point, as the flags and the file set it): the weighting's loads of base,
// or the design's points. It returns nil for a single point.
func (d *Decisions) Profile(base stage.Stage) (*decide.Profile, error) {
	switch {
	case d.Weighting != "":
		w, err := decide.ParseWeighting(d.Weighting)
		if err != nil {
			return nil, err
		}
		pr, err := decide.ResolveProfile(base, w, d.LightLoad())
		if err != nil {
			return nil, fmt.Errorf("load profile: %w", err)
		}
		return &pr, nil
	case len(d.points) > 0:
		pts := make([]decide.WeightedPoint, len(d.points))
		for i, p := range d.points {
			pt, err := p.stage.ResolveLight(d.LightLoad())
			if err != nil {
				return nil, fmt.Errorf("%s: %s: %w", d.Design, p.name, err)
			}
			pts[i] = decide.WeightedPoint{Name: p.name, Weight: p.weight, Point: pt}
		}
		pr, err := decide.NewProfile("the design's points", pts)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", d.Design, err)
		}
		return &pr, nil
	}
	return nil, nil
}
