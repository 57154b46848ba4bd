package report

import (
	"fmt"
	"io"
	"strings"

	"github.com/olekukonko/tablewriter"
	"github.com/olekukonko/tablewriter/tw"

	q "swrank/devices/quantity"
	"swrank/rank/verify"
)

// Verification is the report of swrank verify: the shortlist's predicted
// and simulated loss shares side by side.
type Verification struct {
	Report *verify.Report
	Source string // the library's name
	Parts  int    // parts in the library
}

// Write writes the verification in format: table (the default for any
// other name), csv, json or markdown.
func (v *Verification) Write(w io.Writer, format string) error {
	switch strings.ToLower(format) {
	case "csv":
		return v.csv(w)
	case "json":
		return v.json(w)
	case "markdown":
		return v.table(w, true)
	}
	return v.table(w, false)
}

// diffCells returns the relative difference, the margin and the flag mark
// of a share.
func diffCells(p *verify.Part, s verify.Share) (string, string, string) {
	d, ok := s.Diff()
	diff := "–"
	if ok {
		diff = fmt.Sprintf("%+.1f %%", 100*d)
	}
	mark := ""
	for _, f := range p.Flagged {
		if f == s.Name {
			mark = "outside margin"
		}
	}
	return diff, fmt.Sprintf("%.0f %%", 100*verify.Margin(s.Name)), mark
}

func (v *Verification) table(w io.Writer, markdown bool) error {
	r := v.Report
	describePoint(w, r.Point, v.Source, v.Parts)
	fmt.Fprintf(w, "simulated in ngspice at %d °C; predicted under the same conditions (Tj %d °C, no package or layout inductance)\n\n",
		verify.SimTemperature, verify.SimTemperature)
	h := []string{"#", "part", "share", "predicted", "simulated", "difference", "margin", "flag"}
	align := []tw.Align{tw.AlignRight, tw.AlignLeft, tw.AlignLeft, tw.AlignRight, tw.AlignRight, tw.AlignRight, tw.AlignRight, tw.AlignLeft}
	opts := withMarkdown([]tablewriter.Option{
		tablewriter.WithHeaderAutoFormat(tw.Off),
		tablewriter.WithHeader(h),
		tablewriter.WithRowAlignmentConfig(tw.CellAlignment{PerColumn: align}),
	}, markdown)
	t := tablewriter.NewTable(w, opts...)
	for i := range r.Parts {
		p := &r.Parts[i]
		for j, s := range p.Shares {
			rank, name := "", ""
			if j == 0 {
				rank, name = fmt.Sprint(p.Rank), p.Name
			}
			row := []string{rank, name, s.Name, watts(s.Predicted), "–", "–", "", ""}
			if p.Err == nil && p.Sim != nil {
				row[4] = watts(s.Simulated)
				row[5], row[6], row[7] = diffCells(p, s)
			} else {
				row[6] = fmt.Sprintf("%.0f %%", 100*verify.Margin(s.Name))
				row[7] = "not simulated"
			}
			if err := t.Append(row); err != nil {
				return err
			}
		}
	}
	if err := t.Render(); err != nil {
		return err
	}
	fmt.Fprintln(w)
	for i := range r.Parts {
		p := &r.Parts[i]
		switch {
		case p.Err != nil:
			fmt.Fprintf(w, "- %s: simulation failed: %v\n", p.Name, p.Err)
			continue
		case p.Sim == nil:
			continue
		}
		how := fmt.Sprintf("steady state after %d periods (last two periods within %.2g %%), %d run(s)", p.Sim.Periods, 100*p.Sim.PSS, p.Sim.Runs)
		if p.Sim.Relaxed {
			how += ", ten times looser tolerances (the time step stalled with the tight ones)"
		}
		if p.Sim.Cached {
			how += ", from the cache"
		}
		if p.Sim.ILMean != 0 {
			how += fmt.Sprintf(", inductor %s mean", q.Format(q.Current(p.Sim.ILMean), 4))
		}
		if p.Sim.Rectifier != 0 {
			how += fmt.Sprintf(", rectifier diode %s", watts(p.Sim.Rectifier))
		}
		if p.Sim.Kept != "" {
			how += "; deck kept in " + p.Sim.Kept
		}
		fmt.Fprintf(w, "- %s: %s\n", p.Name, how)
		if len(p.Flagged) > 0 {
			fmt.Fprintf(w, "  outside the margin: %s; the largest difference is in %s\n", strings.Join(p.Flagged, ", "), p.Cause)
		}
	}
	for _, s := range r.Skipped {
		fmt.Fprintf(w, "- skipped %s\n", s)
	}
	if len(r.SimulatedOrder) > 1 {
		if r.OrderAgrees {
			fmt.Fprintf(w, "\norder of the shortlist: the simulation agrees (%s)\n", strings.Join(r.SimulatedOrder, ", "))
		} else {
			fmt.Fprintf(w, "\norder of the shortlist: the simulation differs: predicted %s; simulated %s\n",
				strings.Join(r.PredictedOrder, ", "), strings.Join(r.SimulatedOrder, ", "))
		}
	}
	fmt.Fprintf(w, "margins: from the cross-check against ngspice (docs/spice-crosscheck.md); shares under %.0f %% of the simulated total are not flagged\n",
		100*verify.Floor)
	return nil
}

