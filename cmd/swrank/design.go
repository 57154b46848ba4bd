package main

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"swrank/rank/decide"
	"swrank/rank/stage"

	"github.com/BurntSushi/toml"
)

// A design file is a small TOML file that holds a stage: its operating
// point or points, driver, thermal path, derating, the choices of the
// decision commands, and the parts library (a path relative to the design
// file). Its keys are the command-line flags' names; a flag given on the
// command line overrides the file. See docs/decisions.md and the starter
// that "swrank new" writes.

// decisionFlags are the inputs of the decision features, shared by rank,
// compare and sweep: the design file, the load profile, paralleling and the
// light-load behaviour.
type decisionFlags struct {
	design      string
	weighting   string
	parallel    string // "" or "1": single devices; "N"; "auto"
	parallelMax int
	valley      bool

	set    map[string]bool // flags given on the command line
	file   *designFile     // the design file, when given
	points []designPoint   // the design's named points
}

// designPoint is one [[point]] of a design file.
type designPoint struct {
	name   string
	weight float64
	stage  stage.Stage
}

func (d *decisionFlags) register(fs *flag.FlagSet) {
	fs.StringVar(&d.design, "design", "", "design `FILE.toml` holding the stage, its points and the parts library (flags override it; see \"swrank new\")")
	fs.StringVar(&d.weighting, "weighting", "", "rank by weighted efficiency over a load `PROFILE` of the rated point: euro, cec, quarters, 10-20-50-100, or LOAD:WEIGHT pairs such as \"10%:0.2,50%:0.5,100%:0.3\"")
	fs.StringVar(&d.parallel, "parallel", "", "paralleled devices in each place the part fills: `N`, or auto (the N from 1 to --parallel-max with the least loss); reported beside the single device")
	fs.IntVar(&d.parallelMax, "parallel-max", decide.DefaultParallelMax, "largest `N` tried by --parallel auto")
	fs.BoolVar(&d.valley, "valley", false, "a diode-rectified stage in discontinuous conduction turns on at the first valley of the ringing (default: at the resting voltage)")
}

// lightLoad is the light-load behaviour asked for.
func (d *decisionFlags) lightLoad() stage.LightLoad { return stage.LightLoad{Valley: d.valley} }

// parallelCounts returns the counts to try and whether the best is chosen.
func (d *decisionFlags) parallelCounts() (counts []int, auto bool, err error) {
	switch p := strings.TrimSpace(strings.ToLower(d.parallel)); p {
	case "", "1":
		return []int{1}, false, nil
	case "auto":
		if d.parallelMax < 1 || d.parallelMax > decide.MaxParallel {
			return nil, false, fmt.Errorf("--parallel-max %d: want 1 to %d", d.parallelMax, decide.MaxParallel)
		}
		for n := 1; n <= d.parallelMax; n++ {
			counts = append(counts, n)
		}
		return counts, true, nil
	default:
		n, err := strconv.Atoi(p)
		if err != nil || n < 1 || n > decide.MaxParallel {
			return nil, false, fmt.Errorf("--parallel %q: want a count from 1 to %d, or auto", d.parallel, decide.MaxParallel)
		}
		return []int{1, n}, false, nil
	}
}

// multi reports whether the stage has several weighted points.
func (d *decisionFlags) multi() bool { return d.weighting != "" || len(d.points) > 0 }

// ownPath reports whether rank needs the decision path (several points,
// paralleling or valley switching) rather than the plain ranking.
func (d *decisionFlags) ownPath() bool {
	p := strings.TrimSpace(d.parallel)
	return d.multi() || p != "" && p != "1" || d.valley
}

