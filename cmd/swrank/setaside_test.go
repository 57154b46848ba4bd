package main

import (
	"strings"
	"testing"
)

// TestSetAsideCostsOnlyItself ranks testdata/cli/set_aside.csv, whose rows
// check accepts: WC-QRR's laws cannot be fitted, WC-BAD's worst-case copy
// cannot. Every path of rank ranks the others, exits 0 and states both
// reasons (the text table lists the set-aside part under the table, CSV
// and JSON as a row with not_evaluated); check reports them first, as
// warnings.
func TestSetAsideCostsOnlyItself(t *testing.T) {
	const lib = "../../testdata/cli/set_aside.csv"
	custom := []string{"--parts", lib, "--topology", "custom", "--vblock", "12", "--ion", "3", "--ioff", "4", "--irms", "2", "--fsw", "300k", "--vdrive", "5"}
	const qrr = `qrr_hot: needs a charge ≥ 0 at a qrr_hot_tj other than qrr_tj`
	const worst = `part "WC-BAD": rds_on_vgs must exceed vgs_th`
	for _, c := range []struct {
		name  string
		extra []string
		want  []string
	}{
		{"table", nil, []string{"WC-QRR (line 8): not evaluated: part \"WC-QRR\": qrr_hot", "WC-BAD: typical 67.9 mW, worst case not evaluated: worst case: part \"WC-BAD\": rds_on_vgs must", "1  WC-BAD", "2  WC-GAN"}},
		{"markdown", []string{"--format", "markdown"}, []string{"WC-QRR (line 8): not evaluated", "worst case not evaluated: worst case: " + worst}},
		{"csv", []string{"--format", "csv"}, []string{",WC-QRR,,out,", "not evaluated: part \"\"WC-QRR\"\": " + qrr}},
		{"json", []string{"--format", "json"}, []string{`"set_aside": [`, `"line": 8`, `"not_evaluated": "part \"WC-QRR\": qrr_hot`, `"worst_not_evaluated": "worst case: part \"WC-BAD\": rds_on_vgs must exceed vgs_th"`}},
		{"auto", []string{"--parallel", "auto"}, []string{"WC-QRR (line 8): not evaluated", "WC-BAD: typical 67.9 mW, worst case not evaluated: worst case: part \"WC-BAD\""}},
		{"auto json", []string{"--parallel", "auto", "--format", "json"}, []string{`"set_aside": [`, `"worst_not_evaluated": "worst case: part \"WC-BAD\"`}},
		{"partner", []string{"--topology", "buck", "--vin", "12", "--vout", "1.2", "--iout", "3", "--partner", "WC-OK"}, []string{"WC-QRR (line 8): not evaluated"}},
	} {
		code, out, errOut := runCLI(t, append(append([]string{"rank"}, custom...), c.extra...)...)
		if code != 0 || errOut != "" {
			t.Errorf("%s: code %d, stderr %q", c.name, code, errOut)
		}
		for _, w := range c.want {
			if !strings.Contains(out, w) {
				t.Errorf("%s: output lacks %q:\n%s", c.name, w, out)
			}
		}
	}
	code, out, _ := runCLI(t, "check", lib)
	out = strings.ReplaceAll(out, "\n  ", " ") // the lines as written, unwrapped
	if code != 0 || !strings.Contains(out, "set_aside.csv:7: rank cannot evaluate this part's worst case: worst case: "+worst+" (warning)") ||
		!strings.Contains(out, "set_aside.csv:8: rank sets this part aside: part \"WC-QRR\": "+qrr) {
		t.Errorf("check: code %d\n%s", code, out)
	}
	code, _, errOut := runCLI(t, append(append([]string{"explain"}, custom...), "WC-QRR")...)
	if code != 1 || !strings.Contains(errOut, `part "WC-QRR" is set aside: part "WC-QRR": `+qrr) {
		t.Errorf("explain: code %d, %q", code, errOut)
	}
	code, out, errOut = runCLI(t, append([]string{"sweep", "--var", "fsw", "--from", "100k", "--to", "1M"}, custom...)...)
	if code != 0 || !strings.Contains(errOut, "part set aside: WC-QRR (line 8): not evaluated") || out == "" {
		t.Errorf("sweep: code %d, stderr %q", code, errOut)
	}
}
