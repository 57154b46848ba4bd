package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/olekukonko/tablewriter"
	"github.com/olekukonko/tablewriter/renderer"
	"github.com/olekukonko/tablewriter/tw"

	q "swrank/devices/quantity"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// report is what rank prints.
type report struct {
	pt       *stage.Point
	source   string            // the library's name
	parts    int               // parts in the library
	results  []evaluate.Result // in rank order (all of them, or the leaders kept)
	screened int               // screened parts in the library (0: count the results)
	all      bool
	top      int
}

// shown returns the results the table lists.
func (r *report) shown() []evaluate.Result {
	var out []evaluate.Result
	for _, x := range r.results {
		if x.Screened() && !r.all {
			continue
		}
		out = append(out, x)
		if r.top > 0 && len(out) == r.top {
			break
		}
	}
	return out
}

func render(w io.Writer, format string, r report) error {
	switch strings.ToLower(format) {
	case "json":
		return renderJSON(w, r)
	case "csv":
		return renderCSV(w, r)
	case "markdown":
		return renderTable(w, r, true)
	}
	return renderTable(w, r, false)
}

// fmtP prints a power with an SI prefix, "–" for exactly zero.
func fmtP(p q.Power) string {
	if p == 0 {
		return "–"
	}
	return q.Format(p, 3)
}

var tableHeader = []string{"#", "part", "conduction", "turn-on", "turn-off", "output cap", "diode", "gate (in FET)", "switch", "driver", "total", "Tj", "% of Pout", "method / flags"}

func tableRow(i int, x *evaluate.Result, pout q.Power) []string {
	l := x.Losses
	name := x.Dev.Part.Name
	if x.Partner != nil {
		name += " + " + x.Partner.Part.Name
	}
	tj := "–"
	if t, ok := x.Tj(); ok {
		tj = q.Format(t, 3)
	} else {
		tj = "none"
	}
	pct := "–"
	if pout > 0 {
		pct = strconv.FormatFloat(100*float64(l.Total())/float64(pout), 'f', 2, 64)
	}
	rankNo := strconv.Itoa(i + 1)
	if x.Screened() {
		rankNo = "x"
	}
	row := []string{rankNo, name, fmtP(l.Conduction), fmtP(l.TurnOn), fmtP(l.TurnOff), fmtP(l.Coss),
		fmtP(l.DeadTime + l.Recovery), fmtP(l.GateRint), fmtP(l.Switch()), fmtP(l.Driver()), fmtP(l.Total()),
		tj, pct}
	if rf := &x.RF; rf.VPeak > 0 {
		pc := func(v q.Ratio) string { return strconv.FormatFloat(100*float64(v), 'f', 2, 64) }
		if rf.CRequired > 0 {
			row = append(row, q.Format(rf.VPeak, 3), q.Format(rf.CExternal, 3), q.Format(rf.FMax, 3))
		} else {
			zvs := "full"
			if !rf.ZVS {
				zvs = "from " + q.Format(rf.VResidual, 3)
			}
			row = append(row, q.Format(rf.VPeak, 3), zvs)
		}
		row = append(row, pc(rf.EffStage), pc(rf.EffWithDriver))
	}
	return append(row, methods(x)+flagCodes(x.Flags))
}

// header returns the table's column names for the stage.
func header(pt *stage.Point) []string {
	h := append([]string(nil), tableHeader[:len(tableHeader)-1]...)
	switch pt.Stage.Topology {
	case stage.ClassE:
		h = append(h, "peak V", "C ext", "f max", "η stage %", "η +driver %")
	case stage.ClassD:
		h = append(h, "V", "ZVS", "η stage %", "η +driver %")
	}
	return append(h, tableHeader[len(tableHeader)-1])
}

func methods(x *evaluate.Result) string {
	m := x.Devices[0].Method.String()
	if x.N > 1 && x.Devices[1].Dev != x.Devices[0].Dev && x.Devices[1].Method != x.Devices[0].Method {
		m += "/" + x.Devices[1].Method.String()
	}
	return m
}

func flagCodes(f fit.Flags) string {
	f &^= fit.FlagQrrInModel
	if c := f.Codes(); c != "" {
		return " " + c
	}
	return ""
}

