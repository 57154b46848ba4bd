package spicecheck

import (
	"fmt"
	"math"
	"strings"

	q "swrank/devices/quantity"
)

// PointSummary is the ordering agreement at one point.
type PointSummary struct {
	Point              string   // the point's name
	N                  int      // devices compared
	Conc, Disc         int      // concordant and discordant pairs of the two orders
	Tau                float64  // Kendall's τ_a of the two orders; [−1, 1]
	PredOrder          []string // device names by predicted total, lowest first
	SimOrder           []string // device names by simulated total, lowest first
	MinSwitchingShare  float64  // lowest simulated switching share among the compared devices; [0, 1]
	MedSwitchingShare  float64  // median simulated switching share of the compared devices; [0, 1]
	Screened           []string // devices swrank set aside (not compared)
	MedianTotalErr     float64  // median |relative error| of the total
	WorstTotalErr      float64  // largest relative error of the total, signed
	WorstTotalDevice   string   // where it is, "device @ point"
	BestAgrees         bool     // swrank's first device is the simulated best, or within BestTie of it
	BestGap            float64  // BestGap of the compared rows
	SwitchingDominates bool     // the median compared device has a switching share ≥ 40 %
}

// Summary is the whole run in figures.
type Summary struct {
	Comp      map[string]Stats // by component, over every compared row
	Points    []PointSummary   // in config order
	TauPooled float64          // over the pairs within each point; [−1, 1]
	Conc      int              // concordant pairs within the points
	Disc      int              // discordant pairs within the points
	Pairs     int              // all pairs within the points

	// The cells with parasitic inductance.
	ParComp   map[string]Stats // by component, over the parasitic rows compared (ParCompared)
	Overshoot []OvershootStats // by variant, over every parasitic row
}

// OvershootStats compare swrank's peak drain voltage with the simulated one
// over the rows of one variant: the ratio of the overshoots above the
// blocked voltage, (Vpeak,pred − V)/(Vpeak,sim − V).
type OvershootStats struct {
	Variant          string  // the variant's name
	N                int     // rows with a simulated overshoot
	Min, Median, Max float64 // of the ratio; 1 = agreement
	MinAt, MaxAt     string  // where they are, "device @ point"
	SimMax           float64 // largest simulated overshoot, V
	SimMaxAt         string  // where it is, "device @ point"
}

// Summarise computes the figures of a suite.
func (s *Suite) Summarise() Summary {
	all := s.AllCompared()
	sum := Summary{Comp: map[string]Stats{}}
	for _, c := range Components() {
		sum.Comp[c] = ErrStats(all, c)
	}
	for _, p := range s.Config.Points {
		rows := s.Compared[p.Name]
		ps := PointSummary{Point: p.Name, N: len(rows), MinSwitchingShare: math.Inf(1)}
		for _, r := range s.Rows {
			if r.Point == p.Name && r.Screened {
				ps.Screened = append(ps.Screened, r.Device)
			}
		}
		if len(rows) > 0 {
			ps.Conc, ps.Disc = Pairs(rows)
			ps.Tau = KendallTau(ps.Conc, ps.Disc, len(rows))
			ps.PredOrder, ps.SimOrder = Order(rows, true), Order(rows, false)
			ps.BestGap = BestGap(rows)
			ps.BestAgrees = ps.BestGap <= BestTie
			st := ErrStats(rows, CompTotal)
			ps.MedianTotalErr, ps.WorstTotalErr, ps.WorstTotalDevice = st.Median, st.WorstSigned, st.WorstAt
			shares := make([]float64, len(rows))
			for i, r := range rows {
				shares[i] = r.SwitchingShare()
				ps.MinSwitchingShare = math.Min(ps.MinSwitchingShare, shares[i])
			}
			ps.MedSwitchingShare = median(shares)
			ps.SwitchingDominates = ps.MedSwitchingShare >= 0.4
		}
		sum.Conc += ps.Conc
		sum.Disc += ps.Disc
		sum.Pairs += ps.N * (ps.N - 1) / 2
		sum.Points = append(sum.Points, ps)
	}
	if sum.Pairs > 0 {
		sum.TauPooled = float64(sum.Conc-sum.Disc) / float64(sum.Pairs)
	}
	if len(s.ParRows) > 0 {
		pc := s.ParCompared()
		sum.ParComp = map[string]Stats{}
		for _, c := range Components() {
			sum.ParComp[c] = ErrStats(pc, c)
		}
		for _, v := range s.Config.Parasitics.Variants {
			var rows []Row
			for _, r := range s.ParRows {
				if r.Variant == v.Name {
					rows = append(rows, r)
				}
			}
			sum.Overshoot = append(sum.Overshoot, OvershootOf(v.Name, rows))
		}
	}
	return sum
}

