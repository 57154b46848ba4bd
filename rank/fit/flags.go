package fit

import (
	"math/bits"
	"strings"
)

// Flags record the fallbacks and approximations an evaluation used, so the
// user can judge how far to trust a number. They are bits, so that
// evaluation allocates nothing.
type Flags uint64

// The flags. Each has a short code for tables and a sentence for explain.
const (
	FlagQgVdsAssumed        Flags = 1 << iota // gate-charge test voltage missing
	FlagQgIdAssumed                           // gate-charge test current missing: id_max/2
	FlagQgThAssumed                           // qg_th missing: Qth = Qgs·Vth/Vpl (constant Cgs)
	FlagRgIntAssumed                          // rg_int missing: the technology's upper value
	FlagTempDefault                           // no hot on-resistance: technology default law
	FlagRdsOnePoint                           // one gate-voltage point: channel share assumed
	FlagRdsExtrapolated                       // drive below the lowest datasheet gate voltage
	FlagRdsFitClamped                         // two-point gate law replaced by a channel law
	FlagOssSqrtLaw                            // output capacitance from one point with the √ law
	FlagOssFar                                // working voltage far (outside 0.5-2×) from the capacitance's test voltage
	FlagTswNoConditions                       // tr/tf test conditions missing: not rescaled
	FlagPlateauEstimated                      // plateau unknown: threshold + 1 V
	FlagGateLinear                            // gate curve unknown: linear gate, half the energy per edge
	FlagRthJCEstimated                        // rth_jc missing: the top of the package family
	FlagNoRth                                 // no thermal path and no known package: junction at tj_max
	FlagQrrEstimated                          // no qrr for a part with a body diode: estimated from its output charge
	FlagQrrLessCoss                           // qrr includes the output charge: Q_oss at the test's voltage taken out
	FlagVsdDefault                            // vsd (or vsd_if) missing: the technology's upper value
	FlagTjMaxDefault                          // tj_max missing: 150 °C
	FlagDriverLimited                         // driver peak current limits the gate current
	FlagVgsMinDefault                         // vgs_min missing: taken as −vgs_max (0 V for GaN)
	FlagIdPulseMissing                        // no pulsed current rating: peak not screened
	FlagQrrInModel                            // informational: recovery charge counted
	FlagLcs                                   // common-source inductance counted in the current edges
	FlagLoopL                                 // power-loop inductance counted: overshoot and ½·L·I²
	FlagRdsDyn                                // dynamic on-resistance factor applied
	FlagRdsDynFar                             // dynamic factor used above its test voltage or without one
	FlagVthTempDefault                        // threshold, plateau and diode drop moved to Tj by technology defaults
	FlagQrrTempDefault                        // recovered charge raised with Tj by the default law
	FlagFalseOnThin                           // gate bounce uses more than half the off-state margin
	FlagFalseOnUnchecked                      // no capacitance data: false turn-on not screened
	FlagGateSpike                             // negative gate bounce below vgs_min (transient)
	FlagSiCLowDrive                           // SiC part driven below 15 V
	FlagHysteresisEstimated                   // soft switching: no eoss_loss, hysteresis a stated fraction of E_oss
	FlagMillerLumped                          // no crss: one lumped Qgd with a straight voltage ramp
	FlagRthJAEstimated                        // rth_ja missing: the top of the package family
	FlagLcsEstimated                          // l_cs missing: the top of the package family
	FlagLloopEstimated                        // l_loop missing: the top of the package family
	FlagGateChargeEstimated                   // qgs or qgd missing: the top of their share of qg
	FlagEstimateLow                           // informational: the low end of a bracketed estimate gave the worse result
	FlagRdsDynEstimated                       // GaN without rds_dyn: 1.4× after blocking 80 % of the rating
	FlagQrrCondEstimated                      // qrr_if or qrr_didt missing: the recovery test at a quarter of id_max and 100 A/µs
	FlagTdNoConditions                        // informational: td_on or td_off not used (test conditions missing, or not an RC gate's delay)
	FlagCgdShape                              // no crss2 or crss_curve: Cgd's fall with voltage by the abrupt-junction law through crss
	FlagQrrFromTrr                            // informational: qrr blank, taken as ½·irrm·trr
	FlagRdsIdAssumed                          // rds_on_id missing: the on-resistance taken as measured at no current where the triode law then raises it by more than 1 %
	FlagRdsSaturated                          // informational: the working current saturates the channel at this drive (triode law)
	flagCount
)

