package report

import (
	"fmt"
	"image/color"
	"io"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	q "swrank/devices/quantity"
	"swrank/rank/decide"
)

// The plot of a sweep, as SVG (or PNG), drawn with gonum/plot.

// siTicks relabels another ticker's major ticks with SI prefixes and the
// unit ("100 kHz", "1.50 W").
type siTicks struct {
	base plot.Ticker
	kind q.Kind
}

// Ticks implements plot.Ticker: the base ticks, relabelled.
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
			return nil, fmt.Errorf("plot of %q: %w", sw.Devs[k].Part.Name, err)
		}
		l.Color = plotutil.Color(j)
		l.Dashes = plotutil.Dashes(j / 7)
		l.Width = vg.Points(1.5)
		p.Add(l)
		p.Legend.Add(cellText(sw.Devs[k].Part.Name), l) // no control character in XML text
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

// Plot draws the sweep's total loss of each part against the swept
// variable (sweepPlot), 8 × 5 inches, to w in format: svg or png.
func (r *Sweep) Plot(w io.Writer, format string) error {
	p, err := sweepPlot(r.Result, r.Set, r.Crossovers)
	if err != nil {
		return err
	}
	wt, err := p.WriterTo(8*vg.Inch, 5*vg.Inch, format)
	if err != nil {
		return fmt.Errorf("plot: %w", err)
	}
	if _, err := wt.WriteTo(w); err != nil {
		return fmt.Errorf("plot: %w", err)
	}
	return nil
}
