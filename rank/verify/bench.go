package verify

import (
	"fmt"
	"math"

	"swrank/rank/evaluate"
	"swrank/rank/spice"
	"swrank/rank/stage"
)

// FeedRatio is the class E bench's feed choke as ωL_f/R: rank/resonant's
// solver gives 0.2 % more output power with it than with the design's
// ideal choke (docs/spice-crosscheck.md, class E).
const FeedRatio = 1000

// NewBench builds the stage's bench for a ranked result: its devices'
// models, the point's voltages, currents, timing and driver.
func NewBench(pt *stage.Point, r *evaluate.Result, base string) (*spice.Bench, error) {
	s := &pt.Stage
	devs := make([]*spice.Device, r.N)
	for i := 0; i < r.N; i++ {
		d, err := LoadModel(base, r.Devices[i].Dev.Part)
		if err != nil {
			return nil, err
		}
		devs[i] = d
	}
	drive := func(d *stage.Driver) spice.Drive {
		return spice.Drive{VOn: float64(d.VOn), VOff: float64(d.VOff), RSource: float64(d.RSource),
			RSink: float64(d.RSink), RgExt: float64(d.RgExt)}
	}
	b := &spice.Bench{Ctrl: devs[0], Fsw: float64(s.Fsw), Drive: [2]spice.Drive{drive(s.DriverOf(false)), drive(s.DriverOf(true))}}
	hard := func(st *stage.SwitchStress) [2]bool {
		return [2]bool{st.HardOn || st.VSoftOn > 0, st.HardOff}
	}
	b.Hard[0] = hard(&pt.Ctrl)
	switch s.Topology {
	case stage.Custom:
		ion, ioff, irms := float64(s.Ion), float64(s.Ioff), float64(s.Irms)
		ms := (ion*ion + ion*ioff + ioff*ioff) / 3
		d := 0.5
		if ms > 0 {
			d = irms * irms / ms
		}
		b.Kind, b.Duty = spice.CellBench, min(max(d, 0.02), 0.95)
		b.Vblock, b.Ion, b.Ioff = float64(s.Vblock), ion, ioff
	case stage.Buck, stage.Boost:
		b.Kind = spice.BuckBench
		vl := float64(s.Vin - s.Vout)
		if s.Topology == stage.Boost {
			b.Kind, vl = spice.BoostBench, float64(s.Vin)
		}
		b.Duty = float64(pt.Ctrl.Duty)
		b.Vin, b.Vout, b.IL = float64(s.Vin), float64(s.Vout), float64(pt.IL)
		b.Inductance = float64(s.Inductance)
		if b.Inductance <= 0 {
			if pt.Ripple <= 0 {
				return nil, fmt.Errorf("no inductance and no ripple to size the bench's inductor")
			}
			b.Inductance = vl * b.Duty / (float64(pt.Ripple) * b.Fsw)
		}
		b.DeadTime = [2]float64{float64(s.DeadTimeSyncOn.Or(stage.DefaultDeadTime)), float64(s.DeadTimeCtrlOn.Or(stage.DefaultDeadTime))}
		if pt.HasSync {
			b.Sync = devs[1]
			b.Hard[1] = hard(&pt.Sync)
		} else {
			b.Diode = spice.Rectifier{Vf: float64(s.Diode.Vf), Qrr: float64(s.Diode.Qrr), Cj: float64(s.Diode.Cj)}
			if b.Diode.Vf <= 0 {
				b.Diode.Vf = float64(stage.DefaultDiodeVf)
			}
		}
	case stage.ClassE:
		e := &pt.RF.E
		w := 2 * math.Pi * float64(s.Fsw)
		b.Kind, b.Duty = spice.ClassEBench, 0.5
		b.Hard[0] = [2]bool{false, true}
		b.ClassE = &spice.ClassEParts{Vdd: float64(e.VDD), F: float64(e.F), R: float64(e.R), L: float64(e.L), C2: float64(e.C2),
			CExt: float64(r.RF.CExternal), LFeed: FeedRatio * float64(e.R) / w, IDC: float64(e.IDC), Po: float64(e.Po)}
	default:
		return nil, fmt.Errorf("no bench for a %s stage", s.Topology)
	}
	return b, nil
}
