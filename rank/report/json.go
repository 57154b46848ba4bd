package report

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strings"

	q "swrank/devices/quantity"
	"swrank/rank"
	"swrank/rank/decide"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// The json format of rank and explain. Field names carry their unit: _w,
// _v, _a, _hz, _ohm, _farad, _coulomb, _s, _degc, _k_per_w; efficiencies
// eff_* are fractions.

// JSONStress is what one place of the stage asks of its switch
// (stage.SwitchStress).
type JSONStress struct {
	VBlockV float64 `json:"v_block_v"`
	IOnA    float64 `json:"i_on_a"`
	IOffA   float64 `json:"i_off_a"`
	IRmsA   float64 `json:"i_rms_a"`
	IPeakA  float64 `json:"i_peak_a"`
	Duty    float64 `json:"duty"`
	HardOn  bool    `json:"hard_turn_on"`
	HardOff bool    `json:"hard_turn_off"`
}

// JSONPoint is the operating point as understood: the stage with its
// defaults filled, the driver, the thermal path and the switch stresses.
type JSONPoint struct {
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
	Control            JSONStress  `json:"control"`
	Sync               *JSONStress `json:"sync,omitempty"`
	Notes              []string    `json:"notes"`
	Library            string      `json:"library,omitempty"`
	LibraryParts       int         `json:"library_parts,omitempty"`
}

