package main

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

var updateGolden = flag.Bool("update", false, "rewrite the golden files of TestGoldenOutputs from the current outputs")

// goldenDir holds one file per case of TestGoldenOutputs: <case>.txt with
// the command line, the exit status, stdout and stderr, and <case>.svg for
// a case that draws a plot.
const goldenDir = "../../testdata/golden"

// tmpMark stands for the case's temporary directory, in the arguments and
// in the recorded outputs.
const tmpMark = "$TMP"

// goldenCase is one command line. Its arguments may hold tmpMark, replaced
// by a fresh temporary directory when the case runs; plot names a file the
// case writes there, whose bytes are compared too.
type goldenCase struct {
	name string
	args []string
	plot string
}

// Libraries of the cases, as paths from this package's directory.
const (
	cliDir   = "../../testdata/cli/"
	decDir   = "../../testdata/decisions/"
	partsDir = "../../devices/testdata/parts/"
)

// The operating points. Each is a list of flags after the command name.
var (
	gpBuck12     = []string{"--demo", "--vin", "12", "--vout", "1.2", "--iout", "10", "--fsw", "500k", "--vdrive", "5"}
	gpBuckCtrl   = cat(gpBuck12, []string{"--position", "control", "--partner", "slate-25-sync"})
	gpBuck48     = []string{"--demo", "--vin", "48", "--vout", "12", "--iout", "8", "--fsw", "250k", "--vdrive", "5", "--rth-ca", "20", "--l-loop", "2n", "--inductance", "22u"}
	gpBoostDiode = []string{"--demo", "--topology", "boost", "--vin", "12", "--vout", "48", "--iout", "2", "--fsw", "300k", "--vdrive", "10",
		"--rectifier", "diode", "--diode-vf", "0.6", "--diode-qrr", "20n", "--diode-cj", "100p"}
	gpBuckDiode = []string{"--demo", "--vin", "24", "--vout", "5", "--iout", "3", "--fsw", "400k", "--vdrive", "10", "--rectifier", "diode", "--diode-vf", "0.45"}
	gpBuckDCM   = []string{"--demo", "--vin", "24", "--vout", "5", "--iout", "0.2", "--fsw", "400k", "--vdrive", "10", "--rectifier", "diode",
		"--diode-vf", "0.45", "--diode-cj", "50p", "--inductance", "10u", "--valley"}
	gpCustom  = []string{"--demo", "--topology", "custom", "--vblock", "60", "--ion", "4", "--ioff", "6", "--irms", "3", "--fsw", "1M", "--vdrive", "5"}
	gpClassE  = []string{"--demo", "--topology", "class-e", "--vin", "12", "--pout", "10", "--fsw", "6.78M", "--ql", "10", "--vdrive", "5"}
	gpClassD  = []string{"--demo", "--topology", "class-d", "--vin", "48", "--pout", "50", "--fsw", "1M", "--f0", "900k", "--ql", "5", "--dead-time", "40n", "--vdrive", "5"}
	gpClassDP = []string{"--demo", "--topology", "class-d", "--vin", "48", "--rload", "8", "--fsw", "1M", "--phase", "0.5", "--vdrive", "5"}
	gpLight   = []string{"--demo", "--vin", "12", "--vout", "1.2", "--iout", "0.5", "--fsw", "500k", "--vdrive", "5", "--inductance", "4.7u"}
	gpHot     = cat(gpBuck12, []string{"--ta", "85", "--rth-ca", "10"})
	gpTj      = cat(gpBuck12, []string{"--tj", "125"})
	gpNegOff  = []string{"--demo", "--vin", "48", "--vout", "12", "--iout", "8", "--fsw", "250k", "--vdrive", "12", "--vdrive-off", "-3"}
	gpDriver  = cat(gpBuck12, []string{"--rg-ext", "2", "--rsrc", "1", "--rsnk", "0.5", "--ipk-src", "1.5", "--ipk-snk", "2", "--iq", "1m",
		"--derate", "0.9", "--ripple", "0.4", "--dead-time", "30n"})
	gpBuck20 = []string{"--demo", "--vin", "12", "--vout", "1.2", "--iout", "20", "--fsw", "500k", "--vdrive", "5"}
	gpLibCLI = []string{"--parts", cliDir + "lib.csv", "--vin", "12", "--vout", "1.2", "--iout", "10", "--fsw", "500k", "--vdrive", "5"}
	gpHandA  = []string{"--parts", cliDir + "hand_a.csv", "--topology", "custom", "--vblock", "12", "--ion", "10", "--ioff", "10", "--irms", "5", "--fsw", "500k", "--vdrive", "5", "--tj", "25"}
	gpStage  = []string{"--design", decDir + "stage.toml"}
	gpPoints = []string{"--design", decDir + "points.toml"}
	gpLinear = []string{"--parts", decDir + "linear.csv", "--topology", "custom", "--vblock", "100", "--irms", "10", "--vdrive", "10", "--tj", "25"}
)

