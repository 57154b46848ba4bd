package svg

import (
	"bytes"
	"strings"
	"testing"

	"swrank/rank/report"
)

// Every axis gets at least MinTicks labelled ticks, on linear and log
// scales, over narrow and wide ranges.
func TestTicksAtLeastFour(t *testing.T) {
	cases := []struct {
		name   string
		log    bool
		lo, hi float64
	}{
		{"loss 0 to 3 W", false, 0, 3.1},
		{"loss 0.8 to 1.1 W", false, 0.8, 1.1},
		{"a narrow band", false, 1.00, 1.02},
		{"loss up to 20 kW", false, 0, 21000},
		{"fsw 100 kHz to 5 MHz, log", true, 100e3, 5e6},
		{"fsw 200 to 300 kHz, log", true, 200e3, 300e3},
		{"loss 10 mW to 100 W, log", true, 0.01, 100},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ts := ticks{log: c.log, unit: "W"}.Ticks(c.lo, c.hi)
			if len(ts) < MinTicks {
				t.Fatalf("%d ticks: %+v", len(ts), ts)
			}
			for _, tk := range ts {
				if tk.Value < c.lo*(1-1e-9)-1e-12 || tk.Value > c.hi*(1+1e-9)+1e-12 || tk.Label == "" || strings.Contains(tk.Label, "NaN") {
					t.Errorf("tick %+v outside [%g, %g] or unlabelled", tk, c.lo, c.hi)
				}
			}
		})
	}
}

// A part keeps its colour by its place in the library, whatever the
// plot's order or the other parts drawn.
func TestColourByLibraryPlace(t *testing.T) {
	a, _ := Colour(3)
	b, _ := Colour(3)
	c, _ := Colour(4)
	if a != b || a == c {
		t.Errorf("colours %v %v %v", a, b, c)
	}
	if _, dash := Colour(3 + len(palette)); dash == nil {
		t.Error("a part past the palette is not told apart by its dashes")
	}
}

// A part set aside over the whole range is not drawn and not in the
// legend; the best part of each region is named; the log scale draws.
func TestPlotLeavesOutPartsSetAside(t *testing.T) {
	pl := &report.Plot{Title: "loss", XLabel: "switching frequency", XUnit: "Hz", YLabel: "total stage loss", XLog: true,
		Series: []report.Series{
			{Name: "part-kept", Index: 0, X: []float64{1e5, 1e6, 5e6}, Y: []float64{1, 2, 4}, Pass: []bool{true, true, true}},
			{Name: "part-out", Index: 1, X: []float64{1e5, 1e6, 5e6}, Y: []float64{0.5, 0.6, 0.7}, Pass: []bool{false, false, false}},
		},
		Regions: []report.Region{{From: 1e5, To: 5e6, Best: "part-kept"}},
	}
	for _, logY := range []bool{false, true} {
		var b bytes.Buffer
		if err := Write(&b, pl, "svg", Options{LogY: logY}); err != nil {
			t.Fatal(err)
		}
		s := b.String()
		if strings.Contains(s, "part-out") || !strings.Contains(s, "part-kept") || !strings.Contains(s, "best from 100 kHz to 5.00 MHz: part-kept") {
			t.Errorf("log y %v: legend wrong", logY)
		}
	}
	pl.Series = pl.Series[1:]
	if err := Write(&bytes.Buffer{}, pl, "svg", Options{}); err == nil {
		t.Error("a plot with every part set aside drew")
	}
}