// JSONLosses are the loss components, W (evaluate.Losses); total_w is
// switch_w + driver_w.
type JSONLosses struct {
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

// JSONDevice is one device of a result: its place (role), losses,
// junction temperature and the values it was evaluated with.
type JSONDevice struct {
	Part string `json:"part"`
	Role string `json:"role"`
	JSONLosses
	TjDegC   *float64 `json:"tj_degc"`
	Thermal  string   `json:"thermal"`
	RdsOhm   float64  `json:"rds_on_ohm"`
	RthKperW float64  `json:"rth_k_per_w"`
	Method   string   `json:"method"`
	Flags    []string `json:"flags"`
}

// JSONResult is one part (with its partner) at the operating point, in
// rank order.
type JSONResult struct {
	Rank     int    `json:"rank"`
	Part     string `json:"part"`
	Partner  string `json:"partner,omitempty"`
	Position string `json:"position"`
	JSONLosses
	TjDegC   *float64 `json:"tj_degc"`
	EffStage *float64 `json:"eff_stage,omitempty"`
	LossPct  *float64 `json:"loss_pct,omitempty"`
	Method   string   `json:"method"`
	Flags    []string `json:"flags"`
	// Estimated counts the values this result rests on that the library
	// left blank and swrank estimated (the flags of fit.EstimateFlags).
	Estimated int          `json:"estimated_values"`
	Screened  bool         `json:"screened"`
	Reasons   []string     `json:"reasons"`
	Devices   []JSONDevice `json:"devices"`
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

// JSONReport is the JSON document of a plain ranking.
type JSONReport struct {
	OperatingPoint JSONPoint      `json:"operating_point"`
	Results        []JSONResult   `json:"results"`
	SetAside       []JSONSetAside `json:"set_aside,omitempty"`
}

// JSONSetAside is a part not evaluated, with the reason.
type JSONSetAside struct {
	Part   string `json:"part"`
	Line   int    `json:"line,omitempty"`
	Reason string `json:"reason"`
}

func setAsideJSON(as []rank.SetAside) []JSONSetAside {
	var out []JSONSetAside
	for _, a := range as {
		out = append(out, JSONSetAside{Part: a.Part, Line: a.Line, Reason: a.Reason})
	}
	return out
}

func ptr(v float64) *float64 { return &v }

func stressJSON(s *stage.SwitchStress) JSONStress {
	return JSONStress{float64(s.V), float64(s.IOn), float64(s.IOff), float64(s.IRms), float64(s.IPeak), float64(s.Duty), s.HardOn, s.HardOff}
}

func pointJSON(pt *stage.Point) JSONPoint {
	s := &pt.Stage
	d := &s.Driver
	j := JSONPoint{
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

func lossesJSON(l evaluate.Losses) JSONLosses {
	return JSONLosses{
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

func resultJSON(i int, x *evaluate.Result, pout q.Power) JSONResult {
	j := JSONResult{
		Rank: i + 1, Part: x.Dev.Part.Name, Position: x.Position.String(), JSONLosses: lossesJSON(x.Losses),
		Method: methods(x), Flags: flagList(x.Flags), Estimated: x.Flags.Estimates(), Screened: x.Screened(), Reasons: x.Reasons(),
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
		jd := JSONDevice{Part: d.Dev.Part.Name, Role: d.Role.String(), JSONLosses: lossesJSON(d.Losses),
			Thermal: d.Thermal.Status.String(), RdsOhm: float64(d.Rds), RthKperW: float64(d.Rth),
			Method: d.Method.String(), Flags: flagList(d.Flags)}
		if d.Thermal.Found {
			jd.TjDegC = ptr(float64(d.Thermal.Tj))
		}
		j.Devices = append(j.Devices, jd)
	}
	return j
}

func (r *Ranking) json(w io.Writer) error {
	out := JSONReport{OperatingPoint: pointJSON(r.Point), Results: []JSONResult{}}
	out.OperatingPoint.Library, out.OperatingPoint.LibraryParts = r.Source, r.Parts
	for i, x := range r.Shown() {
		out.Results = append(out.Results, resultJSON(i, &x, r.Point.Stage.Pout))
	}
	out.SetAside = setAsideJSON(r.SetAside)
	return writeJSON(w, out)
}

func writeJSON(w io.Writer, v any) error {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetIndent("", "  ")
	if err := enc.Encode(v); err != nil {
		return err
	}
	_, err := w.Write(guardJSON(b.Bytes()))
	return err
}

// JSONStep is one step of an explanation.
type JSONStep struct {
	Device  string           `json:"device,omitempty"`
	Topic   string           `json:"topic"`
	Formula string           `json:"formula"`
	Terms   []map[string]any `json:"terms"`
}

// JSONExplain is the JSON document of explain: the operating point, the
// result, every step of its calculation and the notes of its flags.
type JSONExplain struct {
	OperatingPoint JSONPoint  `json:"operating_point"`
	Result         JSONResult `json:"result"`
	Steps          []JSONStep `json:"steps"`
	Flags          []string   `json:"flag_notes"`
}

// explainJSON writes the calculation as a JSONExplain document.
func explainJSON(w io.Writer, pt *stage.Point, r *evaluate.Result, tr *evaluate.Trace) error {
	out := JSONExplain{OperatingPoint: pointJSON(pt), Result: resultJSON(0, r, pt.Stage.Pout), Flags: r.Flags.Sentences()}
	for _, s := range tr.Steps {
		js := JSONStep{Device: s.Device, Topic: s.Topic, Formula: s.Formula}
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

// jsonWithLeaders writes the ranking's JSON document with three more
// members: worst_case, worst_case_spread and price_front.
func (r *Ranking) jsonWithLeaders(w io.Writer, cs []decide.Candidate, note string, spread *decide.Spread, front []int) error {
	var buf bytes.Buffer
	if err := r.json(&buf); err != nil {
		return err
	}
	var doc map[string]json.RawMessage
	if err := json.Unmarshal(buf.Bytes(), &doc); err != nil {
		return fmt.Errorf("decorating the JSON output: %w", err)
	}
	type worstRow struct {
		Part        string   `json:"part"`
		TotalW      float64  `json:"total_w"`
		WorstTotalW *float64 `json:"worst_total_w"`
		// NotEvaluated is why the worst case could not be evaluated.
		NotEvaluated string `json:"not_evaluated,omitempty"`
	}
	var wr []worstRow
	for _, c := range cs {
		if c.Worst != nil || c.NoMax || c.WorstReason != "" {
			row := worstRow{Part: c.Name(), TotalW: c.Chosen.Key(), NotEvaluated: c.WorstReason}
			if c.Worst != nil {
				row.WorstTotalW = ptr(c.Worst.Key())
			}
			wr = append(wr, row)
		}
	}
	add := func(k string, v any) error {
		b, err := json.Marshal(v)
		if err == nil {
			doc[k] = b
		}
		return err
	}
	if len(wr) > 0 {
		if err := add("worst_case", wr); err != nil {
			return err
		}
	}
	if spread != nil {
		if err := add("worst_case_spread", jsonSpread{Leader: cs[0].Name(), Runner: cs[1].Name(), Lead: float64(spread.Lead),
			Width: float64(spread.Width), Unit: "W", Clear: spread.Clear, Note: note}); err != nil {
			return err
		}
	}
	if len(front) > 0 {
		var jf []jsonFront
		for _, i := range front {
			jf = append(jf, jsonFront{Part: cs[i].Name(), Price: cs[i].Dev.Part.Price.V, Loss: cs[i].Chosen.Key(), Unit: "W"})
		}
		if err := add("price_front", jf); err != nil {
			return err
		}
	}
	return writeJSON(w, doc)
}

// jsonPointMode is an operating point with its conduction mode.
type jsonPointMode struct {
	JSONPoint
	Mode string `json:"mode"`
}

func withMode(p JSONPoint, m stage.Mode) jsonPointMode { return jsonPointMode{p, m.String()} }

type jsonSpread struct {
	Leader string  `json:"leader"`
	Runner string  `json:"runner_up"`
	Lead   float64 `json:"lead"`
	Width  float64 `json:"leader_spread"`
	Unit   string  `json:"unit"`
	Clear  bool    `json:"clear"`
	Note   string  `json:"note"`
}

type jsonFront struct {
	Part  string  `json:"part"`
	Price float64 `json:"price"`
	Loss  float64 `json:"loss"`
	Unit  string  `json:"unit"`
}