// OvershootOf summarises the overshoot ratios of rows (rows whose
// simulation shows no overshoot are left out).
func OvershootOf(variant string, rows []Row) OvershootStats {
	o := OvershootStats{Variant: variant, Min: math.Inf(1), Max: math.Inf(-1)}
	var x []float64
	for _, r := range rows {
		at := r.Device + " @ " + r.Point
		if d := r.SimE.VPeak - r.SimE.VBlock; d > o.SimMax {
			o.SimMax, o.SimMaxAt = d, at
		}
		k := r.OvershootRatio()
		if math.IsNaN(k) {
			continue
		}
		x = append(x, k)
		if k < o.Min {
			o.Min, o.MinAt = k, at
		}
		if k > o.Max {
			o.Max, o.MaxAt = k, at
		}
	}
	o.N = len(x)
	o.Median = median(x)
	return o
}

// pct prints a relative error as a signed percentage; an infinite one (a
// simulated zero) as "n/a", and one beyond +1000 % (a nearly lossless
// simulated edge) as ">+1000%".
func pct(x float64) string {
	switch {
	case math.IsInf(x, 0) || math.IsNaN(x):
		return "n/a"
	case x > 10:
		return ">+1000%"
	}
	return fmt.Sprintf("%+.1f%%", 100*x)
}

func watts(x float64) string { return q.Format(q.Power(x), 3) }

// SummaryText is the short summary printed in verbose mode.
func (sum *Summary) SummaryText() string {
	var b strings.Builder
	b.WriteString("relative error (predicted − simulated)/simulated over the compared rows:\n")
	fmt.Fprintf(&b, "  %-11s %4s %9s %9s  %s\n", "component", "n", "median", "worst", "worst at")
	for _, c := range Components() {
		st := sum.Comp[c]
		fmt.Fprintf(&b, "  %-11s %4d %9s %9s  %s\n", c, st.N, fmt.Sprintf("%.1f%%", 100*st.Median), pct(st.WorstSigned), st.WorstAt)
	}
	b.WriteString("ordering by total loss (switch + driver):\n")
	for _, p := range sum.Points {
		best := "n/a"
		if p.N > 0 {
			best = p.PredOrder[0]
			if p.PredOrder[0] != p.SimOrder[0] {
				best = fmt.Sprintf("predicted %s, simulated %s (the predicted loses %.2f%% more in simulation; a tie within %.0f%%: %v)",
					p.PredOrder[0], p.SimOrder[0], 100*p.BestGap, 100*BestTie, p.BestAgrees)
			}
		}
		fmt.Fprintf(&b, "  %-18s n=%-2d τ=%+.3f  switching share median %.0f%% (min %.0f%%)  total err median %.1f%% worst %s  best %s\n",
			p.Point, p.N, p.Tau, 100*p.MedSwitchingShare, 100*p.MinSwitchingShare, 100*p.MedianTotalErr, pct(p.WorstTotalErr), best)
	}
	fmt.Fprintf(&b, "  pooled Kendall τ over %d within-point pairs: %+.3f (%d concordant, %d discordant)\n",
		sum.Pairs, sum.TauPooled, sum.Conc, sum.Disc)
	if sum.ParComp != nil {
		b.WriteString("cells with parasitic inductance, relative error over the rows compared (not screened, or screened only for the drain-voltage rating):\n")
		for _, c := range []string{CompTurnOn, CompTurnOff, CompTotal} {
			st := sum.ParComp[c]
			fmt.Fprintf(&b, "  %-11s %4d %9s %9s  %s\n", c, st.N, fmt.Sprintf("%.1f%%", 100*st.Median), pct(st.WorstSigned), st.WorstAt)
		}
		b.WriteString("  peak drain voltage, overshoot above the blocked voltage, swrank/simulated:\n")
		for _, o := range sum.Overshoot {
			fmt.Fprintf(&b, "  %-10s n=%-2d median %.2f  min %.2f (%s)  max %.2f (%s)  largest simulated %.2f V (%s)\n",
				o.Variant, o.N, o.Median, o.Min, o.MinAt, o.Max, o.MaxAt, o.SimMax, o.SimMaxAt)
		}
	}
	return b.String()
}

