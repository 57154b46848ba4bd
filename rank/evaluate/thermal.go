package evaluate

import (
	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/stage"
	"swrank/rank/thermal"
)

// rth returns the junction-to-ambient thermal resistance for a device.
func rth(p *devices.Part, s *stage.Stage) (q.ThermalResistance, fit.Flags) {
	switch {
	case s.RthCA.OK && p.RthJC.OK:
		return p.RthJC.V + s.RthCA.V, 0
	case p.RthJA.OK:
		return p.RthJA.V, 0
	case p.RthJC.OK:
		return p.RthJC.V, fit.FlagRthJCOnly
	}
	return 0, fit.FlagNoRth
}

// junction solves the thermal loop of one device at stage s into sol:
// pinned by the user, at ambient without a thermal path, else by
// SolveJunction. It returns the temperature to evaluate the losses at
// (Tj,max when no steady state exists).
func junction(sol *thermal.Solution, m *thermal.Model, s *stage.Stage, rth q.ThermalResistance, tjMax q.Temperature) q.Temperature {
	switch {
	case s.TjFixed.OK:
		*sol = thermal.Solution{Tj: s.TjFixed.V, Status: thermal.Fixed, Found: true}
	case rth == 0:
		*sol = thermal.Solution{Tj: s.Ambient, Status: thermal.Solved, Found: true}
	default:
		thermal.SolveJunction(sol, m, s.Ambient, rth, tjMax)
	}
	if !sol.Found {
		return tjMax
	}
	return sol.Tj
}