// describePoint prints the operating point as understood.
func describePoint(w io.Writer, pt *stage.Point, source string, parts int) {
	s := &pt.Stage
	d := &s.Driver
	switch s.Topology {
	case stage.ClassE:
		e := &pt.RF.E
		ql := "ideal (Q → ∞)"
		if s.QL > 0 {
			ql = strconv.FormatFloat(float64(s.QL), 'g', 4, 64)
		}
		fmt.Fprintf(w, "class E %s supply, %s into %s at %s, loaded Q %s\n", s.Vin, e.Po, e.R, s.Fsw, ql)
		fmt.Fprintf(w, "switch: %s dc, %s rms, %s peak, %s at turn-off; peak voltage %s with a linear shunt; shunt needed %s\n",
			e.IDC, e.IRms, e.IPeak, e.IOff, e.VPeak, e.C1)
	case stage.ClassD:
		d := &pt.RF.D
		fmt.Fprintf(w, "class D half-bridge %s, %s into %s at %s, load phase %.3f rad; tank current %s peak, %s at the edges; dead time %s\n",
			s.Vin, d.Po, d.R, s.Fsw, float64(d.Phase), d.Im, d.ISwitch, s.DeadTime.V)
	case stage.Custom:
		fmt.Fprintf(w, "custom switch: %s blocked, %s at turn-on, %s at turn-off, %s rms, %s\n",
			s.Vblock, s.Ion, s.Ioff, s.Irms, s.Fsw)
	default:
		second := "synchronous switch"
		if pt.HasDiode {
			second = fmt.Sprintf("diode (%s, Qrr %s, Cj %s)", s.Diode.Vf, s.Diode.Qrr, s.Diode.Cj)
		}
		fmt.Fprintf(w, "%s %s → %s at %s (%s), %s, with a %s; ranking the %s\n",
			s.Topology, s.Vin, s.Vout, s.Iout, s.Pout, s.Fsw, second, placeWord(pt))
		fmt.Fprintf(w, "%s conduction; inductor %s average, %s ripple; control switch: duty %.3f, %s on, %s off, %s rms",
			pt.Mode, pt.IL, pt.Ripple, float64(pt.Ctrl.Duty), pt.Ctrl.IOn, pt.Ctrl.IOff, pt.Ctrl.IRms)
		if pt.HasSync {
			fmt.Fprintf(w, "; sync switch %s rms, dead time %s", pt.Sync.IRms, s.DeadTime.V)
		}
		fmt.Fprintln(w)
	}
	fmt.Fprintf(w, "drive %s / %s, source %s, sink %s, external %s", d.VOn, d.VOff, d.RSource, d.RSink, d.RgExt)
	if d.IPeakSource > 0 || d.IPeakSink > 0 {
		fmt.Fprintf(w, ", peak %s / %s", d.IPeakSource, d.IPeakSink)
	}
	if d.IQ > 0 {
		fmt.Fprintf(w, ", quiescent %s", d.IQ)
	}
	fmt.Fprintf(w, "; ambient %s", s.Ambient)
	if s.RthCA.OK {
		fmt.Fprintf(w, ", case to ambient %s", s.RthCA.V)
	}
	if s.TjFixed.OK {
		fmt.Fprintf(w, ", junctions pinned at %s", s.TjFixed.V)
	}
	fmt.Fprintf(w, "; voltage derating %.2f\n", float64(s.Derate))
	if pt.HasDiode {
		fmt.Fprintf(w, "the diode itself dissipates %s (not in the totals below: it is the same for every part)\n", pt.DiodeLoss)
	}
	for _, n := range pt.Notes {
		fmt.Fprintf(w, "note: %s\n", n)
	}
	if source != "" {
		fmt.Fprintf(w, "library %s: %d parts\n", source, parts)
	}
}

func placeWord(pt *stage.Point) string {
	if !pt.HasSync {
		return "control switch"
	}
	switch pt.Stage.Position {
	case stage.Control:
		return "control switch (whole-stage loss)"
	case stage.Sync:
		return "sync switch (whole-stage loss)"
	}
	return "pair: the part in both places"
}

