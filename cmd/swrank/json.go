package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strings"

	q "swrank/devices/quantity"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// Field names carry their unit: _w, _v, _a, _hz, _ohm, _farad, _coulomb,
// _s, _degc, _k_per_w; efficiencies eff_* are fractions.

type jsonStress struct {
	VBlockV float64 `json:"v_block_v"`
	IOnA    float64 `json:"i_on_a"`
	IOffA   float64 `json:"i_off_a"`
	IRmsA   float64 `json:"i_rms_a"`
	IPeakA  float64 `json:"i_peak_a"`
	Duty    float64 `json:"duty"`
	HardOn  bool    `json:"hard_turn_on"`
	HardOff bool    `json:"hard_turn_off"`
}

type jsonPoint struct {
	Topology           string      `json:"topology"`
	Mode               string      `json:"mode"`
	Rectifier          string      `json:"rectifier,omitempty"`
	Position           string      `json:"position"`
	VinV               float64     `json:"vin_v,omitempty"`
	VoutV              float64     `json:"vout_v,omitempty"`
	IoutA              float64     `json:"iout_a,omitempty"`
	PoutW              float64     `json:"pout_w"`
	FswHz              float64     `json:"fsw_hz"`
	ILA                float64     `json:"inductor_current_a,omitempty"`
	RippleA            float64     `json:"ripple_a"`
	InductanceH        float64     `json:"inductance_h,omitempty"`
	DeadTimeS          *float64    `json:"dead_time_s,omitempty"`
	DiodeVfV           *float64    `json:"diode_vf_v,omitempty"`
	DiodeQrrC          *float64    `json:"diode_qrr_coulomb,omitempty"`
	DiodeCjF           *float64    `json:"diode_cj_farad,omitempty"`
	DiodeLossW         *float64    `json:"diode_loss_w,omitempty"`
	VdriveV            float64     `json:"vdrive_v"`
	VdriveOffV         float64     `json:"vdrive_off_v"`
	RsrcOhm            float64     `json:"rsrc_ohm"`
	RsnkOhm            float64     `json:"rsnk_ohm"`
	IpkSrcA            float64     `json:"ipk_src_a"`
	IpkSnkA            float64     `json:"ipk_snk_a"`
	RgExtOhm           float64     `json:"rg_ext_ohm"`
	IqA                float64     `json:"iq_a"`
	TaDegC             float64     `json:"ta_degc"`
	RthCAKperW         *float64    `json:"rth_ca_k_per_w,omitempty"`
	TjFixedDegC        *float64    `json:"tj_fixed_degc,omitempty"`
	Derate             float64     `json:"derate"`
	RLoadOhm           float64     `json:"rload_ohm,omitempty"`
	QL                 float64     `json:"ql,omitempty"`
	F0Hz               float64     `json:"f0_hz,omitempty"`
	PhaseRad           *float64    `json:"phase_rad,omitempty"`
	ShuntRequiredFarad *float64    `json:"shunt_required_farad,omitempty"`
	Control            jsonStress  `json:"control"`
	Sync               *jsonStress `json:"sync,omitempty"`
	Notes              []string    `json:"notes"`
	Library            string      `json:"library,omitempty"`
	LibraryParts       int         `json:"library_parts,omitempty"`
}

type jsonLosses struct {
	TotalW           float64 `json:"total_w"`
	SwitchW          float64 `json:"switch_w"`
	DriverW          float64 `json:"driver_w"`
	ConductionW      float64 `json:"conduction_w"`
	TurnOnW          float64 `json:"turn_on_w"`
	TurnOffW         float64 `json:"turn_off_w"`
	CossW            float64 `json:"coss_w"`
	DeadtimeW        float64 `json:"deadtime_w"`
	RecoveryW        float64 `json:"recovery_w"`
	GateDriverW      float64 `json:"gate_driver_w"`
	GateRextW        float64 `json:"gate_rext_w"`
	GateRintW        float64 `json:"gate_rint_w"`
	DriverQuiescentW float64 `json:"driver_quiescent_w"`
}