var flagText = [...]struct{ code, text string }{
	{"qg-vds?", "gate-charge test voltage (qg_vds) not given: taken as half of vds_max"},
	{"qg-id?", "gate-charge test current (qg_id) not given: taken as id_max/2"},
	{"qgth?", "qg_th not given: charge to the threshold taken as qgs·vgs_th/v_plateau (a constant Cgs)"},
	{"rg?", "internal gate resistance (rg_int) not given: the technology's upper value (Si 3 Ω, SiC 5 Ω, GaN 1 Ω) is taken"},
	{"temp-law", "no hot on-resistance: the technology's default temperature law is used"},
	{"rds-1pt", "one gate-voltage point for the on-resistance: all of it taken as channel below that gate voltage, and no improvement above it"},
	{"rds-extrap", "drive below the lowest gate voltage of the on-resistance data: extrapolated"},
	{"rds-fit", "the two on-resistance points do not fit R0 + k/(Vgs − Vth): a channel-only law is used"},
	{"coss-sqrt", "output charge and energy from one value (a capacitance, a charge or an energy): a power law at both ends of its usual range"},
	{"coss-far", "working voltage outside 0.5-2× the voltage of the output-capacitance data: low confidence"},
	{"tsw-cond?", "test conditions of tr/tf not given: times used as given, not rescaled to your gate loop"},
	{"vpl?", "plateau voltage not given (nor gfs with gfs_id): taken as threshold + 1 V (SiC: + 4 V)"},
	{"gate-lin", "gate-charge curve unknown: linear gate, Qg scaled with the drive and half the energy per edge"},
	{"rth-jc?", "rth_jc not given: the top of the package family's range is taken (docs/library.md)"},
	{"rth?", "no thermal path (rth_ja; or rth_jc with --rth-ca; or a package swrank knows): junction taken at tj_max"},
	{"qrr?", "no qrr for a part with a body diode: recovered charge estimated from its output charge (3× for ≤ 40 V silicon and SiC, 8× above)"},
	{"qrr-coss", "qrr includes the output-capacitance charge: Q_oss at the test's reverse voltage (qrr_vr) is taken out of it"},
	{"vsd?", "vsd (or its current vsd_if) not given: the technology's upper drop is used (Si 1.0 V, SiC 4.5 V, GaN 2.5 V plus I·R)"},
	{"tjmax?", "tj_max not given: 150 °C assumed"},
	{"drv-limit", "the driver's peak-current limit sets the gate current"},
	{"vgsmin?", "vgs_min not given: taken as −vgs_max (0 V for GaN)"},
	{"ipulse?", "no pulsed current rating (id_pulse): peak current not screened"},
	{"qrr", "the partner's reverse-recovery charge is counted"},
	{"l-cs", "common-source inductance (l_cs) slows the current edges: turn-on and turn-off energies raised"},
	{"l-loop", "power-loop inductance counted: turn-off overshoot in the voltage screen; ½·L·I² taken from the turn-on overlap and dissipated at turn-off"},
	{"rds-dyn", "dynamic on-resistance (rds_dyn) applied, linear in the blocked voltage"},
	{"rds-dyn?", "dynamic on-resistance used above rds_dyn_vds (extrapolated linearly) or without rds_dyn_vds (factor as stated)"},
	{"vth-tc", "no hot threshold or diode drop: moved to the junction temperature by the unfavourable ends of the usual coefficients (threshold −40 % from 25 to 125 °C, also −10 % at the other end; diode −0.5 mV/K)"},
	{"qrr-tc", "no qrr_hot: recovered charge raised with temperature by the steep end of common practice (3× from 25 to 125 °C)"},
	{"fto-thin", "false turn-on: the dv/dt gate bounce uses more than half of the gap between the off level and the hot threshold"},
	{"fto?", "no ciss/crss or gate-charge data: false turn-on of the off switch not screened"},
	{"vgs-spike", "the dv/dt at the other switch's turn-off pulls the gate below vgs_min (a transient: check the transient rating)"},
	{"sic-drive", "SiC part driven below 15 V: its on-resistance and switching data are usually given at 15-20 V"},
	{"hyst?", "no eoss_loss: output-capacitance hysteresis under soft switching taken as 20 % of the stored energy at the swing"},
	{"miller-lump", "no crss (with cap_vds): the whole Qgd moved at any voltage up to its test voltage (the √ law at the other end), one lump with a straight voltage ramp, the overshoot at the worse split of the current"},
	{"rth-ja?", "rth_ja not given: the top of the package family's range is taken (docs/library.md)"},
	{"l-cs?", "l_cs not given: the top of the package family's range is taken (leaded values without a known package)"},
	{"l-loop?", "l_loop not given: the top of the package family's range is taken (leaded values without a known package)"},
	{"qgs-qgd?", "qgs or qgd not given: taken as 0.4·qg and 0.35·qg (the top of their usual share, within 90 % of qg together), and as 0.15·qg each at the other end"},
	{"est-low", "a blank value with no unfavourable end (rg_int, the gate-charge curve, l_cs, the Miller charge without crss, a one-point output capacitance) was taken at both ends of its range: the faster end gave the worse result and is shown"},
	{"rds-dyn-est", "GaN part without rds_dyn: a dynamic on-resistance of 1.4× after blocking 80 % of the rating is taken (the top of what GaN datasheets state)"},
	{"qrr-cond?", "qrr_if or qrr_didt not given: the recovery test taken at a quarter of id_max and 100 A/µs (the unfavourable ends of the usual test) when the charge is moved to the working current and di/dt; or qrr_includes_coss without qrr_vr: no output charge taken out"},
	{"td-cond?", "td_on or td_off not used (test conditions tsw_vgs, tsw_id, tsw_rg or tsw_rgen missing, or no RC gate takes that time under them): dead-time gate delays from the gate charge"},
	{"cgd-shape?", "crss at one voltage (no crss2 or crss_curve): Cgd above the plateau taken to fall as (0.7 V + Vdg)^−½ through it, the abrupt junction and the steep end of the usual ⅓ to ½ (more Miller charge in the middle of the edge); below the plateau the oxide value that keeps qgd"},
	{"qrr-tri", "qrr not given: the recovered charge taken as ½·irrm·trr of the same test (a triangular recovery current)"},
	{"rds-id?", "rds_on_id not given: the on-resistance taken as measured at a small current, so the triode law raises it by more than 1 % at this working current (give rds_on_id)"},
	{"rds-sat", "at this drive the working current would saturate the channel (triode law): the on-resistance taken at the edge of saturation, a lower bound"},
}