// cat joins lists of arguments into a new list.
func cat(lists ...[]string) []string {
	var a []string
	for _, l := range lists {
		a = append(a, l...)
	}
	return a
}

// formats makes one case per output format: the table by default, the
// others with --format, placed right after the command name.
func formats(name, cmd string, rest []string, fs ...string) []goldenCase {
	var cs []goldenCase
	for _, f := range fs {
		a := []string{cmd}
		if f != "table" {
			a = append(a, "--format", f)
		}
		short := map[string]string{"markdown": "md"}[f]
		if short == "" {
			short = f
		}
		cs = append(cs, goldenCase{name: name + "_" + short, args: cat(a, rest)})
	}
	return cs
}

var allFormats = []string{"table", "csv", "json", "markdown"}

func goldenCases() []goldenCase {
	var cs []goldenCase
	add := func(c ...goldenCase) { cs = append(cs, c...) }

	// rank, at every point.
	add(formats("rank_buck12", "rank", gpBuck12, allFormats...)...)
	add(formats("rank_buck12_control", "rank", gpBuckCtrl, allFormats...)...)
	add(formats("rank_buck48_rthca", "rank", gpBuck48, allFormats...)...)
	add(formats("rank_boost_diode", "rank", gpBoostDiode, allFormats...)...)
	add(formats("rank_buck_diode", "rank", gpBuckDiode, "table")...)
	add(formats("rank_buck_diode_dcm_valley", "rank", gpBuckDCM, "table", "json")...)
	add(formats("rank_custom", "rank", gpCustom, allFormats...)...)
	add(formats("rank_class_e", "rank", gpClassE, allFormats...)...)
	add(formats("rank_class_d", "rank", gpClassD, allFormats...)...)
	add(formats("rank_class_d_phase", "rank", gpClassDP, "table")...)
	add(formats("rank_light_load", "rank", gpLight, "table", "json")...)
	add(formats("rank_hot_ambient", "rank", gpHot, "table")...)
	add(formats("rank_tj_pinned", "rank", gpTj, "table")...)
	add(formats("rank_vdrive_off_neg", "rank", gpNegOff, "table", "markdown")...)
	add(formats("rank_driver_flags_all_top5", "rank", cat(gpDriver, []string{"--all", "--top", "5"}), "table")...)
	add(formats("rank_parallel_auto", "rank", cat(gpBuck20, []string{"--parallel", "auto", "--parallel-max", "3"}), allFormats...)...)
	add(formats("rank_parallel_2", "rank", cat(gpBuck20, []string{"--parallel", "2"}), "table")...)
	add(formats("rank_lib_cli", "rank", gpLibCLI, "table")...)
	add(formats("rank_hand_a", "rank", gpHandA, "json")...)
	add(formats("rank_design_stage", "rank", gpStage, "table")...)
	add(formats("rank_design_points", "rank", gpPoints, allFormats...)...)
	add(formats("rank_weighting_euro", "rank", cat(gpBuck12, []string{"--weighting", "euro"}), allFormats...)...)
	add(formats("rank_design_stage_weighting", "rank", cat(gpStage, []string{"--weighting", "10%:0.2,50%:0.5,100%:0.3"}), "table")...)

	// explain: a part at points over the topologies.
	add(formats("explain_buck12_quartz-45", "explain", cat(gpBuck12, []string{"quartz-45"}), "table", "json")...)
	add(formats("explain_control_basalt-40", "explain", cat(gpBuckCtrl, []string{"basalt-40"}), "table")...)
	add(formats("explain_boost_diode_granite-80", "explain", cat(gpBoostDiode, []string{"granite-80"}), "table", "json")...)
	add(formats("explain_class_e_quartz-90", "explain", cat(gpClassE, []string{"quartz-90"}), "table", "json")...)
	add(formats("explain_hand_a", "explain", cat(gpHandA, []string{"hand-a"}), "table")...)

	// compare: the fitted part against named candidates, or against all.
	add(formats("compare_buck12", "compare", cat(gpBuck12, []string{"--fitted", "basalt-40", "quartz-45", "slate-30-lo"}), allFormats...)...)
	add(formats("compare_buck12_all", "compare", cat(gpBuck12, []string{"--fitted", "basalt-40"}), "table")...)
	add(formats("compare_design_stage", "compare", cat(gpStage, []string{"--fitted", "lin-b", "lin-a", "lin-c"}), "table", "json")...)

	// sweep over fsw and iout, and a plot.
	add(formats("sweep_fsw_top3", "sweep", cat(gpBuck12, []string{"--var", "fsw", "--from", "100k", "--to", "2M", "--steps", "6", "--top", "3"}), allFormats...)...)
	add(formats("sweep_iout_components", "sweep", cat(gpBuck12, []string{"--var", "iout", "--from", "1", "--to", "20", "--steps", "5", "--components", "quartz-45", "basalt-40"}), "table", "csv")...)
	add(goldenCase{name: "sweep_fsw_linear_plot",
		args: cat([]string{"sweep"}, gpLinear, []string{"--var", "fsw", "--from", "10k", "--to", "1M", "--steps", "9", "--plot", tmpMark + "/loss.svg", "lin-a", "lin-b", "lin-c"}),
		plot: "loss.svg"})

	// check: the good libraries at once, then each bad one alone.
	good := []string{"check", partsDir + "good.csv", partsDir + "bom_comments.csv", cliDir + "lib.csv", cliDir + "hand_a.csv", decDir + "linear.csv"}
	add(goldenCase{name: "check_good", args: good})
	for _, f := range []string{"bad_number", "bad_unit", "conditional", "duplicate", "duplicate_column", "empty", "header_only", "missing_column",
		"nan", "nonphysical", "quotes", "ragged", "relations", "unknown_column"} {
		add(goldenCase{name: "check_" + f, args: []string{"check", partsDir + f + ".csv"}})
	}
	add(goldenCase{name: "check_cli_bad_unit", args: []string{"check", cliDir + "bad_unit.csv", cliDir + "formula_name.csv"}})

	// Errors: their message and exit status are output too.
	add(goldenCase{name: "err_rank_no_vdrive", args: []string{"rank", "--demo", "--vin", "12", "--vout", "1.2", "--iout", "10", "--fsw", "500k"}})
	add(goldenCase{name: "err_rank_bad_library", args: cat([]string{"rank", "--parts", cliDir + "bad_unit.csv"}, gpLibCLI[2:])})
	add(goldenCase{name: "err_explain_unknown_part", args: cat([]string{"explain"}, gpBuck12, []string{"no-such-part"})})
	add(goldenCase{name: "err_explain_format_csv", args: cat([]string{"explain", "--format", "csv"}, gpBuck12, []string{"quartz-45"})})
	add(goldenCase{name: "err_compare_points", args: cat([]string{"compare"}, gpPoints, []string{"--fitted", "lin-b", "lin-a"})})
	add(goldenCase{name: "err_sweep_one_step", args: cat([]string{"sweep"}, gpBuck12, []string{"--steps", "1"})})
	add(goldenCase{name: "err_unknown_command", args: []string{"frobnicate"}})
	add(goldenCase{name: "help_rank", args: []string{"rank", "-h"}})
	return cs
}

