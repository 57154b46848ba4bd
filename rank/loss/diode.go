package loss

import (
	"math"

	q "swrank/devices/quantity"
	"swrank/rank/numeric"
)

// DeadTimeEnergy is the body-diode (reverse) conduction energy per cycle in
// the dead times: Vsd·(I1·t1 + I2·t2).
//
// Source: Erickson & Maksimović 2001, ch. 4; Graovac et al. 2006.
func DeadTimeEnergy(vsd1 q.Voltage, i1 q.Current, t1 q.Time, vsd2 q.Voltage, i2 q.Current, t2 q.Time) q.Energy {
	return q.Energy(float64(vsd1)*float64(i1)*float64(t1) + float64(vsd2)*float64(i2)*float64(t2))
}

// RecoveryEnergy is the reverse-recovery energy per cycle that lands in the
// hard-switching transistor: Qrr·V.
//
// Source: Graovac et al. 2006; Erickson & Maksimović 2001, ch. 4 (the
// recovered charge flows through the turning-on switch at full voltage).
func RecoveryEnergy(qrr q.Charge, v q.Voltage) q.Energy {
	return q.Energy(float64(qrr) * float64(v))
}

// DiodeDropAt moves a 25 °C diode forward drop to junction temperature t
// with a linear coefficient tc in V/K, never below zero.
//
// Source: common practice (about −2 mV/K for a silicon p-n junction at
// constant current; Sze & Ng 2007, ch. 2, give the origin in the
// temperature dependence of the intrinsic density).
func DiodeDropAt(vsd q.Voltage, tc float64, t q.Temperature) q.Voltage {
	return max(vsd+q.Voltage(tc*float64(t-25)), 0)
}

// QrrLaw is the recovered charge of a body diode against junction
// temperature, linear through the datasheet point: Q(T) = Q0 + Slope·(T − T0),
// never below zero.
type QrrLaw struct {
	Q0    q.Charge      // recovered charge at T0, C; ≥ 0
	T0    q.Temperature // temperature of Q0, °C
	Slope float64       // C/K
}

// At returns Q(T).
func (l QrrLaw) At(t q.Temperature) q.Charge {
	return max(l.Q0+q.Charge(l.Slope*float64(t-l.T0)), 0)
}

// QrrRisePerK is the default relative rise of the recovered charge with
// temperature: three times the 25 °C value at 125 °C, i.e. +2 % of
// Q(25 °C) per kelvin, the steep end of the 1.5-3× that silicon body
// diodes show over that range (common practice, from memory), so that a
// blank qrr_hot never makes a part look better.
const QrrRisePerK = 0.02

// FitQrrLaw returns the law through (q0 at t0) and, when hot is true,
// (q1 at t1, t1 ≠ t0); otherwise the default rise QrrRisePerK relative to the
// 25 °C value implied by q0 at t0.
//
// Source: two datasheet points when given; else common practice (about 3×
// from 25 to 125 °C).
func FitQrrLaw(q0 q.Charge, t0 q.Temperature, q1 q.Charge, t1 q.Temperature, hot bool) QrrLaw {
	if hot && t1 != t0 {
		return QrrLaw{Q0: q0, T0: t0, Slope: float64(q1-q0) / float64(t1-t0)}
	}
	q25 := float64(q0) / (1 + QrrRisePerK*float64(t0-25))
	return QrrLaw{Q0: q0, T0: t0, Slope: q25 * QrrRisePerK}
}

// RecoveredCharge is the charge a p-n diode recovers when its forward
// current iF, carried long enough to store its steady charge τ·iF, is
// ramped down at the rate didt and on into reverse (the commutating switch
// sets the ramp): RecoveredChargeAfter with an unbounded forward interval.
// Fast commutation (didt·τ ≫ iF) recovers the whole stored charge τ·iF;
// slow commutation recovers didt·τ²/2, whatever the current.
func RecoveredCharge(tau q.Time, iF q.Current, didt q.Slew) q.Charge {
	return RecoveredChargeAfter(tau, iF, didt, q.Time(math.Inf(1)))
}

