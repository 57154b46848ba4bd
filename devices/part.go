// Package devices reads and validates a parts library: a CSV file with one
// row per transistor and one column per datasheet value.
//
// The struct tags of Part are the one place where column names are defined.
// Values accept SI prefixes and optional units ("280m", "280 mOhm", "71 pF");
// a unit that does not fit the column is an error. Optional columns may be
// left blank; the loss models then fall back to a named default and say so.
package devices

import (
	"fmt"
	"strconv"
	"strings"

	q "swrank/devices/quantity"
)

// Technology is the semiconductor family of a part. It changes the models'
// defaults (temperature law of the on-resistance, reverse conduction).
type Technology uint8

// Technologies.
const (
	Silicon Technology = iota // "si": silicon MOSFET (the default when blank)
	GaN                       // "gan": gallium-nitride HEMT
	SiC                       // "sic": silicon-carbide MOSFET
)

func (t Technology) String() string {
	switch t {
	case GaN:
		return "gan"
	case SiC:
		return "sic"
	}
	return "si"
}

// UnmarshalCSV accepts si, gan or sic in any case; blank means si.
func (t *Technology) UnmarshalCSV(s string) error {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "si", "silicon":
		*t = Silicon
	case "gan":
		*t = GaN
	case "sic":
		*t = SiC
	default:
		return fmt.Errorf("%q: technology must be si, gan or sic", s)
	}
	return nil
}

// MarshalCSV prints the technology's column spelling.
func (t Technology) MarshalCSV() (string, error) { return t.String(), nil }

// Flag is a yes/no column. Blank means no.
type Flag bool

// UnmarshalCSV accepts yes/no, true/false, y/n, 1/0 in any case.
func (f *Flag) UnmarshalCSV(s string) error {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "no", "n", "false", "0":
		*f = false
	case "yes", "y", "true", "1":
		*f = true
	default:
		return fmt.Errorf("%q: expected yes or no", s)
	}
	return nil
}

// MarshalCSV prints yes or no.
func (f Flag) MarshalCSV() (string, error) {
	if f {
		return "yes", nil
	}
	return "no", nil
}

// Price is a unit price in the user's own currency; blank means not given.
type Price struct {
	V  float64
	OK bool
}

// UnmarshalCSV parses a non-negative plain number, optionally after a
// currency sign ("$1.20", "€0.85").
func (p *Price) UnmarshalCSV(s string) error { return p.parse(s, false) }

// parse is UnmarshalCSV, with a decimal comma accepted when comma is set
// ("€0,85").
func (p *Price) parse(s string, comma bool) error {
	s = strings.TrimSpace(s)
	if s == "" {
		*p = Price{}
		return nil
	}
	s = strings.TrimLeft(s, "$€£¥ ")
	num := s
	if comma && strings.Count(s, ",")+strings.Count(s, ".") == 1 {
		num = strings.Replace(s, ",", ".", 1)
	}
	v, err := strconv.ParseFloat(num, 64)
	if err != nil || v < 0 || v != v || v > 1e15 {
		return fmt.Errorf("%q: price must be a non-negative number", s)
	}
	*p = Price{V: v, OK: true}
	return nil
}

// MarshalCSV prints the plain number, or blank.
func (p Price) MarshalCSV() (string, error) {
	if !p.OK {
		return "", nil
	}
	return strconv.FormatFloat(p.V, 'g', -1, 64), nil
}