// TestGoldenOutputs guards the output of every command against change: for
// each case it runs the command line in-process and compares its stdout,
// stderr and exit status byte for byte with testdata/golden/<case>.txt
// (and a plot with <case>.svg). A refactor must leave every file as it is.
//
// Regenerate the files with
//
//	go test ./cmd/swrank -run TestGoldenOutputs -update
//
// only in a commit that changes output on purpose, and review their diff.
//
// The only normalisation: the path of a case's temporary directory (where
// a sweep draws its plot) is replaced by $TMP in the arguments and outputs,
// as it differs from run to run.
func TestGoldenOutputs(t *testing.T) {
	cases := goldenCases()
	want := map[string]bool{}
	for _, c := range cases {
		for _, f := range c.files() {
			if want[f] {
				t.Fatalf("two cases write %s", f)
			}
			want[f] = true
		}
	}
	if *updateGolden {
		if err := os.MkdirAll(goldenDir, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	ran := 0
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) { ran++; c.check(t) })
	}

	// A golden file that no case writes is stale: -update removes it. Only
	// when every case ran: a -run pattern that selects some must not
	// remove the files of the others.
	if ran != len(cases) {
		return
	}
	ents, err := os.ReadDir(goldenDir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ents {
		if want[e.Name()] || e.IsDir() {
			continue
		}
		if *updateGolden {
			if err := os.Remove(filepath.Join(goldenDir, e.Name())); err != nil {
				t.Error(err)
			}
			continue
		}
		t.Errorf("%s/%s: no case writes it (run with -update to remove it)", goldenDir, e.Name())
	}
}

