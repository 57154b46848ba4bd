package spicecheck

import (
	"math"

	q "swrank/devices/quantity"
	"swrank/rank/evaluate"
	"swrank/rank/spice"
	"swrank/rank/stage"
)

// ClassEStage is swrank's class E stage for case c: the supply, the design
// output power, the frequency and the loaded Q, the same driver, and the
// junction pinned to the simulation's 25 °C.
func ClassEStage(c *ClassECase) stage.Stage {
	return stage.Stage{
		Topology: stage.ClassE,
		Vin:      q.Voltage(c.Vdd), Pout: q.Power(c.Pout), Fsw: q.Frequency(c.Fsw), QL: q.Ratio(c.QL),
		Driver: stage.Driver{VOn: q.Voltage(c.VOn), VOff: 0,
			RSource: q.Resistance(c.RSource), RSink: q.Resistance(c.RSink), RgExt: q.Resistance(c.RgExt), Edge: q.Time(c.Edge)},
		TjFixed: q.Some[q.Temperature](25),
	}
}

// ClassEPartsFor takes the component values from swrank's resolved point
// (the finite-Q design of rank/resonant: R, L, C₂) and its evaluation of the
// part (RF.CExternal), and sizes the feed choke to c.FeedRatio.
func ClassEPartsFor(c *ClassECase, pt *stage.Point, res *evaluate.Result) spice.ClassEParts {
	e := &pt.RF.E
	w := 2 * math.Pi * c.Fsw
	return spice.ClassEParts{
		Vdd: c.Vdd, F: c.Fsw, R: float64(e.R), L: float64(e.L), C2: float64(e.C2),
		CExt: float64(res.RF.CExternal), LFeed: c.FeedRatio * float64(e.R) / w, IDC: float64(e.IDC), Po: float64(e.Po),
		VOn: c.VOn, RSource: c.RSource, RSink: c.RSink, RgExt: c.RgExt, Edge: c.Edge,
		Cycles: c.Cycles, StepLimit: 1 / c.Fsw / 1000,
	}
}
