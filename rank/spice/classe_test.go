package spice

import (
	"math"
	"testing"
)

// The series capacitor leaves the excess reactance asked for: the tank's
// reactance ωL − 1/(ωC₂) at f is X (Raab 1977, the series branch of class
// E). Invented values.
func TestSeriesCapacitor(t *testing.T) {
	for _, c := range []struct{ f, l, x float64 }{{2e6, 32e-6, 24}, {6.78e6, 4e-6, 9.5}, {1e6, 100e-6, 0}} {
		c2 := SeriesCapacitor(c.f, c.l, c.x)
		w := 2 * math.Pi * c.f
		if got := w*c.l - 1/(w*c2); math.Abs(got-c.x) > 1e-9*w*c.l {
			t.Errorf("f %g, L %g, X %g: C2 %g leaves X = %g", c.f, c.l, c.x, c2, got)
		}
	}
}

// measureClassE on a synthetic last period: a load current I·sin(ωt) into
// R gives P_o = I²·R/2, a drain voltage V·(1 − cos ωt) has mean V and peak
// 2V, and a constant supply current −i(vdd) = I_dc gives V_dd·I_dc
// (definitions of the mean and the rms value; invented numbers). A
// channel current on from 10 % to 70 % of each period conducts for 60 %
// of it and starts with the drain at V·(1 − cos 0.2π).
func TestMeasureClassE(t *testing.T) {
	const (
		f, vdd, idc, il, r, vm = 1e6, 12.0, 0.4, 0.7, 20.0, 12.0
		cycles, n              = 30, 4000
	)
	x := &ClassEParts{Vdd: vdd, F: f, R: r, Cycles: cycles}
	T := 1 / f
	tab := &Table{Names: []string{"time", "v(d)", "v(g)", "v(gx)", "v(p)", "i(vmd)", "i(vmg)", "i(vl)", "i(vdd)", "@m1[id]"}}
	tab.Cols = make([][]float64, len(tab.Names))
	for k := 0; k <= 2*n; k++ {
		tm := (cycles-2)*T + float64(k)*T/n
		w := 2 * math.Pi * f * tm
		var ich float64
		if ph := k % n; ph >= n/10 && ph < 7*n/10 {
			ich = 1
		}
		row := []float64{tm, vm * (1 - math.Cos(w)), 0, 0, 0, 0, 0, il * math.Sin(w), -idc, ich}
		for i, v := range row {
			tab.Cols[i] = append(tab.Cols[i], v)
		}
	}
	m, err := measureClassE(tab, x)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"P_o", m.Po, il * il * r / 2}, {"P_o before", m.PoPrev, il * il * r / 2}, {"mean v", m.VMean, vm},
		{"peak v", m.VPeak, 2 * vm}, {"supply", m.PSupply, vdd * idc}, {"I_dc", m.IDC, idc},
		{"channel on", m.OnShare, 0.6}, {"v at the channel's turn-on", m.VChannelOn, vm * (1 - math.Cos(0.2*math.Pi))},
	} {
		if math.Abs(c.got-c.want) > 1e-5*math.Abs(c.want) {
			t.Errorf("%s = %.8g, want %.8g", c.name, c.got, c.want)
		}
	}
	short := &Table{Names: tab.Names, Cols: make([][]float64, len(tab.Names))}
	for i := range tab.Cols {
		short.Cols[i] = tab.Cols[i][:n/2]
	}
	if _, err := measureClassE(short, x); err == nil {
		t.Error("a table that stops before the last period was accepted")
	}
}
