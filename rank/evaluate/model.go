package evaluate

import (
	"math"
	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/loss"
	"swrank/rank/stage"
)

// devModel is what one device's evaluation fixes before the thermal solve;
// at computes everything that depends on the junction temperature. The
// temperature moves the threshold and the plateau by the same amount, so
// the plateau overdrives, the Qgs2 segments and the Miller charges are
// fixed here once (the thermal loop calls at at every iterate).
type devModel struct {
	d             *fit.Device
	s             *stage.Stage
	drv           *stage.Driver // this device's gate driver (Stage.DriverOf)
	st            *stage.SwitchStress
	f             float64
	hard, driveOK bool
	dead          bool         // dead-time conduction (synchronous switch)
	rOn, rOff     q.Resistance // gate loops: driver + external + internal
	rdOn, rdOff   q.Resistance // effective driver resistances (peak-current limits included)
	vdsGate       q.Voltage    // drain voltage of the gate-charge curve
	lcs           q.Inductance // common-source inductance in the gate loop
	lloop         q.Inductance // power-loop inductance at the hard edges
	tDiode1       q.Time       // the diode's conduction in the dead time before this switch's turn-on (deadTiming)
	tDiode2       q.Time       // and after its turn-off

	// Fixed by prepare.
	odOn, odOff, odPk       q.Voltage         // plateau overdrive Vpl − Vth at the turn-on, turn-off and peak currents
	qgs2On, qgs2Off, qgs2Pk q.Charge          // threshold-to-plateau charge at those currents
	qgdV, qgdGate           q.Charge          // Miller charge at the switched voltage and at the gate curve's voltage
	rise                    loss.RiseIntegral // the turn-off voltage rise (Device.HasMiller)
	risePow                 loss.PowNear      // its a^(−1/N) across the thermal loop's calls
	cossSmall               q.Capacitance     // small-signal output capacitance at the switched voltage
	qthPerV                 float64           // charge to the threshold per volt of threshold, C/V
	oss                     loss.OssPoint     // output capacitance at the switched voltage
	linGate                 gateFigures       // the linear gate's (tr/tf method: temperature-independent)
	split                   [2]loss.GateSplit // SplitGateEnergy's shares of 1 J at turn-on and at turn-off
	rRev, rRev25            float64           // GaN reverse-conduction resistance at rds_on_tj and at 25 °C, Ω
}

// prepare fixes the temperature-independent parts of at.
func (m *devModel) prepare() {
	d, st, drv := m.d, m.st, m.drv
	od := func(i q.Current) (q.Voltage, q.Charge) {
		v := max(d.PlateauAt(i)-d.Vth, 1e-3)
		return v, d.Qgs2 * q.Charge(v/(d.VplSpec-d.Vth))
	}
	m.odOn, m.qgs2On = od(st.IOn)
	m.odOff, m.qgs2Off = od(st.IOff)
	m.odPk, m.qgs2Pk = od(st.IPeak)
	m.qgdV, m.qgdGate = d.MillerChargeAt(st.V), d.MillerChargeAt(m.vdsGate)
	if d.HasMiller && m.hard {
		m.rise = d.Rise.AtPoint(&d.Miller, m.oss)
		m.risePow = loss.NewPowNear(&d.RisePow)
		m.cossSmall = q.Capacitance(m.rise.CossTop())
	}
	if m.cossSmall == 0 && st.V > 0 && m.lloop > 0 {
		m.cossSmall = m.oss.C()
	}
	if d.Vth > 0 {
		m.qthPerV = float64(d.Qth) / float64(d.Vth)
	}
	if m.vdsGate <= 0 {
		// A soft edge: the oxide Cgd charges beside Cgs below the
		// plateau too (fit.Device.Curve).
		c := d.SoftCgd()
		m.qthPerV += float64(c)
		m.qgs2Pk += q.Charge(float64(c) * float64(m.odPk))
	}
	m.split[0] = loss.SplitGateEnergy(1, 0, m.rdOn, m.rdOff, drv.RgExt, d.RgInt)
	m.split[1] = loss.SplitGateEnergy(1, 1, m.rdOn, m.rdOff, drv.RgExt, d.RgInt)
	if d.Method != fit.MethodGateCharge {
		g := &m.linGate
		g.qg = d.Part.Qg * q.Charge((drv.VOn-drv.VOff)/d.Part.QgVgs)
		g.egate = q.Energy(float64(g.qg) * float64(drv.VOn-drv.VOff))
		g.stored = g.egate / 2
		gOn, gOff := rampShares(drv, m.rOn, m.rOff, g.qg)
		g.split = loss.SplitGateEnergyRamp(g.egate, g.stored, m.rdOn, m.rdOff, drv.RgExt, d.RgInt, gOn, gOff)
	}
	if m.dead && d.Part.Technology == devices.GaN {
		m.rRev = float64(d.Gate.At(d.Part.RdsOnVgs))
		m.rRev25 = m.rRev * d.Temp.Factor(25)
	}
}

// gateFigures are the gate drive's charge and energies per cycle.
type gateFigures struct {
	qg            q.Charge
	egate, stored q.Energy
	split         loss.GateSplit
}

// tempState is a device's temperature-dependent results at one Tj.
type tempState struct {
	vth, vplOn, vplOff q.Voltage
	qg                 q.Charge
	egate, stored      q.Energy
	split              loss.GateSplit
	trans              loss.Transitions // with the common-source inductance
	tir0, tif0         q.Time           // current intervals without it
	tRise, tFall       q.Time           // the intervals in which the loop current changes
	eon, eoff          q.Energy
	elcsOn, elcsOff    q.Energy  // added by the common-source inductance
	eloop              q.Energy  // net added by the loop inductance
	iTop               q.Current // channel current left when the turn-off voltage rise ends
	qCollapse          q.Charge  // Miller charge moved at turn-off while the channel carries no current (RiseIntegral.EnergyCharge)
	eCollapse          q.Energy  // its energy, moved from the gate loop to the drain (gateAt)
	vpeak              q.Voltage
	vsd1, vsd2         q.Voltage
	edead              q.Energy
	p                  q.Power // edges + dead time + gate (Rg,int) loss in the switch
}

// chargeTime is the time gate current i takes to move charge qq (+Inf when
// no current flows).
func chargeTime(qq q.Charge, i q.Current) q.Time {
	if i <= 0 {
		return q.Time(math.Inf(1))
	}
	return q.Time(float64(qq) / float64(i))
}

// reverseDrops are the reverse-conduction drops in the two dead times at
// tj (Device.reverseDrop, with the GaN resistances fixed by prepare).
func (m *devModel) reverseDrops(tj q.Temperature) (q.Voltage, q.Voltage) {
	d, st := m.d, m.st
	voff := m.drv.VOff
	if m.rRev == 0 {
		return d.ReverseDrop(st.IDead1, voff, tj), d.ReverseDrop(st.IDead2, voff, tj)
	}
	r := m.rRev * d.Temp.Factor(tj)
	return d.ReverseDropGaN(st.IDead1, voff, tj, r, m.rRev25), d.ReverseDropGaN(st.IDead2, voff, tj, r, m.rRev25)
}
