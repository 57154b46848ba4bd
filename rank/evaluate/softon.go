package evaluate

import (
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/loss"
	"swrank/rank/stage"
)

// softTurnOn adds to out what a turn-on that is not hard costs (see
// SwitchStress.VSoftOn and ISoftOn): the output-capacitance energy at the
// voltage left across the switch, from the partner's charge k (qoss and
// eoss at st.V, which fix its power law). It returns the reverse-conduction
// energy per cycle of a forced-continuous control switch between the end
// of the node swing and its turn-on, J, with the drop at ambient (the
// caller adds it to the dead-time loss; it is a small, nearly
// temperature-independent share).
func softTurnOn(out *DeviceResult, pt *stage.Point, d *fit.Device, st *stage.SwitchStress, k *partnerCharge, tr *Trace) q.Energy {
	if st.HardOn || st.VSoftOn <= 0 && st.ISoftOn <= 0 {
		return 0
	}
	s := &pt.Stage
	var kl loss.OssLaw
	if k != nil && k.qoss > 0 && k.eoss > 0 {
		kl = loss.OssFromChargeEnergy(k.qoss, k.eoss, st.V)
	}
	vr := st.VSoftOn
	var edead q.Energy
	var tcond q.Time
	if st.ISoftOn > 0 {
		tdt := s.DeadTimeCtrlOn.V
		full := d.Oss.Q(st.V) + kl.Q(st.V)
		if dq := q.Charge(float64(st.ISoftOn) * float64(tdt)); dq >= full {
			vr = 0
			tcond = tdt - q.Time(float64(full)/float64(st.ISoftOn))
			vsd := d.ReverseDrop(st.ISoftOn, s.DriverOf(out.Role == RoleSync).VOff, s.Ambient)
			edead = q.Energy(float64(vsd) * float64(st.ISoftOn) * float64(tcond))
		} else {
			vr = loss.SwingResidual(d.Oss, kl, st.V, dq)
		}
	}
	e := loss.SoftTurnOnEnergy(d.Oss, kl, st.V, vr)
	out.Ecoss += e
	out.Losses.Coss += q.Power(float64(e) * float64(s.Fsw))
	if tr != nil {
		if st.ISoftOn > 0 {
			tr.add(out.Role.String(), "soft turn-on", "the reversed current I swings the node in the dead time: Q_K(x) + Q_S(V) − Q_S(V − x) = I·t_dt; residual V_r = V − x; E = E_S(V_r) + V·[Q_K(V) − Q_K(V − V_r)] − [E_K(V) − E_K(V − V_r)]; then reverse conduction for t_dt − (Q_S + Q_K)/I",
				T("I reversed", st.ISoftOn), T("t_dt", s.DeadTimeCtrlOn.V), T("Q_S(V) + Q_K(V)", d.Oss.Q(st.V)+kl.Q(st.V)),
				T("V residual", vr), T("E/cycle", e), T("reverse conduction", tcond), T("E reverse/cycle", edead))
		} else {
			tr.add(out.Role.String(), "soft turn-on", "discontinuous conduction: turn-on at zero current with V_r across the switch; E = E_S(V_r) + V·[Q_K(V) − Q_K(V − V_r)] − [E_K(V) − E_K(V − V_r)]",
				T("V", st.V), T("V_r", vr), T("E/cycle", e), T("P", q.Power(float64(e)*float64(s.Fsw))))
		}
	}
	return edead
}