// RecoveredChargeAfter is the charge a p-n diode recovers when it has
// carried iF for the time tOn from no stored charge (a synchronous
// switch's body diode in a dead time: its channel carried the current
// before, at a drop far below the junction's knee), and the current is
// then ramped down at the rate didt and on into reverse until the stored
// charge is gone. By the charge-control model with lifetime τ, dq/dt =
// i − q/τ: the ramp starts from q₀ = τ·iF·(1 − exp(−tOn/τ)), the charge
// left at the zero crossing t₀ = iF/didt is
//
//	q(t₀) = a·τ² + (q₀ − τ·iF − a·τ²)·exp(−t₀/τ)   (a = didt),
//
// and the reverse current a·s, which keeps ramping while recombination
// goes on, sweeps it out after s = u·τ with (x − 1)·e^(−u) = u − 1,
// x = q(t₀)/(a·τ²), that is u = 1 + W₀((x − 1)/e) (numeric.LambertW0).
// The recovered charge is the reverse current's integral,
//
//	Q_rr = a·τ²·u²/2,
//
// 0 when nothing is left at the zero crossing. The simulator's diode with
// a transit time (ngspice's charge-control model) recovers the same.
//
// Source: the charge-control model of the junction diode (Kassakian,
// Schlecht & Verghese, Principles of Power Electronics, 1991, ch. 20),
// solved here for a forward interval, a linear ramp through zero and the
// reverse phase to the end of the stored charge.
func RecoveredChargeAfter(tau q.Time, iF q.Current, didt q.Slew, tOn q.Time) q.Charge {
	return RecoveryAfter(tau, iF, didt, tOn).Recovered
}

// Recovery is a diode's commutation by the charge-control model
// (RecoveryAfter).
type Recovery struct {
	// Stored is the charge left at the current's zero crossing, C; ≥ 0.
	Stored q.Charge
	// Recovered is the charge the reverse current sweeps out, C; ≥ 0.
	Recovered q.Charge
	// Time is the reverse current's duration, from the zero crossing to
	// the end of the stored charge, s; ≥ 0 (the recovery time of an
	// abrupt recovery).
	Time q.Time
}

// RecoveryAfter is the commutation of RecoveredChargeAfter: the charge
// stored at the zero crossing q(t₀), the charge recovered a·τ²·u²/2 and
// the reverse current's duration u·τ.
func RecoveryAfter(tau q.Time, iF q.Current, didt q.Slew, tOn q.Time) Recovery {
	if tau <= 0 || iF <= 0 || didt <= 0 {
		return Recovery{}
	}
	a, t, i := float64(didt), float64(tau), float64(iF)
	at2 := a * t * t
	t0 := i / a
	q0 := -t * i * math.Expm1(-max(float64(tOn), 0)/t)
	qz := at2 + (q0-t*i-at2)*math.Exp(-t0/t)
	if !(qz > 0) {
		return Recovery{}
	}
	u := 1 + numeric.LambertW0((qz/at2-1)/math.E)
	return Recovery{Stored: q.Charge(qz), Recovered: q.Charge(at2 * u * u / 2), Time: q.Time(u * t)}
}

// FitRecoveryLifetime returns the lifetime τ for which RecoveredCharge
// gives qrr at the datasheet's test current iF and rate didt (the charge
// grows with τ without bound, so any qrr > 0 has one), and false for
// non-positive inputs. The charge is below both of its limits, τ·iF and
// didt·τ²/2, so τ lies above the larger of qrr/iF and √(qrr/didt): the root
// is bracketed from there (numeric.FindRoot, to 1e-9 relative).
func FitRecoveryLifetime(qrr q.Charge, iF q.Current, didt q.Slew) (q.Time, bool) {
	if qrr <= 0 || iF <= 0 || didt <= 0 {
		return 0, false
	}
	lo := math.Max(float64(qrr)/float64(iF), math.Sqrt(float64(qrr)/float64(didt)))
	g := func(t float64) float64 { return float64(RecoveredCharge(q.Time(t), iF, didt)) - float64(qrr) }
	hi := 2 * lo
	ghi := g(hi)
	for ghi < 0 {
		if hi *= 2; hi > 1 {
			return 0, false
		}
		ghi = g(hi)
	}
	// FindRoot starts from the function at both ends: the upper one is
	// known.
	r, err := numeric.FindRoot(func(t float64) float64 {
		if t == hi {
			return ghi
		}
		return g(t)
	}, lo, hi, 1e-9, 0)
	if err != nil {
		return 0, false
	}
	return q.Time(r.X), true
}