func renderTable(w io.Writer, r report, markdown bool) error {
	if !markdown {
		describePoint(w, r.pt, r.source, r.parts)
		fmt.Fprintln(w)
	}
	h := header(r.pt)
	align := make([]tw.Align, len(h))
	for i := range align {
		align[i] = tw.AlignRight
	}
	align[1], align[len(h)-1] = tw.AlignLeft, tw.AlignLeft
	opts := []tablewriter.Option{
		tablewriter.WithHeaderAutoFormat(tw.Off),
		tablewriter.WithHeader(h),
		tablewriter.WithRowAlignmentConfig(tw.CellAlignment{PerColumn: align}),
	}
	if markdown {
		opts = append(opts, tablewriter.WithRenderer(renderer.NewMarkdown()))
	}
	t := tablewriter.NewTable(w, opts...)
	shown := r.shown()
	for i := range shown {
		if err := t.Append(tableRow(i, &shown[i], r.pt.Stage.Pout)); err != nil {
			return err
		}
	}
	if err := t.Render(); err != nil {
		return err
	}
	var screened []evaluate.Result
	for _, x := range r.results {
		if x.Screened() {
			screened = append(screened, x)
		}
	}
	if len(screened) > 0 {
		n := max(r.screened, len(screened))
		fmt.Fprintf(w, "\nset aside (%d):\n", n)
		for _, x := range screened {
			for _, reason := range x.Reasons() {
				fmt.Fprintf(w, "- %s\n", reason)
			}
		}
		if n > len(screened) {
			fmt.Fprintf(w, "… and %d more (the lowest-loss %d shown)\n", n-len(screened), len(screened))
		}
	}
	if f := flagsUsed(shown); len(f) > 0 && !markdown {
		fmt.Fprintln(w, "\nflags:")
		for _, line := range f {
			fmt.Fprintf(w, "  %s\n", line)
		}
	}
	return nil
}

// flagsUsed explains each flag code that appears in the shown rows.
func flagsUsed(rs []evaluate.Result) []string {
	var all fit.Flags
	for _, x := range rs {
		all |= x.Flags
	}
	all &^= fit.FlagQrrInModel
	var out []string
	for bit := fit.Flags(1); bit != 0 && all != 0; bit <<= 1 {
		if all&bit == 0 {
			continue
		}
		all &^= bit
		out = append(out, fmt.Sprintf("%-10s %s", bit.Codes(), bit.Sentences()[0]))
	}
	return out
}

// safeCell neutralises a CSV cell that a spreadsheet would run as a formula
// (OWASP guidance on CSV injection: cells starting with = + - @ tab or CR),
// leaving plain numbers alone.
func safeCell(s string) string {
	if s == "" {
		return s
	}
	if _, err := strconv.ParseFloat(s, 64); err == nil {
		return s
	}
	switch s[0] {
	case '=', '+', '-', '@', '\t', '\r':
		return "'" + s
	}
	return s
}

// safeCSV is a csv.Writer whose every cell goes through safeCell, so that
// no command writes a spreadsheet formula from a user's part name.
type safeCSV struct{ *csv.Writer }

func newSafeCSV(w io.Writer) safeCSV { return safeCSV{csv.NewWriter(w)} }

// Write neutralises and writes one record.
func (c safeCSV) Write(row []string) error {
	for j := range row {
		row[j] = safeCell(row[j])
	}
	return c.Writer.Write(row)
}

// WriteAll writes every record and flushes.
func (c safeCSV) WriteAll(rows [][]string) error {
	for _, r := range rows {
		if err := c.Write(r); err != nil {
			return err
		}
	}
	c.Flush()
	return c.Error()
}

func num(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', 6, 64)
}

var csvHeader = []string{"rank", "part", "partner", "position", "total_w", "switch_w", "driver_w", "conduction_w", "turn_on_w",
	"turn_off_w", "coss_w", "deadtime_w", "recovery_w", "gate_driver_w", "gate_rext_w", "gate_rint_w",
	"driver_quiescent_w", "tj_degc", "loss_pct", "method", "flags", "screened", "reasons"}

func renderCSV(w io.Writer, r report) error {
	cw := newSafeCSV(w)
	if err := cw.Write(csvHeader); err != nil {
		return err
	}
	for i, x := range r.shown() {
		l := x.Losses
		partner := ""
		if x.Partner != nil {
			partner = x.Partner.Part.Name
		}
		tj := ""
		if t, ok := x.Tj(); ok {
			tj = num(float64(t))
		}
		pct := ""
		if r.pt.Stage.Pout > 0 {
			pct = num(100 * float64(l.Total()) / float64(r.pt.Stage.Pout))
		}
		row := []string{strconv.Itoa(i + 1), x.Dev.Part.Name, partner, x.Position.String(), num(float64(l.Total())),
			num(float64(l.Switch())), num(float64(l.Driver())), num(float64(l.Conduction)), num(float64(l.TurnOn)),
			num(float64(l.TurnOff)), num(float64(l.Coss)), num(float64(l.DeadTime)), num(float64(l.Recovery)),
			num(float64(l.GateDriver)), num(float64(l.GateRext)), num(float64(l.GateRint)), num(float64(l.DriverQuiescent)),
			tj, pct, methods(&x), strings.TrimSpace(flagCodes(x.Flags)), strconv.FormatBool(x.Screened()),
			strings.Join(x.Reasons(), "; ")}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}
