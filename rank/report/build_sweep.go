package report

import (
	"fmt"
	"slices"
	"strings"

	"swrank/rank/decide"
)

// Sweep is a sweep of one stage variable: the losses of a set of parts
// over the grid and the crossovers where the best part changes.
type Sweep struct {
	Result     *decide.SweepResult // the swept parts at every grid point
	Set        []int               // the parts shown, indices into Result.Devs
	Crossovers []decide.Crossover  // Result.Crossovers of Set
	Components bool                // show each loss share per part and point
	Source     string              // the library's name
	Parts      int                 // parts in the library
	// Index gives each part's position in the library (by name), which
	// picks its colour in the plots; parts not in it follow the library.
	Index map[string]int
}

// varKey is the field name of the swept variable.
func varKey(v decide.SweepVar) string {
	return v.String() + "_" + strings.ToLower(v.Unit())
}

// fmtX prints a value of the swept variable with its unit.
func fmtX(v decide.SweepVar, x float64) string { return SI(x, v.Unit()) }

// Report builds the sweep's report: the grid (one row per part and point;
// the text formats draw it as one line per point, one column per part),
// the crossovers, and the plot.
func (r *Sweep) Report() *Report {
	sw := r.Result
	v := sw.Spec.Var
	rep := &Report{Command: "sweep", Library: r.Source, Parts: r.Parts}
	pointRecords(rep, &sw.Pts[0])
	scale := "linear"
	if sw.Spec.Log {
		scale = "log"
	}
	rep.About = append([]string{fmt.Sprintf("sweep of the %s from %s to %s, %d points, %s steps; the rest of the stage:", v.Title(),
		fmtX(v, sw.Spec.Lo), fmtX(v, sw.Spec.Hi), len(sw.X), scale)}, aboutPoint(&sw.Pts[0], r.Source, r.Parts)...)
	var modes []string
	for _, p := range sw.Pts {
		if m := p.Mode.String(); !slices.Contains(modes, m) {
			modes = append(modes, m)
		}
	}
	rep.About = append(rep.About, "conduction modes over the sweep: "+strings.Join(modes, ", "))
	for _, n := range sw.Notes {
		rep.About = append(rep.About, "note: "+n)
	}
	rep.About = append(rep.About, "total stage loss of each part; a value in parentheses: the part is set aside there by a screen")
	rep.Meta.Set("variable", Text(v.String()))
	rep.Meta.Set("variable_unit", Text(v.Unit()))
	rep.Meta.Set("scale", Text(scale))
	key := varKey(v)
	best := sw.Best(r.Set)
	grid := Table{Name: "grid"}
	for i, x := range sw.X {
		for _, k := range r.Set {
			var row Row
			row.Set(key, Num(x))
			row.Set("part", Text(sw.Devs[k].Part.Name))
			if r.Components {
				res := sw.Evaluate(k, i)
				lossRecord(&row.Record, res.Losses)
				if t, ok := res.Tj(); ok {
					row.Set("tj_c", Num(float64(t)))
				} else {
					row.Set("tj_c", Unknown())
				}
			} else {
				t, _ := sw.Total(k, i)
				row.Set("total_w", Num(t))
			}
			_, ok := sw.Total(k, i)
			row.SetAside = !ok
			row.Set("set_aside", Bool(!ok))
			row.Set("best", Bool(best[i] == k))
			row.Set("mode", Text(sw.Pts[i].Mode.String()))
			grid.Rows = append(grid.Rows, row)
		}
	}
	if r.Components {
		grid.Compact = []string{key, "part", "total_w", "closed_w", "edges_w", "gate_w", "tj_c", "set_aside"}
		grid.Wide = append([]string{key, "part", "total_w"}, wideLoss...)
		grid.Wide = append(grid.Wide, "tj_c", "set_aside", "best", "mode")
	} else {
		grid.Pivot = &Pivot{Row: key, Col: "part", Val: "total_w", Last: "best"}
		grid.Compact = []string{key, "part", "total_w", "set_aside", "best"}
		grid.Wide = grid.Compact
	}
	rep.Tables = append(rep.Tables, grid)
	cross := Table{Name: "crossovers", Compact: []string{"x", "from_part", "to_part", "kind", "total_w"}, MachineOnly: true}
	cross.Wide = cross.Compact
	sec := Section{Key: "crossover_lines"}
	if len(r.Crossovers) == 0 {
		sec.Lines = []string{"no crossover: the best part is the same over the whole range (among the parts shown)"}
	} else {
		sec.Title = "crossovers, where the best part changes (bracketed on the grid, refined to 1e-6 relative):"
	}
	name := func(k int) string { return sw.Devs[k].Part.Name }
	for _, c := range r.Crossovers {
		var row Row
		row.Set("x", Num(c.X))
		row.Set("from_part", Text(name(c.From)))
		row.Set("to_part", Text(name(c.To)))
		row.Set("kind", Text(c.Kind.String()))
		row.Set("total_w", Num(c.Loss))
		cross.Rows = append(cross.Rows, row)
		sec.Lines = append(sec.Lines, fmt.Sprintf("at %s: %s → %s (%s, %s)", SI(c.X, v.Unit()), name(c.From), name(c.To), c.Kind, SI(c.Loss, "W")))
	}
	rep.Tables = append(rep.Tables, cross)
	rep.Sections = append(rep.Sections, sec)
	rep.Plot = r.plot(best)
	rep.Failed = !slices.ContainsFunc(best, func(b int) bool { return b >= 0 })
	return rep
}

// plot is the sweep's plot: one series per part, the crossovers, and the
// best part between them.
func (r *Sweep) plot(best []int) *Plot {
	sw := r.Result
	v := sw.Spec.Var
	p := &Plot{Title: "total stage loss against " + v.Title(), XLabel: v.Title(), XUnit: v.Unit(),
		YLabel: "total stage loss", XLog: sw.Spec.Log}
	for j, k := range r.Set {
		name := sw.Devs[k].Part.Name
		idx, ok := r.Index[name]
		if !ok {
			idx = len(r.Index) + j
		}
		s := Series{Name: name, Index: idx}
		for i, x := range sw.X {
			t, pass := sw.Total(k, i)
			s.X, s.Y, s.Pass = append(s.X, x), append(s.Y, t), append(s.Pass, pass)
		}
		p.Series = append(p.Series, s)
	}
	for _, c := range r.Crossovers {
		label := fmtX(v, c.X)
		if c.Kind != decide.CrossLoss {
			label += " (" + c.Kind.String() + ")"
		}
		p.Crossovers = append(p.Crossovers, Mark{X: c.X, Y: c.Loss, Label: label})
	}
	// The regions: from the start to each crossover, the best part below
	// it; after the last, the best part at the end.
	lo := sw.Spec.Lo
	for _, c := range r.Crossovers {
		p.Regions = append(p.Regions, Region{From: lo, To: c.X, Best: sw.Devs[c.From].Part.Name})
		lo = c.X
	}
	last := ""
	if n := len(best); n > 0 && best[n-1] >= 0 {
		last = sw.Devs[best[n-1]].Part.Name
	}
	p.Regions = append(p.Regions, Region{From: lo, To: sw.Spec.Hi, Best: last})
	return p
}