func (c goldenCase) files() []string {
	fs := []string{c.name + ".txt"}
	if c.plot != "" {
		fs = append(fs, c.name+".svg")
	}
	return fs
}

func (c goldenCase) check(t *testing.T) {
	tmp := ""
	args := make([]string, len(c.args))
	for i, a := range c.args {
		if strings.Contains(a, tmpMark) {
			if tmp == "" {
				tmp = t.TempDir()
			}
			a = strings.ReplaceAll(a, tmpMark, tmp)
		}
		args[i] = a
	}
	code, stdout, stderr := runCLI(t, args...)
	if tmp != "" {
		stdout = strings.ReplaceAll(stdout, tmp, tmpMark)
		stderr = strings.ReplaceAll(stderr, tmp, tmpMark)
	}
	got := goldenRecord{cmdline: cmdline(c.args), code: code, stdout: stdout, stderr: stderr}
	txt := filepath.Join(goldenDir, c.name+".txt")
	var svg []byte
	if c.plot != "" {
		var err error
		if svg, err = os.ReadFile(filepath.Join(tmp, c.plot)); err != nil {
			t.Fatalf("the plot: %v (exit %d, stderr %q)", err, code, stderr)
		}
	}

	if *updateGolden {
		writeGolden(t, txt, got.bytes())
		if c.plot != "" {
			writeGolden(t, filepath.Join(goldenDir, c.name+".svg"), svg)
		}
		return
	}

	data, err := os.ReadFile(txt)
	if err != nil {
		t.Fatalf("%v (run with -update to record it)", err)
	}
	w, err := parseGolden(data)
	if err != nil {
		t.Fatalf("%s: %v", txt, err)
	}
	if w.cmdline != got.cmdline {
		t.Errorf("%s was recorded for other arguments (run with -update):\nwant %s\ngot  %s", txt, w.cmdline, got.cmdline)
		return
	}
	if w.code != got.code {
		t.Errorf("exit status: want %d, got %d", w.code, got.code)
	}
	reportDiff(t, "stdout", w.stdout, got.stdout)
	reportDiff(t, "stderr", w.stderr, got.stderr)
	if c.plot != "" {
		wsvg, err := os.ReadFile(filepath.Join(goldenDir, c.name+".svg"))
		if err != nil {
			t.Fatalf("%v (run with -update to record it)", err)
		}
		reportDiff(t, c.plot, string(wsvg), string(svg))
	}
}