// Codes lists the short codes of the set flags, e.g. "rg?,coss-sqrt".
func (f Flags) Codes() string {
	var b strings.Builder
	for f != 0 {
		i := bits.TrailingZeros64(uint64(f))
		f &^= 1 << i
		if i >= len(flagText) {
			continue
		}
		if b.Len() > 0 {
			b.WriteByte(',')
		}
		b.WriteString(flagText[i].code)
	}
	return b.String()
}

// Sentences lists the set flags as sentences.
func (f Flags) Sentences() []string {
	var out []string
	for f != 0 {
		i := bits.TrailingZeros64(uint64(f))
		f &^= 1 << i
		if i < len(flagText) {
			out = append(out, flagText[i].text)
		}
	}
	return out
}

// EstimateFlags are the flags that stand for a missing datasheet value
// replaced by an estimate: a result's count of them says how much of its
// ranking rests on estimates (strict ranking sets such parts aside).
// FlagTdNoConditions is not one: a part whose delay times go unused is
// timed from its gate-charge curve, as a part that leaves them blank is,
// and giving them must not count against it.
const EstimateFlags = FlagQgVdsAssumed | FlagQgIdAssumed | FlagQgThAssumed | FlagRgIntAssumed |
	FlagTempDefault | FlagRdsOnePoint | FlagOssSqrtLaw | FlagTswNoConditions | FlagPlateauEstimated |
	FlagGateLinear | FlagRthJCEstimated | FlagRthJAEstimated | FlagNoRth | FlagQrrEstimated |
	FlagVsdDefault | FlagTjMaxDefault | FlagVgsMinDefault | FlagIdPulseMissing | FlagVthTempDefault |
	FlagQrrTempDefault | FlagFalseOnUnchecked | FlagHysteresisEstimated | FlagMillerLumped |
	FlagLcsEstimated | FlagLloopEstimated | FlagGateChargeEstimated | FlagRdsDynEstimated | FlagQrrCondEstimated

// Estimates returns how many of the set flags stand for estimated values.
func (f Flags) Estimates() int { return bits.OnesCount64(uint64(f & EstimateFlags)) }