type jsonDevice struct {
	Part string `json:"part"`
	Role string `json:"role"`
	jsonLosses
	TjDegC   *float64 `json:"tj_degc"`
	Thermal  string   `json:"thermal"`
	RdsOhm   float64  `json:"rds_on_ohm"`
	RthKperW float64  `json:"rth_k_per_w"`
	Method   string   `json:"method"`
	Flags    []string `json:"flags"`
}

type jsonResult struct {
	Rank     int    `json:"rank"`
	Part     string `json:"part"`
	Partner  string `json:"partner,omitempty"`
	Position string `json:"position"`
	jsonLosses
	TjDegC   *float64     `json:"tj_degc"`
	EffStage *float64     `json:"eff_stage,omitempty"`
	LossPct  *float64     `json:"loss_pct,omitempty"`
	Method   string       `json:"method"`
	Flags    []string     `json:"flags"`
	Screened bool         `json:"screened"`
	Reasons  []string     `json:"reasons"`
	Devices  []jsonDevice `json:"devices"`
	// Class E and class D stages.
	PeakV              *float64 `json:"peak_v,omitempty"`
	PeakA              *float64 `json:"peak_a,omitempty"`
	ShuntRequiredFarad *float64 `json:"shunt_required_farad,omitempty"`
	ShuntDeviceFarad   *float64 `json:"shunt_device_farad,omitempty"`
	ShuntExternalFarad *float64 `json:"shunt_external_farad,omitempty"`
	FmaxHz             *float64 `json:"fmax_hz,omitempty"`
	ExcessReactanceOhm *float64 `json:"excess_reactance_ohm,omitempty"`
	FallTimeS          *float64 `json:"fall_time_s,omitempty"`
	ZVS                *bool    `json:"zvs,omitempty"`
	ResidualV          *float64 `json:"residual_v,omitempty"`
	EffWithDriver      *float64 `json:"eff_with_driver,omitempty"`
}

type jsonReport struct {
	OperatingPoint jsonPoint    `json:"operating_point"`
	Results        []jsonResult `json:"results"`
}

func ptr(v float64) *float64 { return &v }

func stressJSON(s *stage.SwitchStress) jsonStress {
	return jsonStress{float64(s.V), float64(s.IOn), float64(s.IOff), float64(s.IRms), float64(s.IPeak), float64(s.Duty), s.HardOn, s.HardOff}
}

func pointJSON(pt *stage.Point) jsonPoint {
	s := &pt.Stage
	d := &s.Driver
	j := jsonPoint{
		Topology: s.Topology.String(), Mode: pt.Mode.String(), Position: s.Position.String(),
		PoutW: float64(s.Pout), FswHz: float64(s.Fsw), RippleA: float64(pt.Ripple),
		VdriveV: float64(d.VOn), VdriveOffV: float64(d.VOff), RsrcOhm: float64(d.RSource), RsnkOhm: float64(d.RSink),
		IpkSrcA: float64(d.IPeakSource), IpkSnkA: float64(d.IPeakSink), RgExtOhm: float64(d.RgExt), IqA: float64(d.IQ),
		TaDegC: float64(s.Ambient), Derate: float64(s.Derate), Control: stressJSON(&pt.Ctrl), Notes: pt.Notes,
	}
	if j.Notes == nil {
		j.Notes = []string{}
	}
	if s.Topology == stage.ClassE || s.Topology == stage.ClassD {
		j.VinV, j.RLoadOhm, j.QL = float64(s.Vin), float64(s.RLoad), float64(s.QL)
		if s.Topology == stage.ClassE {
			e := &pt.RF.E
			j.ShuntRequiredFarad = ptr(float64(e.C1))
		} else {
			j.F0Hz = float64(s.F0)
			j.PhaseRad = ptr(float64(pt.RF.D.Phase))
			j.DeadTimeS = ptr(float64(s.DeadTime.V))
		}
	} else if s.Topology != stage.Custom {
		j.Rectifier = s.Rectifier.String()
		j.VinV, j.VoutV, j.IoutA, j.ILA = float64(s.Vin), float64(s.Vout), float64(s.Iout), float64(pt.IL)
		j.InductanceH = float64(s.Inductance)
	}
	if pt.HasSync {
		j.DeadTimeS = ptr(float64(s.DeadTime.V))
		ss := stressJSON(&pt.Sync)
		j.Sync = &ss
	}
	if pt.HasDiode {
		j.DiodeVfV, j.DiodeQrrC, j.DiodeCjF = ptr(float64(s.Diode.Vf)), ptr(float64(s.Diode.Qrr)), ptr(float64(s.Diode.Cj))
		j.DiodeLossW = ptr(float64(pt.DiodeLoss))
	}
	if s.RthCA.OK {
		j.RthCAKperW = ptr(float64(s.RthCA.V))
	}
	if s.TjFixed.OK {
		j.TjFixedDegC = ptr(float64(s.TjFixed.V))
	}
	return j
}