// goldenRecord is the content of a <case>.txt file:
//
//	swrank ARGS...
//	exit N
//	-- stdout: N bytes --
//	<stdout>
//	-- stderr: N bytes --
//	<stderr>
//
// A section not ending in a newline gets one in the file; the byte counts
// tell it apart, so the record is exact.
type goldenRecord struct {
	cmdline        string
	code           int
	stdout, stderr string
}

func (g goldenRecord) bytes() []byte {
	var b bytes.Buffer
	fmt.Fprintf(&b, "%s\nexit %d\n", g.cmdline, g.code)
	for _, s := range []struct{ name, text string }{{"stdout", g.stdout}, {"stderr", g.stderr}} {
		fmt.Fprintf(&b, "-- %s: %d bytes --\n%s", s.name, len(s.text), s.text)
		if s.text != "" && !strings.HasSuffix(s.text, "\n") {
			b.WriteByte('\n')
		}
	}
	return b.Bytes()
}

func parseGolden(data []byte) (goldenRecord, error) {
	var g goldenRecord
	s := string(data)
	line := func() (string, error) {
		i := strings.IndexByte(s, '\n')
		if i < 0 {
			return "", errors.New("truncated")
		}
		l := s[:i]
		s = s[i+1:]
		return l, nil
	}
	var err error
	if g.cmdline, err = line(); err != nil {
		return g, err
	}
	l, err := line()
	if err != nil {
		return g, err
	}
	if g.code, err = strconv.Atoi(strings.TrimPrefix(l, "exit ")); err != nil {
		return g, fmt.Errorf("exit line %q", l)
	}
	for _, sec := range []struct {
		name string
		dst  *string
	}{{"stdout", &g.stdout}, {"stderr", &g.stderr}} {
		l, err := line()
		if err != nil {
			return g, err
		}
		var n int
		if _, err := fmt.Sscanf(l, "-- "+sec.name+": %d bytes --", &n); err != nil || n < 0 || n > len(s) {
			return g, fmt.Errorf("bad %s header %q", sec.name, l)
		}
		*sec.dst, s = s[:n], s[n:]
		if n > 0 && !strings.HasSuffix(*sec.dst, "\n") {
			s = strings.TrimPrefix(s, "\n")
		}
	}
	if s != "" {
		return g, fmt.Errorf("%d bytes after stderr", len(s))
	}
	return g, nil
}

// cmdline writes the arguments as one line, quoting those that need it.
func cmdline(args []string) string {
	q := []string{"swrank"}
	for _, a := range args {
		if a == "" || strings.ContainsAny(a, " \t\n\"'\\") {
			a = strconv.Quote(a)
		}
		q = append(q, a)
	}
	return strings.Join(q, " ")
}

// reportDiff reports the first line where got differs from want.
func reportDiff(t *testing.T, what, want, got string) {
	t.Helper()
	if want == got {
		return
	}
	// Lines with their newlines, so that a missing final newline shows too.
	lines := func(s string) []string {
		l := strings.SplitAfter(s, "\n")
		if l[len(l)-1] == "" {
			l = l[:len(l)-1]
		}
		return l
	}
	wl, gl := lines(want), lines(got)
	for i := 0; i <= max(len(wl), len(gl)); i++ {
		w, g := "(end)", "(end)"
		if i < len(wl) {
			w = wl[i]
		}
		if i < len(gl) {
			g = gl[i]
		}
		if w != g {
			t.Errorf("%s differs first at line %d (of %d lines wanted, %d got):\nwant %q\ngot  %q",
				what, i+1, len(wl), len(gl), w, g)
			return
		}
	}
}

// writeGolden replaces path atomically: a temporary file in the same
// directory, renamed over it.
func writeGolden(t *testing.T, path string, data []byte) {
	t.Helper()
	f, err := os.CreateTemp(filepath.Dir(path), ".golden-*")
	if err != nil {
		t.Fatal(err)
	}
	_, err = f.Write(data)
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Chmod(f.Name(), 0o644)
	}
	if err == nil {
		err = os.Rename(f.Name(), path)
	}
	if err != nil {
		os.Remove(f.Name())
		t.Fatal(err)
	}
}