// apply records which flags the command line set and, with a design file,
// fills every flag the command line left alone from it. It then reads the
// design's points.
func (d *decisionFlags) apply(fs *flag.FlagSet, in *inputs) error {
	d.set = map[string]bool{}
	fs.Visit(func(f *flag.Flag) { d.set[f.Name] = true })
	if d.design == "" {
		return nil
	}
	df, err := loadDesign(d.design)
	if err != nil {
		return err
	}
	d.file = df
	// The parts library, relative to the design file.
	if !d.set["parts"] && !d.set["demo"] {
		switch p := strings.TrimSpace(df.Parts.s); {
		case strings.EqualFold(p, "demo"):
			in.demo, in.parts = true, ""
		case p != "":
			if !filepath.IsAbs(p) {
				p = filepath.Join(filepath.Dir(d.design), p)
			}
			in.parts = p
		}
	}
	scratch := scratchFlags()
	for _, sec := range df.sections() {
		keys := sortedKeys(sec.values)
		for _, k := range keys {
			v := sec.values[k]
			if err := df.checkSection(sec.name, k, fs); err != nil {
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
			f := fs.Lookup(k)
			if f == nil {
				continue // a choice for another command (e.g. fitted for compare)
			}
			if err := fs.Set(k, v.s); err != nil {
				return df.errAt(sec.name+"."+k, err)
			}
		}
	}
	// Named points: the stage so far, with each point's own values.
	for i, p := range df.Point {
		dp, err := d.point(df, i, p, in)
		if err != nil {
			return err
		}
		d.points = append(d.points, dp)
	}
	if len(d.points) > 0 && d.weighting != "" {
		return fmt.Errorf("%s: give a weighting or [[point]] tables, not both", d.design)
	}
	return nil
}

// point builds the stage of the design's point i from the stage so far.
func (d *decisionFlags) point(df *designFile, i int, p map[string]rawValue, in *inputs) (designPoint, error) {
	where := fmt.Sprintf("point.%d", i+1)
	var tmp inputs
	fs := flag.NewFlagSet(where, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	tmp.register(fs)
	tmp.stage = in.stage
	scratch := scratchFlags()
	dp := designPoint{name: fmt.Sprintf("point %d", i+1), weight: 1}
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
	dp.stage = tmp.stage
	return dp, nil
}

// nonStageKeys are flags that are not part of a stage.
var nonStageKeys = map[string]bool{"parts": true, "demo": true, "partner": true, "format": true, "all": true, "top": true}

// Keys of the sections other than [stage]; [stage] takes every other stage
// flag.
var sectionKeys = map[string][]string{
	"driver":   {"vdrive", "vdrive-off", "rsrc", "rsnk", "ipk-src", "ipk-snk", "rg-ext", "iq"},
	"thermal":  {"ta", "rth-ca", "tj"},
	"derating": {"derate"},
	"choice":   {"weighting", "parallel", "parallel-max", "fitted", "top", "partner"},
}

// designFile is the decoded design file.
type designFile struct {
	path     string
	keys     map[string]keyPos
	Parts    rawValue              `toml:"parts"`
	Stage    map[string]rawValue   `toml:"stage"`
	Driver   map[string]rawValue   `toml:"driver"`
	Thermal  map[string]rawValue   `toml:"thermal"`
	Derating map[string]rawValue   `toml:"derating"`
	Choice   map[string]rawValue   `toml:"choice"`
	Point    []map[string]rawValue `toml:"point"`
}

type section struct {
	name   string
	values map[string]rawValue
}

func (df *designFile) sections() []section {
	return []section{{"stage", df.Stage}, {"driver", df.Driver}, {"thermal", df.Thermal}, {"derating", df.Derating}, {"choice", df.Choice}}
}

// checkSection checks that key belongs in section sec.
func (df *designFile) checkSection(sec, key string, fs *flag.FlagSet) error {
	if keys, ok := sectionKeys[sec]; ok {
		if slices.Contains(keys, key) {
			return nil
		}
		return df.errAt(sec+"."+key, fmt.Errorf("unknown key in [%s] (want %s)", sec, strings.Join(keys, ", ")))
	}
	// [stage]: any stage flag, and valley.
	if key == "valley" {
		return nil
	}
	for _, keys := range sectionKeys {
		if slices.Contains(keys, key) {
			return df.errAt(sec+"."+key, fmt.Errorf("%s belongs in another section", key))
		}
	}
	if nonStageKeys[key] || fs.Lookup(key) == nil && !stageKeyElsewhere(key) {
		return df.errAt(sec+"."+key, errors.New("unknown key in [stage]"))
	}
	return nil
}

// scratchFlags is a flag set of every rank flag, for checking values.
func scratchFlags() *flag.FlagSet {
	var in inputs
	var d decisionFlags
	fs := flag.NewFlagSet("", flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	in.register(fs)
	in.registerOutput(fs)
	d.register(fs)
	return fs
}

// stageKeyElsewhere reports whether key is a stage flag of some command
// (so a design shared by rank, compare and sweep may hold it).
func stageKeyElsewhere(key string) bool {
	var in inputs
	fs := flag.NewFlagSet("", flag.ContinueOnError)
	in.register(fs)
	return fs.Lookup(key) != nil
}

// rawValue is a design-file value kept as the text a flag would take.
type rawValue struct{ s string }

// UnmarshalTOML accepts strings ("500k", "4.7n"), numbers and booleans.
func (r *rawValue) UnmarshalTOML(v any) error {
	switch x := v.(type) {
	case string:
		r.s = x
	case float64:
		r.s = strconv.FormatFloat(x, 'g', -1, 64)
	case int64:
		r.s = strconv.FormatInt(x, 10)
	case bool:
		r.s = strconv.FormatBool(x)
	default:
		return fmt.Errorf("want a string, number or true/false, not a %T", v)
	}
	return nil
}

// keyPos is where a key sits in the design file.
type keyPos struct{ line, col int }

// designError is a problem in a design file, located like encoding/csv's
// ParseError.
type designError struct {
	File      string
	Line, Col int // 0 when unknown
	Field     string
	Err       error
}

func (e *designError) Error() string {
	if e.Line > 0 {
		return fmt.Sprintf("%s:%d:%d: %s: %v", e.File, e.Line, e.Col, e.Field, e.Err)
	}
	return fmt.Sprintf("%s: %s: %v", e.File, e.Field, e.Err)
}

func (e *designError) Unwrap() error { return e.Err }

// errAt locates err at key (section.key or point.N.key).
func (df *designFile) errAt(key string, err error) error {
	p := df.keys[key]
	return &designError{File: df.path, Line: p.line, Col: p.col, Field: key, Err: err}
}

// loadDesign reads and decodes a design file.
func loadDesign(path string) (*designFile, error) {
	src, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("design file: %w", err)
	}
	df := &designFile{path: path, keys: locateKeys(src)}
	md, err := toml.NewDecoder(bytes.NewReader(src)).Decode(df)
	if err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			field := pe.LastKey
			if field == "" {
				field = "syntax"
			}
			return nil, &designError{File: path, Line: pe.Position.Line, Col: max(pe.Position.Col, 1), Field: field, Err: errors.New(pe.Message)}
		}
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if u := md.Undecoded(); len(u) > 0 {
		k := u[0].String()
		return nil, df.errAt(k, errors.New("unknown key (want parts, or a table [stage], [driver], [thermal], [derating], [choice] or [[point]])"))
	}
	return df, nil
}

var (
	tableRe = regexp.MustCompile(`^\s*(\[\[?)\s*([A-Za-z0-9_-]+)\s*\]\]?`)
	keyRe   = regexp.MustCompile(`^(\s*)("([^"]*)"|[A-Za-z0-9_-]+)\s*=`)
)

// locateKeys finds the line and column of each key of a design file,
// named section.key, point.N.key or key at the top: enough to point a
// user at the value to fix. (The TOML decoder reports the position of
// syntax errors itself.)
func locateKeys(src []byte) map[string]keyPos {
	out := map[string]keyPos{}
	prefix := ""
	points := 0
	for i, line := range strings.Split(string(src), "\n") {
		if m := tableRe.FindStringSubmatch(line); m != nil {
			name := m[2]
			if m[1] == "[[" {
				if name == "point" {
					points++
				}
				prefix = fmt.Sprintf("%s.%d", name, points)
			} else {
				prefix = name
			}
			out[prefix] = keyPos{i + 1, strings.Index(line, "[") + 1}
			continue
		}
		if m := keyRe.FindStringSubmatch(line); m != nil {
			k := m[2]
			if m[3] != "" {
				k = m[3]
			}
			full := k
			if prefix != "" {
				full = prefix + "." + k
			}
			out[full] = keyPos{i + 1, len(m[1]) + 1}
		}
	}
	return out
}

func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}

// profile builds the weighted points of the stage, or nil for a single
// point.
func (d *decisionFlags) profile(base stage.Stage) (*decide.Profile, error) {
	switch {
	case d.weighting != "":
		w, err := decide.ParseWeighting(d.weighting)
		if err != nil {
			return nil, err
		}
		pr, err := decide.ResolveProfile(base, w, d.lightLoad())
		if err != nil {
			return nil, fmt.Errorf("load profile: %w", err)
		}
		return &pr, nil
	case len(d.points) > 0:
		pts := make([]decide.WeightedPoint, len(d.points))
		for i, p := range d.points {
			pt, err := p.stage.ResolveLight(d.lightLoad())
			if err != nil {
				return nil, fmt.Errorf("%s: %s: %w", d.design, p.name, err)
			}
			pts[i] = decide.WeightedPoint{Name: p.name, Weight: p.weight, Point: pt}
		}
		pr, err := decide.NewProfile("the design's points", pts)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", d.design, err)
		}
		return &pr, nil
	}
	return nil, nil
}
