package evaluate

import (
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/stage"
	"swrank/rank/thermal"
)

// rth returns the junction-to-ambient thermal resistance of device d at
// stage s, and the flags of the estimates it used: with a case-to-ambient
// path (s.RthCA), junction to case plus that path; else junction to
// ambient. Either resistance is the part's or its package family's top
// (fit.Device.RthJC, RthJA). With neither, it returns 0 and FlagNoRth: the
// junction is then taken at tj_max (junction).
func rth(d *fit.Device, s *stage.Stage) (q.ThermalResistance, fit.Flags) {
	p := d.Part
	jc, ja := d.RthJC, d.RthJA
	if !p.RthJC.OK && s.RthJCBlank.OK {
		jc = s.RthJCBlank // the user's value for a blank rth_jc
	}
	if !p.RthJA.OK && s.RthJABlank.OK {
		ja = s.RthJABlank
	}
	switch {
	case s.RthCA.OK && jc.OK:
		if !p.RthJC.OK {
			return jc.V + s.RthCA.V, fit.FlagRthJCEstimated
		}
		return jc.V + s.RthCA.V, 0
	case ja.OK:
		if !p.RthJA.OK {
			return ja.V, fit.FlagRthJAEstimated
		}
		return ja.V, 0
	}
	return 0, fit.FlagNoRth
}

// caseTemperature is the case temperature of a device at junction
// temperature tj dissipating p in the transistor: tj − Rth,jc·p, or tj
// when the junction-to-case resistance is unknown.
func caseTemperature(d *fit.Device, tj q.Temperature, p q.Power) q.Temperature {
	if !d.RthJC.OK {
		return tj
	}
	return tj - q.Temperature(float64(d.RthJC.V)*float64(p))
}

// junction solves the thermal loop of one device at stage s into sol:
// pinned by the user, at tj_max without a thermal path (unknown is not
// zero: the hottest the part may run), else by SolveJunction. It returns the temperature to evaluate the losses at
// (Tj,max when no steady state exists).
func junction(sol *thermal.Solution, m *thermal.Model, s *stage.Stage, rth q.ThermalResistance, tjMax q.Temperature) q.Temperature {
	switch {
	case s.TjFixed.OK:
		*sol = thermal.Solution{Tj: s.TjFixed.V, Status: thermal.Fixed, Found: true}
	case rth == 0:
		*sol = thermal.Solution{Tj: tjMax, Status: thermal.Fixed, Found: true}
	default:
		thermal.SolveJunction(sol, m, s.Ambient, rth, tjMax)
	}
	if !sol.Found {
		return tjMax
	}
	return sol.Tj
}