func lossesJSON(l evaluate.Losses) jsonLosses {
	return jsonLosses{
		TotalW: float64(l.Total()), SwitchW: float64(l.Switch()), DriverW: float64(l.Driver()),
		ConductionW: float64(l.Conduction), TurnOnW: float64(l.TurnOn), TurnOffW: float64(l.TurnOff),
		CossW: float64(l.Coss), DeadtimeW: float64(l.DeadTime), RecoveryW: float64(l.Recovery),
		GateDriverW: float64(l.GateDriver), GateRextW: float64(l.GateRext), GateRintW: float64(l.GateRint),
		DriverQuiescentW: float64(l.DriverQuiescent),
	}
}

func flagList(f fit.Flags) []string {
	f &^= fit.FlagQrrInModel
	if f == 0 {
		return []string{}
	}
	return strings.Split(f.Codes(), ",")
}

func resultJSON(i int, x *evaluate.Result, pout q.Power) jsonResult {
	j := jsonResult{
		Rank: i + 1, Part: x.Dev.Part.Name, Position: x.Position.String(), jsonLosses: lossesJSON(x.Losses),
		Method: methods(x), Flags: flagList(x.Flags), Screened: x.Screened(), Reasons: x.Reasons(),
	}
	if j.Reasons == nil {
		j.Reasons = []string{}
	}
	if x.Partner != nil {
		j.Partner = x.Partner.Part.Name
	}
	if t, ok := x.Tj(); ok {
		j.TjDegC = ptr(float64(t))
	}
	if pout > 0 {
		j.EffStage = ptr(float64(pout) / float64(pout+x.Losses.Total()))
		j.LossPct = ptr(100 * float64(x.Losses.Total()) / float64(pout))
	}
	if rf := &x.RF; rf.VPeak > 0 {
		j.PeakV, j.PeakA, j.FallTimeS = ptr(float64(rf.VPeak)), ptr(float64(rf.IPeak)), ptr(float64(rf.Tf))
		j.EffStage, j.EffWithDriver = ptr(float64(rf.EffStage)), ptr(float64(rf.EffWithDriver))
		if rf.CRequired > 0 {
			j.ShuntRequiredFarad, j.ShuntDeviceFarad = ptr(float64(rf.CRequired)), ptr(float64(rf.CDevice))
			j.ShuntExternalFarad, j.FmaxHz = ptr(float64(rf.CExternal)), ptr(float64(rf.FMax))
			j.ExcessReactanceOhm = ptr(float64(rf.XExcess))
		} else {
			z := rf.ZVS
			j.ZVS, j.ResidualV = &z, ptr(float64(rf.VResidual))
		}
	}
	for k := 0; k < x.N; k++ {
		d := &x.Devices[k]
		jd := jsonDevice{Part: d.Dev.Part.Name, Role: d.Role.String(), jsonLosses: lossesJSON(d.Losses),
			Thermal: d.Thermal.Status.String(), RdsOhm: float64(d.Rds), RthKperW: float64(d.Rth),
			Method: d.Method.String(), Flags: flagList(d.Flags)}
		if d.Thermal.Found {
			jd.TjDegC = ptr(float64(d.Thermal.Tj))
		}
		j.Devices = append(j.Devices, jd)
	}
	return j
}

func renderJSON(w io.Writer, r report) error {
	out := jsonReport{OperatingPoint: pointJSON(r.pt), Results: []jsonResult{}}
	out.OperatingPoint.Library, out.OperatingPoint.LibraryParts = r.source, r.parts
	for i, x := range r.shown() {
		out.Results = append(out.Results, resultJSON(i, &x, r.pt.Stage.Pout))
	}
	return writeJSON(w, out)
}

