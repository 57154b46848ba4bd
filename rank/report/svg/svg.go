// Package svg draws a report.Plot (a sweep's total loss of each part
// against the swept variable) as SVG or PNG with gonum/plot: at least four
// labelled ticks on each axis, a log scale on either axis on request, the
// points where a part is set aside left undrawn, one colour per part taken
// from its position in the library (the same in every plot of a run), the
// crossovers marked, and a legend that names the best part in each region
// between crossovers.
package svg

import (
	"fmt"
	"image/color"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"swrank/rank/report"
)

// Options choose the plot's scales.
type Options struct {
	LogY bool // a log scale for the loss
}

// MinTicks is the fewest labelled ticks on an axis.
const MinTicks = 4

// palette holds colours told apart in print and by most colour-blind
// readers (a qualitative set of our own choosing); a part past its end
// reuses a colour with a dashed line.
var palette = []color.RGBA{
	{0x1f, 0x5f, 0xa8, 0xff}, {0xd9, 0x6c, 0x00, 0xff}, {0x2e, 0x8b, 0x3e, 0xff}, {0xb8, 0x2e, 0x5c, 0xff},
	{0x6a, 0x4c, 0x9c, 0xff}, {0x8c, 0x5a, 0x2b, 0xff}, {0x00, 0x96, 0x9e, 0xff}, {0x55, 0x55, 0x55, 0xff},
	{0xc4, 0xa0, 0x00, 0xff}, {0x8f, 0xb3, 0x1d, 0xff},
}

// Colour returns the colour and dash pattern of the part at position
// index of the library.
func Colour(index int) (color.RGBA, []vg.Length) {
	if index < 0 {
		index = -index
	}
	c := palette[index%len(palette)]
	if (index/len(palette))%2 == 1 {
		return c, []vg.Length{vg.Points(5), vg.Points(3)}
	}
	return c, nil
}

