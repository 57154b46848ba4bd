package stage

import (
	"errors"
	"fmt"
	"math"
	q "swrank/devices/quantity"
	"swrank/rank/resonant"
)

// RFPoint is the resonant design of a class E or class D operating point,
// solved once per point (rank/resonant).
type RFPoint struct {
	E resonant.ClassE // class E design (Topology ClassE)
	D resonant.ClassD // class D operating point (Topology ClassD)
}

// Resonant reports whether t is a resonant stage (class E or class D),
// whose stresses come from its resonant design.
func (t Topology) Resonant() bool { return t == ClassE || t == ClassD }

// resolveRF designs the resonant stage of a class E or class D point.
func (s *Stage) resolveRF(pt *Point) error {
	var errs []error
	bad := func(format string, a ...any) { errs = append(errs, fmt.Errorf(format, a...)) }
	if s.Vin <= 0 {
		bad("vin: supply voltage must be > 0 V")
	}
	if (s.Pout > 0) == (s.RLoad > 0) {
		bad("give one of --pout and --rload")
	}
	if s.Pout < 0 || s.RLoad < 0 || s.QL < 0 {
		bad("pout, rload, ql: must be ≥ 0")
	}
	if len(errs) > 0 {
		return errors.Join(errs...)
	}
	switch s.Topology {
	case ClassE:
		s.Position = Control
		if s.QL > 0 && s.QL < resonant.MinLoadedQ {
			return fmt.Errorf("ql: %g is below %.4f, the lowest loaded Q at which class E can switch at zero voltage and zero slope with 50 %% duty (Raab 1977)", float64(s.QL), resonant.MinLoadedQ)
		}
		e, err := resonant.DesignClassE(resonant.ClassESpec{VDD: s.Vin, F: s.Fsw, Po: s.Pout, R: s.RLoad, QL: s.QL})
		if err != nil {
			return fmt.Errorf("class E: %w", err)
		}
		pt.RF.E = e
		s.Pout, s.RLoad = e.Po, e.R
		pt.Ctrl = SwitchStress{V: e.VPeak, IOff: e.IOff, IRms: e.IRms, IPeak: e.IPeak, Duty: 0.5}
		if s.QL == 0 {
			pt.Notes = append(pt.Notes, "loaded Q not given: the ideal class E closed form (Q_L → ∞) is used")
		}
	case ClassD:
		s.Position = Pair
		if !s.DeadTime.OK {
			s.DeadTime = q.Some(DefaultDeadTime)
		}
		if !s.Phase.OK && (s.F0 <= 0 || s.QL <= 0) {
			return errors.New("class D needs the tank: --f0 and --ql, or --phase")
		}
		d, err := resonant.ClassDOperatingPoint(resonant.ClassDSpec{Vin: s.Vin, Po: s.Pout, R: s.RLoad, Fsw: s.Fsw,
			F0: s.F0, QL: s.QL, Phase: s.Phase, DeadTime: s.DeadTime.V})
		if err != nil {
			return fmt.Errorf("class D: %w", err)
		}
		pt.RF.D = d
		s.Pout, s.RLoad = d.Po, d.R
		i := q.Current(math.Abs(float64(d.ISwitch)))
		pt.Ctrl = SwitchStress{V: s.Vin, IOn: i, IOff: i, IRms: d.IRms, IPeak: d.Im, Duty: 0.5}
		pt.Sync = pt.Ctrl
		pt.HasSync = true
		if d.Phase > 0 {
			pt.Notes = append(pt.Notes, fmt.Sprintf("tank inductive at fsw (phase %.3f rad): zero-voltage turn-on possible", float64(d.Phase)))
		} else {
			pt.Notes = append(pt.Notes, fmt.Sprintf("tank capacitive at fsw (phase %.3f rad): the partner's body diode is recovered at each turn-on", float64(d.Phase)))
		}
	}
	return nil
}