func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// jsonStep is one step of an explanation.
type jsonStep struct {
	Device  string           `json:"device,omitempty"`
	Topic   string           `json:"topic"`
	Formula string           `json:"formula"`
	Terms   []map[string]any `json:"terms"`
}

type jsonExplain struct {
	OperatingPoint jsonPoint  `json:"operating_point"`
	Result         jsonResult `json:"result"`
	Steps          []jsonStep `json:"steps"`
	Flags          []string   `json:"flag_notes"`
}

func renderExplain(w io.Writer, format string, pt *stage.Point, r *evaluate.Result, tr *evaluate.Trace) error {
	if format == "json" {
		out := jsonExplain{OperatingPoint: pointJSON(pt), Result: resultJSON(0, r, pt.Stage.Pout), Flags: r.Flags.Sentences()}
		for _, s := range tr.Steps {
			js := jsonStep{Device: s.Device, Topic: s.Topic, Formula: s.Formula}
			for _, t := range s.Terms {
				v := any(t.Value)
				if math.IsNaN(t.Value) || math.IsInf(t.Value, 0) {
					v = nil
				}
				js.Terms = append(js.Terms, map[string]any{"name": t.Name, "value": v, "unit": t.Kind.Symbol})
			}
			out.Steps = append(out.Steps, js)
		}
		return writeJSON(w, out)
	}
	describePoint(w, pt, "", 0)
	name := r.Dev.Part.Name
	if r.Partner != nil {
		name += " with " + r.Partner.Part.Name
	}
	fmt.Fprintf(w, "\n%s — %s\n", name, placeWord(pt))
	for k := 0; k < r.N; k++ {
		d := &r.Devices[k]
		fmt.Fprintf(w, "  %s switch %s: method %s\n", d.Role, d.Dev.Part.Name, methodWhy(d))
	}
	last := ""
	for _, s := range tr.Steps {
		head := s.Device
		if head == "" {
			head = "stage"
		}
		if head != last {
			fmt.Fprintf(w, "\n[%s]\n", head)
			last = head
		}
		fmt.Fprintf(w, "  %s: %s\n", s.Topic, s.Formula)
		for _, t := range s.Terms {
			fmt.Fprintf(w, "      %-22s %s\n", t.Name, q.FormatFloat(t.Value, 4, t.Kind))
		}
	}
	fmt.Fprintln(w)
	for k := 0; k < r.N; k++ {
		d := &r.Devices[k]
		l := d.Losses
		tj := "none (" + d.Thermal.Status.String() + ")"
		if d.Thermal.Found {
			tj = q.Format(d.Thermal.Tj, 4) + " (" + d.Thermal.Status.String() + ")"
		}
		fmt.Fprintf(w, "%s %s: switch %s, driver %s, total %s, Tj %s\n", d.Role, d.Dev.Part.Name,
			q.Format(l.Switch(), 4), q.Format(l.Driver(), 4), q.Format(l.Total(), 4), tj)
	}
	fmt.Fprintf(w, "stage total: %s", q.Format(r.Losses.Total(), 4))
	if pt.Stage.Pout > 0 {
		fmt.Fprintf(w, " (%.2f %% of %s)", 100*float64(r.Losses.Total())/float64(pt.Stage.Pout), pt.Stage.Pout)
	}
	fmt.Fprintln(w)
	if fl := r.Flags.Sentences(); len(fl) > 0 {
		fmt.Fprintln(w, "\nassumptions:")
		for _, s := range fl {
			fmt.Fprintf(w, "  - %s\n", s)
		}
	}
	if rs := r.Reasons(); len(rs) > 0 {
		fmt.Fprintln(w, "\nset aside:")
		for _, s := range rs {
			fmt.Fprintf(w, "  - %s\n", s)
		}
	}
	return nil
}

func methodWhy(d *evaluate.DeviceResult) string {
	if !(d.Stress.HardOn || d.Stress.HardOff) {
		return "none needed (soft-switched: no overlap loss)"
	}
	if d.Method == fit.MethodGateCharge {
		return "gate-charge (qgs, qgd and v_plateau are given)"
	}
	return "tr/tf (the library lacks qgs, qgd or v_plateau)"
}
