package report

import (
	"fmt"
	"strings"
)

// Kind is how a field's cells hold their value.
type Kind uint8

// Kinds of field.
const (
	KindNumber Kind = iota // a number in the field's unit
	KindText               // a text
	KindBool               // yes or no
	KindList               // a list of texts
)

// Field is one field name of swrank's output, the same in every format:
// the CSV header, the JSON member and the --columns name.
type Field struct {
	Key  string // the name, with its unit as a suffix (total_w, tj_c); a trailing * stands for any text
	Head string // the table's short heading
	Unit string // the unit symbol ("" for none: counts, texts, fractions)
	Kind Kind
	// Group is the loss group a loss share belongs to in the wide table
	// and explain ("" for none): GroupOn, GroupEdges or GroupGate.
	Group string
	Doc   string // one line: what it is
}

// The loss groups of the wide table and explain. They gather the loss
// shares by what makes them: current through the closed switch, each
// switching edge, and charging the gate.
const (
	GroupOn    = "while closed"
	GroupEdges = "at each edge"
	GroupGate  = "gate charging"
)

// fields is the one list of field names. Keep docs/output.md in step
// (TestOutputDocListsEveryField).
var fields = []Field{
	// Who and where.
	{"rank", "#", "", KindNumber, "", "place in the ranking, 1 the least loss (blank for a part set aside)"},
	{"part", "part", "", KindText, "", "the part's name as in the library"},
	{"partner", "partner", "", KindText, "", "the part filling the other place of a synchronous stage, when it is not the ranked part"},
	{"position", "place", "", KindText, "", "the place ranked: control, sync or pair"},
	{"n", "N", "", KindNumber, "", "devices in parallel in each place"},
	{"status", "mark", "", KindText, "", "ok: passes on datasheet values; est: passes, resting on estimated values; out: set aside; fit: the part already fitted (compare)"},
	{"estimated", "est", "", KindNumber, "", "values the result rests on that the library left blank and swrank estimated"},
	{"notes", "notes", "", KindText, "", "table only: the numbers of the notes under the table that apply to the row"},
	// Loss shares.
	{"total_w", "total", "W", KindNumber, "", "total loss of the stage's switches and their drivers"},
	{"switch_w", "in switch", "W", KindNumber, "", "the part of the total that heats the transistors"},
	{"driver_w", "in driver", "W", KindNumber, "", "the part of the total that heats the drivers and external gate resistors"},
	{"closed_w", GroupOn, "W", KindNumber, GroupOn, "group: conduction loss while the switch is closed (conduction_w)"},
	{"edges_w", GroupEdges, "W", KindNumber, GroupEdges, "group: the loss of the switching edges (turn_on_w + turn_off_w + coss_w + recovery_w + dead_time_w)"},
	{"gate_w", GroupGate, "W", KindNumber, GroupGate, "group: the loss of charging the gate (gate_internal_w + gate_driver_w + gate_resistor_w + driver_supply_w)"},
	{"conduction_w", "conduction", "W", KindNumber, GroupOn, "I_rms² · on-resistance at the junction temperature"},
	{"turn_on_w", "turn-on", "W", KindNumber, GroupEdges, "voltage-current overlap at hard turn-on"},
	{"turn_off_w", "turn-off", "W", KindNumber, GroupEdges, "voltage-current overlap at hard turn-off"},
	{"coss_w", "Coss", "W", KindNumber, GroupEdges, "output-capacitance charge dumped at hard turn-on (and its hysteresis)"},
	{"recovery_w", "recovery", "W", KindNumber, GroupEdges, "the other place's reverse recovery, dissipated in this switch"},
	{"dead_time_w", "dead time", "W", KindNumber, GroupEdges, "reverse conduction during the dead times"},
	{"gate_internal_w", "gate in part", "W", KindNumber, GroupGate, "gate charging energy spent in the transistor's own gate resistance"},
	{"gate_driver_w", "gate driver", "W", KindNumber, GroupGate, "gate charging energy spent in the driver's output"},
	{"gate_resistor_w", "gate resistor", "W", KindNumber, GroupGate, "gate charging energy spent in the external gate resistor"},
	{"driver_supply_w", "driver supply", "W", KindNumber, GroupGate, "driver supply voltage × its quiescent current"},
	// Temperatures and efficiencies.
	{"tj_c", "Tj °C", "°C", KindNumber, "", "the hottest junction temperature the part settles at (a result, not the limit; blank: none, e.g. thermal runaway)"},
	{"tj_estimated", "Tj est", "", KindBool, "", "the thermal path behind tj_c is estimated (table: Tj printed with ~)"},
	{"tj_limit_c", "Tj limit °C", "°C", KindNumber, "", "the part's maximum junction temperature (tj_max), a limit"},
	{"eff_pct", "eff %", "%", KindNumber, "", "stage efficiency counting these losses only: pout / (pout + total_w)"},
	{"loss_pct", "loss % out", "%", KindNumber, "", "total_w as a share of the output power"},
	{"thermal", "thermal", "", KindText, "", "how the junction temperature was found (converged, pinned, runaway, …)"},
	{"rds_on_ohm", "Rds", "Ω", KindNumber, "", "on-resistance used, at the drive and the junction temperature"},
	{"rth_k_per_w", "Rth", "K/W", KindNumber, "", "junction-to-ambient thermal resistance used"},
	{"point", "point", "", KindText, "", "load profile: the point's name"},
	{"weight", "weight", "", KindNumber, "", "load profile: the point's weight, the weights scaled to sum to 1"},
	{"load_pct", "load %", "%", KindNumber, "", "load profile: the point's load, % of the rated load"},
	{"pout_w", "Pout", "W", KindNumber, "", "output power at the point"},
	{"method", "method", "", KindText, "", "how the hard edges were computed: gate-charge or tr/tf"},
	{"flags", "flags", "", KindList, "", "codes of the approximations and fallbacks used (numbered notes in the table)"},
	{"reasons", "reasons", "", KindList, "", "why a part is set aside, one sentence each"},
	{"set_aside", "set aside", "", KindBool, "", "a screen sets the part aside"},
	{"line", "line", "", KindNumber, "", "the part's line in its library file (a part that could not be evaluated)"},
	{"not_evaluated", "not evaluated", "", KindText, "", "why the part, or the paralleled copy asked for, could not be evaluated: it is set aside and costs only itself"},
	{"unprepared_counts", "unprepared", "", KindList, "", "paralleling: each count whose paralleled copy could not be prepared, with the reason (left out of tried)"},
	// Decisions.
	{"worst_total_w", "worst case", "W", KindNumber, "", "total_w with the maximum datasheet values (rds_on_max, qg_max, vgs_th_max) in place of the typical ones"},
	{"worst_not_evaluated", "worst case not evaluated", "", KindText, "", "why a leading part's worst case could not be evaluated (its worst-case copy cannot be prepared); the part keeps its place"},
	{"price", "price", "", KindNumber, "", "unit price from the library (its own currency), × N when paralleled"},
	{"tried", "tried", "", KindText, "", "paralleling: one nested record per count tried (n, and total_w at a point or loss_weighted_pct over a profile)"},
	{"runner_up", "runner-up", "", KindText, "", "the second part, whose lead the leader_spread table weighs"},
	{"lead", "lead", "", KindNumber, "", "the leader's margin over the runner-up on typical values, in the ranking's unit (W at a point, fraction of Pout over a profile)"},
	{"spread", "spread", "", KindNumber, "", "how far the leader's own loss moves from typical to worst-case values, same unit as lead"},
	{"clear", "clear", "", KindBool, "", "the lead is larger than the spread: a clear choice (else a coin toss)"},
	{"price_front", "best buy", "", KindBool, "", "no other part is both cheaper and lower in loss"},
	{"single_total_w", "one device", "W", KindNumber, "", "total_w with one device in each place (paralleling)"},
	{"eff_weighted_pct", "weighted eff %", "%", KindNumber, "", "Σ wᵢ·ηᵢ over the load profile, the weights scaled to sum to 1"},
	{"loss_weighted_pct", "weighted loss %", "%", KindNumber, "", "Σ wᵢ·Pᵢ/Poutᵢ over the load profile"},
	{"single_eff_weighted_pct", "one device eff %", "%", KindNumber, "", "eff_weighted_pct with one device in each place"},
	{"worst_eff_weighted_pct", "worst case eff %", "%", KindNumber, "", "eff_weighted_pct with the maximum datasheet values"},
	{"eff_pct_at_*", "η *", "%", KindNumber, "", "efficiency at the profile point named after eff_pct_at_"},
	// Class E and class D.
	{"peak_v", "peak V", "V", KindNumber, "", "class E and D: highest switch voltage"},
	{"peak_a", "peak A", "A", KindNumber, "", "class E and D: highest switch current"},
	{"shunt_needed_f", "shunt needed", "F", KindNumber, "", "class E: shunt capacitance the design needs"},
	{"shunt_in_part_f", "shunt in part", "F", KindNumber, "", "class E: the part's own output capacitance over the swing"},
	{"shunt_to_add_f", "C to add", "F", KindNumber, "", "class E: capacitance to add across the switch"},
	{"f_limit_hz", "f limit", "Hz", KindNumber, "", "class E: highest frequency at which the part's own capacitance still fits"},
	{"excess_reactance_ohm", "excess X", "Ω", KindNumber, "", "class E: excess reactance of the series tank"},
	{"fall_time_s", "fall time", "s", KindNumber, "", "class E and D: current fall time at turn-off"},
	{"soft_on", "soft turn-on", "", KindBool, "", "class D: the node swings fully before turn-on (zero-voltage switching)"},
	{"residual_v", "V at on", "V", KindNumber, "", "class E and D: voltage left across the switch when its channel turns on"},
	{"on_share_pct", "on %", "%", KindNumber, "", "class E: share of the period the channel conducts, from its gate's delays (50: the design's duty)"},
	{"zvs_drive_pct", "ZVS drive %", "%", KindNumber, "", "class E: the drive's high share of the period that gives the channel the design's off interval back (zero-voltage turn-on)"},
	{"zvs_total_w", "ZVS total", "W", KindNumber, "", "class E: the part's loss (switch and driver) with that drive"},
	{"eff_with_driver_pct", "eff +drv %", "%", KindNumber, "", "class E and D: efficiency counting the driver's loss too"},
	// Compare.
	{"total_delta_w", "Δ total", "W", KindNumber, "", "compare: total_w of the candidate minus the fitted part's"},
	{"total_delta_pct", "Δ total %", "%", KindNumber, "", "compare: total_delta_w as a share of the fitted part's total_w"},
	{"*_delta_w", "Δ *", "W", KindNumber, "", "compare: a loss share (or group) of the candidate minus the fitted part's"},
	{"tj_delta_k", "Δ Tj K", "K", KindNumber, "", "compare: tj_c of the candidate minus the fitted part's"},
	{"eff_delta_pts", "Δ eff pts", "%", KindNumber, "", "compare: eff_pct of the candidate minus the fitted part's, percentage points"},
	{"decided_by", "decided by", "", KindText, "", "compare: the loss share that makes most of the change"},
	{"new_screens", "new screens", "", KindList, "", "compare: screens the candidate fails and the fitted part passes"},
	{"package_differs", "other package", "", KindBool, "", "compare: both give a package, and they differ"},
	{"verdict", "verdict", "", KindText, "", "compare: the comparison in one sentence"},
	// Sweep.
	{"fsw_hz", "fsw", "Hz", KindNumber, "", "switching frequency"},
	{"iout_a", "iout", "A", KindNumber, "", "load current"},
	{"vin_v", "vin", "V", KindNumber, "", "input voltage (custom stage: the blocking voltage)"},
	{"vdrive_v", "vdrive", "V", KindNumber, "", "gate drive on level"},
	{"mode", "mode", "", KindText, "", "conduction mode of the stage"},
	{"best", "best", "", KindBool, "", "sweep: the least-loss part that passes at this point"},
	{"best_part", "best", "", KindText, "", "sweep: the least-loss part that passes at this point (\"none\" when every part is set aside)"},
	{"from_part", "from", "", KindText, "", "sweep: the best part below the crossover"},
	{"to_part", "to", "", KindText, "", "sweep: the best part above it"},
	{"kind", "why", "", KindText, "", "sweep: why the best part changes (equal loss, a screen, a mode change, a jump)"},
	{"variable", "variable", "", KindText, "", "sweep: the variable swept (fsw, iout, vin, vdrive); the grid's first column is named after it"},
	{"variable_unit", "unit", "", KindText, "", "sweep: the variable's unit"},
	{"scale", "scale", "", KindText, "", "sweep: log (equal ratios) or linear steps"},
	{"x", "at", "", KindNumber, "", "sweep: where a crossover lies, in the swept variable's unit (variable_unit in the document)"},
	// Verify.
	{"share", "share", "", KindText, "", "verify: the loss share compared (total, conduction, the edges, the gate, …)"},
	{"predicted_w", "predicted", "W", KindNumber, "", "verify: the share as swrank predicts it under the bench's conditions"},
	{"simulated_w", "simulated", "W", KindNumber, "", "verify: the share integrated over the simulated period in ngspice (blank: not simulated)"},
	{"difference_pct", "diff %", "%", KindNumber, "", "verify: (predicted_w − simulated_w) over the size of simulated_w, % (blank: nothing simulated to compare with)"},
	{"margin_pct", "margin %", "%", KindNumber, "", "verify: the difference the cross-check against ngspice allows this share, %"},
	{"flagged", "flagged", "", KindBool, "", "verify: the share is outside its margin (blank: not simulated)"},
	{"flag", "flag", "", KindText, "", "verify: within margin, outside margin, small share (outside its margin but under 2 % of the simulated total: not judged) or not simulated"},
	{"error", "error", "", KindText, "", "verify: why the part could not be simulated"},
	{"cause", "cause", "", KindText, "", "verify: the share with the largest difference in watts when shares are flagged"},
	{"periods", "periods", "", KindNumber, "", "verify: periods simulated in the accepted run"},
	{"steady_state_pct", "steady %", "%", KindNumber, "", "verify: how far apart the energies of the last two simulated periods are, %"},
	{"runs", "runs", "", KindNumber, "", "verify: ngspice runs the part took"},
	{"cached", "cached", "", KindBool, "", "verify: the result was read from the cache, not simulated again"},
	{"rectifier_w", "rectifier", "W", KindNumber, "", "verify: the simulated rectifier diode's loss (diode-rectified stages)"},
	{"sim_temperature_c", "sim Tj", "°C", KindNumber, "", "verify: the junction and ambient temperature of every bench"},
	{"predicted_order", "predicted order", "", KindList, "", "verify: the verified parts by predicted total loss"},
	{"simulated_order", "simulated order", "", KindList, "", "verify: the verified parts by simulated total loss"},
	{"order_agrees", "order agrees", "", KindBool, "", "verify: the simulated order is the predicted one"},
	// Parts.
	{"technology", "tech", "", KindText, "", "parts: the part's technology (si, sic, gan)"},
	{"package", "package", "", KindText, "", "parts: the part's package as in the library"},
	{"vds_max_v", "vds max", "V", KindNumber, "", "parts: the drain-source voltage rating"},
	{"id_max_a", "id max", "A", KindNumber, "", "parts: the continuous drain current rating"},
	{"estimates", "estimated values", "", KindText, "", "parts: the codes of the blank values the models estimate, comma-separated (their count is estimated)"},
}

