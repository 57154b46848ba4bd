package report

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"swrank/rank/decide"
)

// The csv format: one header row and one row per part (or per part and
// point), values in SI units without prefixes. Every cell goes through
// safeCell, so that no command writes a spreadsheet formula.

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

// Write neutralises, escapes (csvText) and writes one record.
func (c safeCSV) Write(row []string) error {
	for j := range row {
		row[j] = csvText(row[j])
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
	"driver_quiescent_w", "tj_degc", "loss_pct", "method", "flags", "estimated_values", "screened", "reasons"}

func (r *Ranking) csv(w io.Writer) error {
	cw := newSafeCSV(w)
	if err := cw.Write(csvHeader); err != nil {
		return err
	}
	for i, x := range r.Shown() {
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
		if r.Point.Stage.Pout > 0 {
			pct = num(100 * float64(l.Total()) / float64(r.Point.Stage.Pout))
		}
		row := []string{strconv.Itoa(i + 1), x.Dev.Part.Name, partner, x.Position.String(), num(float64(l.Total())),
			num(float64(l.Switch())), num(float64(l.Driver())), num(float64(l.Conduction)), num(float64(l.TurnOn)),
			num(float64(l.TurnOff)), num(float64(l.Coss)), num(float64(l.DeadTime)), num(float64(l.Recovery)),
			num(float64(l.GateDriver)), num(float64(l.GateRext)), num(float64(l.GateRint)), num(float64(l.DriverQuiescent)),
			tj, pct, methods(&x), strings.TrimSpace(flagCodes(x.Flags)), strconv.Itoa(x.Flags.Estimates()), strconv.FormatBool(x.Screened()),
			strings.Join(x.Reasons(), "; ")}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	for _, a := range r.SetAside {
		row := make([]string, len(csvHeader))
		row[0], row[1], row[len(row)-2], row[len(row)-1] = "x", a.Part, "true", "not evaluated: "+a.Reason
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// csvWithLeaders writes the ranking as CSV with three more columns: the
// worst-case total, the price and whether the part is on the price-loss
// front.
func (r *Ranking) csvWithLeaders(w io.Writer, cs []decide.Candidate, front []int) error {
	var buf bytes.Buffer
	if err := r.csv(&buf); err != nil {
		return err
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil || len(rows) == 0 {
		return fmt.Errorf("decorating the CSV output: %v", err)
	}
	col := slices.Index(rows[0], "part")
	onFront := map[string]bool{}
	for _, i := range front {
		onFront[csvText(cs[i].Name())] = true
	}
	byName := map[string]*decide.Candidate{} // by the name as the CSV cell writes it
	for i := range cs {
		byName[csvText(cs[i].Name())] = &cs[i]
	}
	rows[0] = append(rows[0], "worst_total_w", "price", "price_front")
	for i := 1; i < len(rows); i++ {
		var worst, price, fr string
		if col >= 0 && col < len(rows[i]) {
			if c := byName[rows[i][col]]; c != nil {
				if c.Worst != nil {
					worst = num(c.Worst.Key())
				}
				if p := c.Dev.Part.Price; p.OK {
					price = num(p.V)
				}
				fr = strconv.FormatBool(onFront[csvText(c.Name())])
			}
		}
		rows[i] = append(rows[i], worst, price, fr)
	}
	cw := newSafeCSV(w)
	if err := cw.WriteAll(rows); err != nil {
		return err
	}
	return cw.Error()
}

func (r *Decisions) csv(w io.Writer) error {
	return newSafeCSV(w).WriteAll(append([][]string{r.header()}, r.rows()...))
}

func csvName(s string) string {
	s = strings.NewReplacer(" ", "_", "(", "", ")", "", "+", "_", "-", "_").Replace(s)
	return strings.Trim(s, "_")
}

func (r *Comparison) csv(w io.Writer) error {
	comps := decide.Components()
	header := []string{"candidate", "fitted"}
	for _, c := range comps {
		n := csvName(c.Name)
		header = append(header, n+"_w", n+"_fitted_w", n+"_delta_w", n+"_delta_rel")
	}
	header = append(header, "tj_degc", "tj_delta_k", "eff", "eff_delta", "new_screens", "package_differs", "screened", "verdict")
	cw := newSafeCSV(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	for _, c := range r.Candidates {
		row := []string{c.Cand.Dev.Part.Name, r.Fitted.Dev.Part.Name}
		for _, d := range c.Deltas {
			rel := ""
			if d.Relative {
				rel = num(d.Rel)
			}
			row = append(row, num(d.Cand), num(d.Fitted), num(d.Abs), rel)
		}
		tj, dtj, eff, deff := "", "", "", ""
		if t, ok := c.Cand.Tj(); ok {
			tj = num(float64(t))
		}
		if c.Tj != nil {
			dtj = num(c.Tj.Abs)
		}
		if c.Eff != nil {
			eff, deff = num(c.Eff.Cand), num(c.Eff.Abs)
		}
		row = append(row, tj, dtj, eff, deff, strings.Join(decide.ScreenNames(c.NewScreens), "; "),
			strconv.FormatBool(c.PackageDiffers), strconv.FormatBool(c.Cand.Screened()), c.Verdict)
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

func (r *Sweep) csv(w io.Writer) error {
	cw := newSafeCSV(w)
	b := r.Result.Best(r.Set)
	unit := r.Result.Spec.Var.String() + "_" + strings.ToLower(r.Result.Spec.Var.Unit())
	if r.Components {
		if err := cw.Write([]string{unit, "part", "conduction_w", "turn_on_w", "turn_off_w", "coss_w", "deadtime_w", "recovery_w",
			"gate_rint_w", "driver_w", "total_w", "tj_degc", "screened", "mode", "best"}); err != nil {
			return err
		}
		for i, x := range r.Result.X {
			for _, k := range r.Set {
				res := r.Result.Evaluate(k, i)
				l := res.Losses
				tj := ""
				if t, ok := res.Tj(); ok {
					tj = num(float64(t))
				}
				row := []string{num(x), r.name(k), num(float64(l.Conduction)), num(float64(l.TurnOn)), num(float64(l.TurnOff)),
					num(float64(l.Coss)), num(float64(l.DeadTime)), num(float64(l.Recovery)), num(float64(l.GateRint)),
					num(float64(l.Driver())), num(float64(l.Total())), tj, strconv.FormatBool(res.Screened()),
					r.Result.Pts[i].Mode.String(), strconv.FormatBool(b[i] == k)}
				if err := cw.Write(row); err != nil {
					return err
				}
			}
		}
	} else {
		header := []string{unit}
		for _, k := range r.Set {
			header = append(header, r.name(k)+"_w")
		}
		header = append(header, "best", "mode")
		if err := cw.Write(header); err != nil {
			return err
		}
		for i, x := range r.Result.X {
			row := []string{num(x)}
			for _, k := range r.Set {
				t, ok := r.Result.Total(k, i)
				if !ok {
					row = append(row, "")
					continue
				}
				row = append(row, num(t))
			}
			row = append(row, r.best(b, i), r.Result.Pts[i].Mode.String())
			if err := cw.Write(row); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}
