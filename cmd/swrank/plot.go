package main

import (
	"bytes"
	"fmt"
	"image/color"
	"os"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	q "swrank/devices/quantity"
	"swrank/rank/decide"
)

// siTicks relabels another ticker's major ticks with SI prefixes and the
// unit ("100 kHz", "1.50 W").
type siTicks struct {
	base plot.Ticker
	kind q.Kind
}

func (t siTicks) Ticks(lo, hi float64) []plot.Tick {
	ts := t.base.Ticks(lo, hi)
	for i := range ts {
		if ts[i].Label != "" {
			ts[i].Label = q.FormatFloat(ts[i].Value, 3, t.kind)
		}
	}
	return ts
}

func sweepKind(v decide.SweepVar) q.Kind {
	switch v {
	case decide.SweepFsw:
		return q.Frequency(0).Kind()
	case decide.SweepIout:
		return q.Current(0).Kind()
	}
	return q.Voltage(0).Kind()
}

// sweepPlot draws the total loss of each part of set against the swept
// variable: one curve per part (named in the legend), points where a screen
// sets the part aside marked with a cross, the crossovers marked with a
// ring and their value; a log axis for a log sweep.
func sweepPlot(sw *decide.SweepResult, set []int, cs []decide.Crossover) (*plot.Plot, error) {
	p := plot.New()
	v := sw.Spec.Var
	p.Title.Text = "total stage loss against " + v.Title()
	p.X.Label.Text = fmt.Sprintf("%s (%s)", v.Title(), v.Unit())
	p.Y.Label.Text = "total stage loss (W)"
	p.X.Tick.Marker = siTicks{plot.DefaultTicks{}, sweepKind(v)}
	if sw.Spec.Log {
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = siTicks{plot.LogTicks{Prec: -1}, sweepKind(v)}
	}
	p.Y.Tick.Marker = siTicks{plot.DefaultTicks{}, q.Power(0).Kind()}
	p.Y.Min = 0
	p.Legend.Top, p.Legend.Left = true, true
	p.Legend.XOffs, p.Legend.YOffs = vg.Points(8), -vg.Points(4)
	p.Add(plotter.NewGrid())
	var screened *plotter.Scatter
	ymax := 0.0
	for j, k := range set {
		xy := make(plotter.XYs, len(sw.X))
		var bad plotter.XYs
		for i, x := range sw.X {
			t, ok := sw.Total(k, i)
			xy[i] = plotter.XY{X: x, Y: t}
			ymax = max(ymax, t)
			if !ok {
				bad = append(bad, plotter.XY{X: x, Y: t})
			}
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return nil, fmt.Errorf("plot of %s: %w", sw.Devs[k].Part.Name, err)
		}
		l.Color = plotutil.Color(j)
		l.Dashes = plotutil.Dashes(j / 7)
		l.Width = vg.Points(1.5)
		p.Add(l)
		p.Legend.Add(sw.Devs[k].Part.Name, l)
		if len(bad) > 0 {
			s, err := plotter.NewScatter(bad)
			if err != nil {
				return nil, err
			}
			s.GlyphStyle = draw.GlyphStyle{Color: plotutil.Color(j), Radius: vg.Points(3), Shape: draw.CrossGlyph{}}
			p.Add(s)
			if screened == nil {
				screened = s
			}
		}
	}
	if screened != nil {
		p.Legend.Add("set aside by a screen", screened)
	}
	// Head room for the legend above the curves.
	p.Y.Max = ymax * (1.15 + 0.07*float64(len(set)+2))
	if len(cs) > 0 {
		xy := make(plotter.XYs, len(cs))
		labels := make([]string, len(cs))
		for i, c := range cs {
			xy[i] = plotter.XY{X: c.X, Y: c.Loss}
			labels[i] = fmtX(v, c.X)
			if c.Kind != decide.CrossLoss {
				labels[i] += " (" + c.Kind.String() + ")"
			}
		}
		s, err := plotter.NewScatter(xy)
		if err != nil {
			return nil, err
		}
		s.GlyphStyle = draw.GlyphStyle{Color: color.Black, Radius: vg.Points(4), Shape: draw.RingGlyph{}}
		p.Add(s)
		p.Legend.Add("crossover", s)
		lb, err := plotter.NewLabels(plotter.XYLabels{XYs: xy, Labels: labels})
		if err != nil {
			return nil, err
		}
		lb.Offset = vg.Point{X: vg.Points(5), Y: vg.Points(5)}
		p.Add(lb)
	}
	return p, nil
}

// writePlot draws the sweep to path (.svg or .png), atomically: the image
// goes to a temporary file in the same directory, renamed into place.
func writePlot(path string, sw *decide.SweepResult, set []int, cs []decide.Crossover) error {
	format := strings.TrimPrefix(strings.ToLower(filepath.Ext(path)), ".")
	if format != "svg" && format != "png" {
		return fmt.Errorf("--plot %q: the file must end in .svg or .png", path)
	}
	p, err := sweepPlot(sw, set, cs)
	if err != nil {
		return err
	}
	wt, err := p.WriterTo(8*vg.Inch, 5*vg.Inch, format)
	if err != nil {
		return fmt.Errorf("plot: %w", err)
	}
	var buf bytes.Buffer
	if _, err := wt.WriteTo(&buf); err != nil {
		return fmt.Errorf("plot: %w", err)
	}
	return writeAtomic(path, buf.Bytes(), false)
}

// writeAtomic writes data to path through a temporary file in the same
// directory, synced and then moved into place. With noClobber an existing
// file is never replaced: the move is a hard link, which fails when path
// exists (O_EXCL semantics), falling back to a checked rename where the
// file system has no hard links.
func writeAtomic(path string, data []byte, noClobber bool) (err error) {
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			os.Remove(tmp)
		}
	}()
	if err = f.Chmod(0o644); err == nil {
		if _, err = f.Write(data); err == nil {
			err = f.Sync()
		}
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if !noClobber {
		if err = os.Rename(tmp, path); err != nil {
			return fmt.Errorf("writing %s: %w", path, err)
		}
		return nil
	}
	if err = os.Link(tmp, path); err == nil {
		os.Remove(tmp)
		return nil
	}
	if os.IsExist(err) {
		return fmt.Errorf("%s already exists: it is left as it is", path)
	}
	// No hard links here: check, then rename (a narrow race remains).
	if _, serr := os.Lstat(path); serr == nil {
		err = fmt.Errorf("%s already exists: it is left as it is", path)
		return err
	}
	if err = os.Rename(tmp, path); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}