// Fields returns every field name with its unit and meaning, in the order
// of docs/output.md (a new slice at each call).
func Fields() []Field { return append([]Field(nil), fields...) }

// FieldOf returns the field of key (a wildcard field matches any text in
// place of its *), and whether there is one.
func FieldOf(key string) (Field, bool) {
	for _, list := range [][]Field{fields, pointFields} {
		for _, f := range list {
			if f.Key == key {
				return f, true
			}
		}
	}
	for _, f := range fields {
		pre, post, ok := strings.Cut(f.Key, "*")
		if ok && len(key) > len(pre)+len(post) && strings.HasPrefix(key, pre) && strings.HasSuffix(key, post) {
			mid := key[len(pre) : len(key)-len(post)]
			f.Head = strings.Replace(f.Head, "*", strings.ReplaceAll(mid, "_", " "), 1)
			f.Key = key
			return f, true
		}
	}
	return Field{}, false
}

// Head returns the table heading of key (the key itself when it is not a
// field).
func Head(key string) string {
	if f, ok := FieldOf(key); ok {
		return f.Head
	}
	return key
}

// CheckColumns reports an error for the first name of cols that is not a
// field name, naming the closest one.
func CheckColumns(cols []string) error {
	for _, c := range cols {
		if _, ok := FieldOf(c); !ok {
			return fmt.Errorf("--columns: no column %q%s (docs/output.md lists them)", c, suggest(c))
		}
	}
	return nil
}

// suggest returns `; did you mean "x"?` for the field name closest to s,
// or "" when none is close.
func suggest(s string) string {
	best, bestD := "", 4
	for _, f := range fields {
		if strings.Contains(f.Key, "*") {
			continue
		}
		if d := distance(s, f.Key); d < bestD {
			best, bestD = f.Key, d
		}
	}
	if best == "" {
		return ""
	}
	return fmt.Sprintf("; did you mean %q?", best)
}

// distance is the Levenshtein edit distance between a and b.
func distance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			c := 1
			if ra[i-1] == rb[j-1] {
				c = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+c)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}