// Part is one row of a parts library: the datasheet values of one transistor.
// Each field names its column, unit and test conditions. Typical values unless
// the name says max. Required columns have plain types; optional ones are
// q.Opt and may be blank.
type Part struct {
	// Identity.
	Name       string     `csv:"part"`       // unique name, required
	Package    string     `csv:"package"`    // package name, optional
	Technology Technology `csv:"technology"` // si, gan or sic; blank = si
	Notes      string     `csv:"notes"`      // free text
	Price      Price      `csv:"price"`      // unit price, user's currency

	// Ratings.
	VdsMax  q.Voltage                  `csv:"vds_max"`  // drain-source voltage rating, V
	IdMax   q.Current                  `csv:"id_max"`   // continuous drain current at 25 °C case, A
	IdPulse q.Opt[q.Current]           `csv:"id_pulse"` // pulsed drain current rating, A
	VgsMax  q.Voltage                  `csv:"vgs_max"`  // highest gate-source voltage, V
	VgsMin  q.Opt[q.Voltage]           `csv:"vgs_min"`  // lowest (most negative) gate-source voltage, V; blank = −vgs_max (si, sic) or 0 V flagged (gan)
	TjMax   q.Opt[q.Temperature]       `csv:"tj_max"`   // highest junction temperature, °C; blank = 150 °C
	RthJA   q.Opt[q.ThermalResistance] `csv:"rth_ja"`   // junction to ambient, K/W
	RthJC   q.Opt[q.ThermalResistance] `csv:"rth_jc"`   // junction to case, K/W

	// Threshold.
	VgsTh      q.Voltage            `csv:"vgs_th"`        // gate threshold voltage at 25 °C, V
	VgsThMax   q.Opt[q.Voltage]     `csv:"vgs_th_max"`    // maximum gate threshold voltage, V
	VgsThHot   q.Opt[q.Voltage]     `csv:"vgs_th_hot"`    // typical threshold hot, V
	VgsThHotTj q.Opt[q.Temperature] `csv:"vgs_th_hot_tj"` // junction temperature of vgs_th_hot, °C
	// VgsThId is the drain current at which vgs_th is measured (250 µA or
	// 1 mA are usual), A; with it the square-law channel's extrapolated
	// threshold, √(I/K) below vgs_th, sets the plateau's law.
	VgsThId q.Opt[q.Current] `csv:"vgs_th_id"`

	// On-resistance. rds_on at rds_on_vgs and rds_on_tj is required; a
	// second gate voltage and a hot value refine the model.
	RdsOn     q.Resistance         `csv:"rds_on"`        // on-resistance, Ω
	RdsOnVgs  q.Voltage            `csv:"rds_on_vgs"`    // gate voltage of rds_on, V
	RdsOnTj   q.Opt[q.Temperature] `csv:"rds_on_tj"`     // junction temperature of rds_on, °C; blank = 25 °C
	RdsOnMax  q.Opt[q.Resistance]  `csv:"rds_on_max"`    // maximum of rds_on at the same conditions, Ω
	RdsOn2    q.Opt[q.Resistance]  `csv:"rds_on2"`       // on-resistance at a second gate voltage, Ω
	RdsOn2Vgs q.Opt[q.Voltage]     `csv:"rds_on2_vgs"`   // gate voltage of rds_on2, V
	RdsHot    q.Opt[q.Resistance]  `csv:"rds_on_hot"`    // on-resistance hot, at rds_on_vgs, Ω
	RdsHotTj  q.Opt[q.Temperature] `csv:"rds_on_hot_tj"` // junction temperature of rds_on_hot, °C
	RdsCurve  string               `csv:"rds_on_curve"`  // normalised on-resistance against temperature, "25:1 100:1.4 150:1.75"
	RdsDyn    q.Opt[q.Ratio]       `csv:"rds_dyn"`       // dynamic on-resistance factor (GaN), ≥ 1
	RdsDynVds q.Opt[q.Voltage]     `csv:"rds_dyn_vds"`   // off-state voltage at which rds_dyn was measured, V
	// RdsOnId is the drain current of the rds_on (and rds_on2) test, A;
	// with it the channel part is moved to the working current by the
	// triode law (blank: the values taken as measured at no current).
	RdsOnId q.Opt[q.Current] `csv:"rds_on_id"`

	// Gate charge, from the gate-charge curve at qg_vds and qg_id.
	Qg       q.Charge         `csv:"qg"`        // total gate charge at qg_vgs, C
	QgVgs    q.Voltage        `csv:"qg_vgs"`    // gate voltage of qg, V
	Qg2      q.Opt[q.Charge]  `csv:"qg2"`       // total gate charge at a second gate voltage qg2_vgs (same test), C
	Qg2Vgs   q.Opt[q.Voltage] `csv:"qg2_vgs"`   // gate voltage of qg2, V; not qg_vgs
	QgVds    q.Opt[q.Voltage] `csv:"qg_vds"`    // drain voltage of the gate-charge test, V; blank = 0.5·vds_max flagged
	QgId     q.Opt[q.Current] `csv:"qg_id"`     // drain current of the gate-charge test (and of the plateau), A; blank = id_max flagged
	QgMax    q.Opt[q.Charge]  `csv:"qg_max"`    // maximum total gate charge, C
	Qgs      q.Opt[q.Charge]  `csv:"qgs"`       // gate-source charge (to the plateau), C
	Qgd      q.Opt[q.Charge]  `csv:"qgd"`       // gate-drain (Miller) charge, C
	QgTh     q.Opt[q.Charge]  `csv:"qg_th"`     // gate charge at threshold, C; blank = qgs/2 flagged
	VPlateau q.Opt[q.Voltage] `csv:"v_plateau"` // Miller plateau voltage at qg_id, V
	// Gfs is the forward transconductance at the drain current GfsId
	// (the datasheet's transfer test, in saturation), S; it sets the
	// plateau when v_plateau is blank.
	Gfs   q.Opt[q.Conductance] `csv:"gfs"`
	GfsId q.Opt[q.Current]     `csv:"gfs_id"` // drain current of the gfs test, A
	RgInt q.Opt[q.Resistance]  `csv:"rg_int"` // internal gate resistance, Ω; blank = 0 flagged

	// Capacitances, small-signal at cap_vds.
	Ciss   q.Opt[q.Capacitance] `csv:"ciss"`    // input capacitance, F
	Coss   q.Opt[q.Capacitance] `csv:"coss"`    // output capacitance, F
	Crss   q.Opt[q.Capacitance] `csv:"crss"`    // reverse transfer capacitance, F
	CapVds q.Opt[q.Voltage]     `csv:"cap_vds"` // drain voltage of ciss/coss/crss, V

	// The capacitances at a second drain voltage, read off the
	// datasheet's C–V curve (docs/models.md, "Miller law").
	Coss2   q.Opt[q.Capacitance] `csv:"coss2"`    // output capacitance at cap2_vds, F
	Crss2   q.Opt[q.Capacitance] `csv:"crss2"`    // reverse transfer capacitance at cap2_vds, F
	Cap2Vds q.Opt[q.Voltage]     `csv:"cap2_vds"` // drain voltage of coss2/crss2, V; not cap_vds
	// Whole curves, "V:C" points (ParseCVCurve).
	CossCurve string `csv:"coss_curve"` // output capacitance against drain voltage, "1:2.4n 10:770p 40:390p"
	CrssCurve string `csv:"crss_curve"` // reverse transfer capacitance against drain voltage, "1:490p 10:195p 40:100p"

	// Output charge and energy, integrated from 0 V to oss_vds.
	Qoss   q.Opt[q.Charge]  `csv:"qoss"`    // output charge, C
	Eoss   q.Opt[q.Energy]  `csv:"eoss"`    // energy stored in the output capacitance, J
	OssVds q.Opt[q.Voltage] `csv:"oss_vds"` // drain voltage of qoss/eoss, V

	// Output-capacitance loss per cycle under soft switching (hysteresis).
	EossLoss    q.Opt[q.Energy]  `csv:"eoss_loss"`     // energy lost per charge-discharge cycle, J
	EossLossVds q.Opt[q.Voltage] `csv:"eoss_loss_vds"` // voltage swing of eoss_loss, V

	// Switching times (10-90 %) and delay times under the stated test
	// (IEC 60747-8 definitions; the resistive-load switching-time test).
	// td_on and td_off are used only with tsw_vgs, tsw_id and tsw_rg or
	// tsw_rgen given (a blank one of the two taken as 0 Ω); without them
	// they are accepted but not used (flag td-cond?).
	Tr      q.Opt[q.Time]       `csv:"tr"`       // rise time, s
	Tf      q.Opt[q.Time]       `csv:"tf"`       // fall time, s
	TdOn    q.Opt[q.Time]       `csv:"td_on"`    // turn-on delay time, 10 % of the gate pulse to 10 % of the drain voltage's fall, s
	TdOff   q.Opt[q.Time]       `csv:"td_off"`   // turn-off delay time, 90 % of the gate pulse's fall to 10 % of the drain voltage's rise, s
	TswVdd  q.Opt[q.Voltage]    `csv:"tsw_vdd"`  // supply voltage of the tr/tf/td test, V
	TswId   q.Opt[q.Current]    `csv:"tsw_id"`   // drain current of the tr/tf/td test, A
	TswVgs  q.Opt[q.Voltage]    `csv:"tsw_vgs"`  // gate drive of the tr/tf/td test, from 0 V, V
	TswRg   q.Opt[q.Resistance] `csv:"tsw_rg"`   // external gate resistance of the test, Ω
	TswRgen q.Opt[q.Resistance] `csv:"tsw_rgen"` // generator resistance of the test, Ω

	// Body diode (or reverse conduction).
	Vsd        q.Opt[q.Voltage]     `csv:"vsd"`               // diode forward voltage, V
	VsdIf      q.Opt[q.Current]     `csv:"vsd_if"`            // current of vsd, A
	VsdHot     q.Opt[q.Voltage]     `csv:"vsd_hot"`           // diode forward voltage hot, at vsd_if, V
	VsdHotTj   q.Opt[q.Temperature] `csv:"vsd_hot_tj"`        // junction temperature of vsd_hot, °C
	Qrr        q.Opt[q.Charge]      `csv:"qrr"`               // reverse-recovery charge, C
	QrrIf      q.Opt[q.Current]     `csv:"qrr_if"`            // forward current of the qrr test, A
	QrrDidt    q.Opt[q.Slew]        `csv:"qrr_didt"`          // di/dt of the qrr test, A/s ("100 A/µs")
	QrrVr      q.Opt[q.Voltage]     `csv:"qrr_vr"`            // reverse voltage of the qrr test, V (with qrr_includes_coss: the output charge the figure holds)
	QrrTj      q.Opt[q.Temperature] `csv:"qrr_tj"`            // junction temperature of the qrr test, °C
	QrrHot     q.Opt[q.Charge]      `csv:"qrr_hot"`           // recovery charge hot, C
	QrrHotTj   q.Opt[q.Temperature] `csv:"qrr_hot_tj"`        // junction temperature of qrr_hot, °C
	QrrHasCoss Flag                 `csv:"qrr_includes_coss"` // yes when the qrr figure includes the output-capacitance charge
	Trr        q.Opt[q.Time]        `csv:"trr"`               // reverse-recovery time of the qrr test, s
	Irrm       q.Opt[q.Current]     `csv:"irrm"`              // peak reverse-recovery current of the qrr test, A

	// Package parasitics.
	Lcs   q.Opt[q.Inductance] `csv:"l_cs"`   // common-source inductance, H
	Lloop q.Opt[q.Inductance] `csv:"l_loop"` // package share of the power-loop inductance, H

	// Simulation model, read by swrank verify (and written by swrank
	// characterise); blank: the part is not simulated.
	SpiceModel  string `csv:"spice_model"`  // ngspice model file holding a .model NAME VDMOS(...) card or a .subckt, path relative to the library file
	SpiceSubckt string `csv:"spice_subckt"` // name of the subcircuit in spice_model; blank = the file's one VDMOS .model card
	SpicePins   string `csv:"spice_pins"`   // the subcircuit's pins in order, each d, g, s or k (Kelvin source), e.g. "d g s"; required with spice_subckt

	// Line is the file line the row came from (0 for parts built in code).
	Line int `csv:"-"`
}
