package report

import (
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// The table format's text around the tables: the operating point as
// understood, the description of a profile or a sweep, a part's whole
// calculation (explain) and the problems of a library (check).

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

func (r *Decisions) describe(w io.Writer) {
	if pr := r.Plan.Profile; pr != nil {
		fmt.Fprintf(w, "load profile: %s\n", pr.Title)
		fmt.Fprintf(w, "source: %s\n", pr.Source)
		fmt.Fprintln(w, "parts are ranked by the weighted efficiency Σ wᵢ·ηᵢ (the weights apply to efficiencies, not to watts); efficiencies in %, of the switches and drivers only")
		for _, p := range pr.Points {
			s := &p.Point.Stage
			fmt.Fprintf(w, "  %-10s weight %.4g: %s", p.Name, p.Weight, s.Topology)
			if s.Topology == stage.Custom {
				fmt.Fprintf(w, " %s, %s rms, %s", s.Vblock, s.Irms, s.Pout)
			} else {
				fmt.Fprintf(w, " %s → %s at %s (%s)", s.Vin, s.Vout, s.Iout, s.Pout)
			}
			fmt.Fprintf(w, ", %s, %s conduction\n", s.Fsw, p.Point.Mode)
			for _, n := range p.Point.Notes {
				fmt.Fprintf(w, "             note: %s\n", n)
			}
		}
		fmt.Fprintf(w, "library %s: %d parts\n", r.Source, r.Parts)
	} else {
		describePoint(w, r.Plan.Point, r.Source, r.Parts)
		if r.Plan.Point.Mode != stage.ModeGiven {
			fmt.Fprintf(w, "conduction mode: %s\n", r.Plan.Point.Mode)
		}
	}
	if r.Parallel {
		if r.Auto {
			fmt.Fprintln(w, "paralleling: each part with the count that loses least (N), beside one device; each device's own thermal resistance carries 1/N of the loss")
		} else {
			fmt.Fprintln(w, "paralleling: each part N times on one driver, beside one device; each device's own thermal resistance carries 1/N of the loss")
		}
	}
}

func (r *Sweep) describe(w io.Writer) {
	sw := r.Result
	scale := "linear"
	if sw.Spec.Log {
		scale = "log"
	}
	fmt.Fprintf(w, "sweep of the %s from %s to %s, %d points, %s steps; the rest of the stage:\n", sw.Spec.Var.Title(),
		fmtX(sw.Spec.Var, sw.Spec.Lo), fmtX(sw.Spec.Var, sw.Spec.Hi), len(sw.X), scale)
	describePoint(w, &sw.Pts[0], r.Source, r.Parts)
	modes := []string{}
	for _, p := range sw.Pts {
		if m := p.Mode.String(); !slices.Contains(modes, m) {
			modes = append(modes, m)
		}
	}
	fmt.Fprintf(w, "conduction modes over the sweep: %s\n", strings.Join(modes, ", "))
	for _, n := range sw.Notes {
		fmt.Fprintf(w, "note: %s\n", n)
	}
	fmt.Fprintln(w, "total stage loss of each part; a value in parentheses: the part is set aside there by a screen")
}

// explainText writes the calculation as text: the operating point, each
// step of the trace under its device, the totals, the assumptions (flags)
// and the screens.
func explainText(w io.Writer, pt *stage.Point, r *evaluate.Result, tr *evaluate.Trace) error {
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

// WriteCheck writes the problems that checking the library at path found
// (lib nil when it could not be read), one a line, and a summary line
// with the number of parts and problems.
func WriteCheck(w io.Writer, path string, lib *devices.Library, probs devices.ProblemList) error {
	return guardText(w, func(w io.Writer) error { return writeCheck(w, path, lib, probs) })
}

func writeCheck(w io.Writer, path string, lib *devices.Library, probs devices.ProblemList) error {
	for _, p := range probs {
		if _, err := fmt.Fprintln(w, p.Error()); err != nil {
			return err
		}
	}
	n := 0
	if lib != nil {
		n = len(lib.Parts)
	}
	_, err := fmt.Fprintf(w, "%s: %d parts, %d problems (%d fatal)\n", path, n, len(probs), countFatal(probs))
	return err
}

func countFatal(ps devices.ProblemList) int {
	n := 0
	for _, p := range ps {
		if p.Fatal {
			n++
		}
	}
	return n
}