// Report is the full text report: the characterised datasheets, every row
// with each component, and the summary.
func (s *Suite) Report(sum *Summary) string {
	var b strings.Builder
	b.WriteString("swrank ngspice cross-check\n")
	fmt.Fprintf(&b, "library: %s   run time: %v\n\n", s.Library, s.Elapsed.Round(1e6))
	b.WriteString("== characterised datasheets (what swrank sees) ==\n")
	fmt.Fprintf(&b, "%-13s %8s %8s %6s %7s %7s %7s %6s %7s %7s %7s %7s %7s %6s %7s %7s %5s\n",
		"part", "rds10", "rds2", "vth", "ciss", "coss", "crss", "rg", "qoss", "eoss", "qg", "qgs", "qgd", "vpl", "tr", "tf", "@V")
	for _, m := range s.Config.Devices {
		d := s.Sheets[m.Name]
		fmt.Fprintf(&b, "%-13s %8s %8s %6.3f %7s %7s %7s %6.2f %7s %7s %7s %7s %7s %6.3f %7s %7s %5.0f\n", m.Name,
			q.Format(q.Resistance(d.RdsOn), 3), q.Format(q.Resistance(d.RdsOn2), 3), d.Vth,
			q.Format(q.Capacitance(d.Ciss), 3), q.Format(q.Capacitance(d.Coss), 3), q.Format(q.Capacitance(d.Crss), 3), d.RgInt,
			q.Format(q.Charge(d.Qoss), 3), q.Format(q.Energy(d.Eoss), 3), q.Format(q.Charge(d.Qg), 3),
			q.Format(q.Charge(d.Qgs), 3), q.Format(q.Charge(d.Qgd), 3), d.Vpl,
			q.Format(q.Time(d.Tr), 3), q.Format(q.Time(d.Tf), 3), d.CapVds)
	}
	b.WriteString("\n== per device and component: predicted / simulated (relative error) ==\n")
	for _, p := range s.Config.Points {
		fmt.Fprintf(&b, "\n-- %s: %g V bus, %g A, %s, duty %g, drive %g V (%g Ω source, %g Ω sink, %g Ω external) --\n",
			p.Name, p.Vbus, p.Current, q.Format(q.Frequency(p.Fsw), 3), p.Duty, p.VOn, p.RSource, p.RSink, p.RgExt)
		if p.Comment != "" {
			fmt.Fprintf(&b, "   %s\n", p.Comment)
		}
		for _, r := range s.Rows {
			if r.Point != p.Name {
				continue
			}
			note := ""
			if r.Screened {
				note = "  [screened by swrank: " + r.ScreenNote + "; not compared]"
			}
			fmt.Fprintf(&b, "%-13s method %s, switching share %.0f%%, sim windows on %s off %s%s\n", r.Device, r.Method,
				100*r.SwitchingShare(), q.Format(q.Time(r.SimE.TOn), 3), q.Format(q.Time(r.SimE.TOff), 3), note)
			for _, c := range Components() {
				fmt.Fprintf(&b, "    %-11s %10s %10s %9s\n", c, watts(r.Pred[c]), watts(r.Sim[c]), pct(r.Err(c)))
			}
			e := r.SimE
			fmt.Fprintf(&b, "    terminal edge energies: on %s, off %s (channel: on %s, off %s); gate supply %s\n",
				q.Format(q.Energy(e.OnTerm), 3), q.Format(q.Energy(e.OffTerm), 3),
				q.Format(q.Energy(e.OnOverlap+e.OnCoss), 3), q.Format(q.Energy(e.Off), 3), watts(e.Supply*p.Fsw))
		}
	}
	if len(s.ParRows) > 0 {
		b.WriteString("\n== cells with parasitic inductance: predicted / simulated (relative error) ==\n")
		for _, v := range s.Config.Parasitics.Variants {
			fmt.Fprintf(&b, "\n-- %s: %s --\n", v.Name, v.Par())
			for _, r := range s.ParRows {
				if r.Variant != v.Name {
					continue
				}
				note := ""
				if r.Screened {
					note = "  [screened by swrank: " + r.ScreenNote + "; energies not compared]"
				}
				e := r.SimE
				fmt.Fprintf(&b, "%-13s at %-17s part %s%s\n", r.Device, r.Point, r.Part, note)
				pl := s.Plain(&r)
				for _, c := range []string{CompTurnOn, CompTurnOff, CompTotal} {
					inc := ""
					if pl != nil && c != CompTotal {
						inc = fmt.Sprintf("   plain cell %10s %10s", watts(pl.Pred[c]), watts(pl.Sim[c]))
					}
					fmt.Fprintf(&b, "    %-11s %10s %10s %9s%s\n", c, watts(r.Pred[c]), watts(r.Sim[c]), pct(r.Err(c)), inc)
				}
				fmt.Fprintf(&b, "    peak drain voltage: predicted %.2f V, simulated %.2f V at %s into the period (blocked %.2f V; overshoot ratio %.2f)\n",
					r.VPeakPred, e.VPeak, q.Format(q.Time(e.TPeak), 3), e.VBlock, r.OvershootRatio())
			}
		}
	}
	b.WriteString("\n== summary ==\n")
	b.WriteString(sum.SummaryText())
	for _, p := range sum.Points {
		fmt.Fprintf(&b, "  %s predicted order: %s\n  %s simulated order: %s\n", p.Point, strings.Join(p.PredOrder, " < "),
			p.Point, strings.Join(p.SimOrder, " < "))
		if len(p.Screened) > 0 {
			fmt.Fprintf(&b, "  %s screened by swrank: %s\n", p.Point, strings.Join(p.Screened, ", "))
		}
	}
	return b.String()
}

// WriteReport writes the report atomically.
func (s *Suite) WriteReport(path string, sum *Summary) error {
	return writeAtomic(path, []byte(s.Report(sum)))
}