// Write draws pl, 8 × 5 inches, to w in format: svg or png.
func Write(w io.Writer, pl *report.Plot, format string, opt Options) error {
	p, err := build(pl, opt)
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

// build makes the gonum plot.
func build(pl *report.Plot, opt Options) (*plot.Plot, error) {
	p := plot.New()
	// No control character of a library reaches the XML text.
	p.Title.Text = report.CellText(pl.Title)
	p.X.Label.Text = fmt.Sprintf("%s (%s)", pl.XLabel, pl.XUnit)
	p.Y.Label.Text = pl.YLabel + " (W)"
	p.X.Tick.Marker = ticks{log: pl.XLog, unit: pl.XUnit}
	p.Y.Tick.Marker = ticks{log: opt.LogY, unit: "W"}
	if pl.XLog {
		p.X.Scale = plot.LogScale{}
	}
	if opt.LogY {
		p.Y.Scale = plot.LogScale{}
	}
	p.Legend.Top, p.Legend.Left = true, true
	p.Legend.XOffs, p.Legend.YOffs = vg.Points(8), -vg.Points(4)
	p.Add(plotter.NewGrid())
	lines := map[string]*plotter.Line{}
	ymin, ymax := math.Inf(1), 0.0
	for _, s := range pl.Series {
		col, dash := Colour(s.Index)
		var first *plotter.Line
		// One line per run of points where the part passes: a part set
		// aside is not drawn there.
		var run plotter.XYs
		flush := func() error {
			if len(run) == 0 {
				return nil
			}
			l, err := plotter.NewLine(run)
			if err != nil {
				return fmt.Errorf("plot of %q: %w", s.Name, err)
			}
			l.Color, l.Dashes, l.Width = col, dash, vg.Points(1.5)
			p.Add(l)
			if first == nil {
				first = l
			}
			run = nil
			return nil
		}
		for i := range s.X {
			ok := i < len(s.Pass) && s.Pass[i] && finite(s.Y[i]) && (!opt.LogY || s.Y[i] > 0)
			if !ok {
				if err := flush(); err != nil {
					return nil, err
				}
				continue
			}
			run = append(run, plotter.XY{X: s.X[i], Y: s.Y[i]})
			ymin, ymax = math.Min(ymin, s.Y[i]), math.Max(ymax, s.Y[i])
		}
		if err := flush(); err != nil {
			return nil, err
		}
		if first != nil {
			lines[s.Name] = first
			p.Legend.Add(report.CellText(s.Name), first)
		}
	}
	if ymax == 0 {
		return nil, fmt.Errorf("plot: every part is set aside over the whole range: nothing to draw")
	}
	// Head room for the legend above the curves.
	room := 1.15 + 0.07*float64(len(pl.Series)+len(pl.Regions)+2)
	if opt.LogY {
		p.Y.Min = ymin / 1.5
		p.Y.Max = ymax * math.Pow(10, 0.5*float64(len(pl.Series)+len(pl.Regions)+2)/5)
	} else {
		p.Y.Min, p.Y.Max = 0, ymax*room
	}
	for _, r := range pl.Regions {
		if r.Best == "" || lines[r.Best] == nil {
			continue
		}
		p.Legend.Add(fmt.Sprintf("best from %s to %s: %s", report.SI(r.From, pl.XUnit), report.SI(r.To, pl.XUnit), report.CellText(r.Best)), lines[r.Best])
	}
	if len(pl.Crossovers) > 0 {
		var xy plotter.XYs
		var labels []string
		for _, c := range pl.Crossovers {
			if opt.LogY && c.Y <= 0 {
				continue
			}
			xy = append(xy, plotter.XY{X: c.X, Y: c.Y})
			labels = append(labels, report.CellText(c.Label))
		}
		if len(xy) > 0 {
			s, err := plotter.NewScatter(xy)
			if err != nil {
				return nil, fmt.Errorf("plot: %w", err)
			}
			s.GlyphStyle = draw.GlyphStyle{Color: color.Black, Radius: vg.Points(4), Shape: draw.RingGlyph{}}
			p.Add(s)
			p.Legend.Add("crossover", s)
			lb, err := plotter.NewLabels(plotter.XYLabels{XYs: xy, Labels: labels})
			if err != nil {
				return nil, fmt.Errorf("plot: %w", err)
			}
			lb.Offset = vg.Point{X: vg.Points(5), Y: vg.Points(5)}
			p.Add(lb)
		}
	}
	return p, nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// ticks places at least MinTicks labelled ticks on an axis, labelled with
// an SI prefix and the unit: steps of 1, 2, 2.5 or 5 × 10ⁿ on a linear
// axis; decades, then 1-2-5, then every integer multiple on a log axis
// (linear steps when even those are too few).
type ticks struct {
	log  bool
	unit string
}

// Ticks implements plot.Ticker.
func (t ticks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || !finite(lo) || !finite(hi) {
		return []plot.Tick{{Value: lo, Label: report.SI(lo, t.unit)}}
	}
	var vs []float64
	if t.log && lo > 0 {
		for _, mult := range [][]float64{{1}, {1, 2, 5}, {1, 2, 3, 4, 5, 6, 7, 8, 9}} {
			vs = logTicks(lo, hi, mult)
			if len(vs) >= MinTicks {
				break
			}
		}
		if len(vs) < MinTicks {
			// Less than a decade: plain steps read better.
			vs = linearTicks(lo, hi)
		}
	} else {
		vs = linearTicks(lo, hi)
	}
	out := make([]plot.Tick, len(vs))
	for i, v := range vs {
		out[i] = plot.Tick{Value: v, Label: report.SI(v, t.unit)}
	}
	return out
}

// linearTicks returns the ticks of the largest nice step that still gives
// MinTicks ticks in [lo, hi].
func linearTicks(lo, hi float64) []float64 {
	span := hi - lo
	mag := math.Pow(10, math.Floor(math.Log10(span)))
	var best []float64
	for _, e := range []float64{10, 1, 0.1, 0.01} {
		for _, m := range []float64{5, 2.5, 2, 1} {
			step := m * mag / e
			var vs []float64
			for v := math.Ceil(lo/step) * step; v <= hi+step*1e-9; v += step {
				if math.Abs(v) < step*1e-9 {
					v = 0
				}
				vs = append(vs, v)
			}
			if len(vs) >= MinTicks {
				return vs
			}
			best = vs
		}
	}
	return best
}

// logTicks returns m × 10ⁿ for each m of mult within [lo, hi].
func logTicks(lo, hi float64, mult []float64) []float64 {
	var vs []float64
	for e := math.Floor(math.Log10(lo)); e <= math.Ceil(math.Log10(hi)); e++ {
		for _, m := range mult {
			v := m * math.Pow(10, e)
			if v >= lo*(1-1e-9) && v <= hi*(1+1e-9) {
				vs = append(vs, v)
			}
		}
	}
	return vs
}