func (v *Verification) csv(w io.Writer) error {
	rows := [][]string{{"rank", "part", "share", "predicted_w", "simulated_w", "difference", "margin", "flagged", "error"}}
	for i := range v.Report.Parts {
		p := &v.Report.Parts[i]
		for _, s := range p.Shares {
			row := []string{fmt.Sprint(p.Rank), p.Name, s.Name, num(s.Predicted), "", "", num(verify.Margin(s.Name)), "", ""}
			if p.Err != nil || p.Sim == nil {
				row[8] = fmt.Sprint(p.Err)
			} else {
				row[4] = num(s.Simulated)
				if d, ok := s.Diff(); ok {
					row[5] = num(d)
				}
				row[7] = "no"
				for _, f := range p.Flagged {
					if f == s.Name {
						row[7] = "yes"
					}
				}
			}
			rows = append(rows, row)
		}
	}
	return newSafeCSV(w).WriteAll(rows)
}

// JSONVerifyShare is one share of one verified part, W.
type JSONVerifyShare struct {
	Share      string   `json:"share"`
	Predicted  float64  `json:"predicted_w"`
	Simulated  *float64 `json:"simulated_w,omitempty"`
	Difference *float64 `json:"difference,omitempty"` // (predicted − simulated)/simulated
	Margin     float64  `json:"margin"`
	Flagged    bool     `json:"flagged"`
}

// JSONVerifyPart is one verified part.
type JSONVerifyPart struct {
	Rank      int               `json:"rank"`
	Part      string            `json:"part"`
	Shares    []JSONVerifyShare `json:"shares"`
	Cause     string            `json:"cause,omitempty"`
	Error     string            `json:"error,omitempty"`
	Periods   int               `json:"periods,omitempty"`
	PSS       float64           `json:"steady_state_difference,omitempty"`
	Cached    bool              `json:"cached,omitempty"`
	Rectifier float64           `json:"rectifier_w,omitempty"`
}

// JSONVerify is the JSON document of verify.
type JSONVerify struct {
	OperatingPoint JSONPoint        `json:"operating_point"`
	SimTemperature float64          `json:"sim_temperature_c"`
	Parts          []JSONVerifyPart `json:"parts"`
	Skipped        []string         `json:"skipped,omitempty"`
	PredictedOrder []string         `json:"predicted_order"`
	SimulatedOrder []string         `json:"simulated_order"`
	OrderAgrees    bool             `json:"order_agrees"`
}

func (v *Verification) json(w io.Writer) error {
	r := v.Report
	doc := JSONVerify{OperatingPoint: pointJSON(r.Point), SimTemperature: verify.SimTemperature, Skipped: r.Skipped,
		PredictedOrder: r.PredictedOrder, SimulatedOrder: r.SimulatedOrder, OrderAgrees: r.OrderAgrees}
	for i := range r.Parts {
		p := &r.Parts[i]
		jp := JSONVerifyPart{Rank: p.Rank, Part: p.Name, Cause: p.Cause}
		if p.Err != nil {
			jp.Error = p.Err.Error()
		} else if p.Sim != nil {
			jp.Periods, jp.PSS, jp.Cached, jp.Rectifier = p.Sim.Periods, p.Sim.PSS, p.Sim.Cached, p.Sim.Rectifier
		}
		for _, s := range p.Shares {
			js := JSONVerifyShare{Share: s.Name, Predicted: s.Predicted, Margin: verify.Margin(s.Name)}
			if p.Err == nil && p.Sim != nil {
				js.Simulated = ptr(s.Simulated)
				if d, ok := s.Diff(); ok {
					js.Difference = ptr(d)
				}
				for _, f := range p.Flagged {
					js.Flagged = js.Flagged || f == s.Name
				}
			}
			jp.Shares = append(jp.Shares, js)
		}
		doc.Parts = append(doc.Parts, jp)
	}
	return writeJSON(w, doc)
}
