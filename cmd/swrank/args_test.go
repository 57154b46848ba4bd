package main

import (
	"bytes"
	"os"
	"strings"
	"testing"
)

// runStdin runs the command line in-process with stdin as its standard
// input.
func runStdin(t *testing.T, stdin string, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := runIO(args, strings.NewReader(stdin), &out, &errb)
	return code, out.String(), errb.String()
}

// A command line that forgives: flags anywhere, two-line usage errors with
// the nearest names, several libraries, standard input, and the documented
// exit statuses, end to end.
func TestForgivingCommandLine(t *testing.T) {
	const cli = "../../testdata/cli/"
	lib, err := os.ReadFile(cli + "lib.csv")
	if err != nil {
		t.Fatal(err)
	}
	demoBuck := args([]string{"--demo"}, buck)
	for _, c := range []struct {
		name   string
		stdin  string
		args   []string
		code   int
		stdout string // contained in stdout
		stderr string // stderr exactly, when not ""
		errHas string // contained in stderr
	}{
		{name: "flags after the part", args: args([]string{"explain", "slate-30-lo"}, demoBuck), code: 0, stdout: "slate-30-lo"},
		{name: "flags around the part", args: args([]string{"explain", "--demo", "slate-30-lo"}, buck), code: 0, stdout: "slate-30-lo"},
		{name: "flag=value", args: []string{"rank", "--demo", "--vin=12", "--vout=1.2", "--iout=10", "--fsw=500k", "--vdrive=5"}, code: 0, stdout: "slate"},
		{name: "negative value after its flag", args: args([]string{"rank"}, demoBuck, []string{"--vdrive-off", "-2"}), code: 0, stdout: "slate"},
		{name: "unknown flag", args: args([]string{"rank", "--demo", "--vdriv", "5"}), code: 2,
			stderr: "swrank rank: unknown flag --vdriv (did you mean --vdrive?)\nsee swrank rank -h\n"},
		{name: "unknown flag after arguments", args: args([]string{"explain", "slate-30-lo", "--vdrve", "5"}), code: 2,
			stderr: "swrank explain: unknown flag --vdrve (did you mean --vdrive?)\nsee swrank explain -h\n"},
		{name: "bad value", args: args([]string{"rank"}, demoBuck, []string{"--fsw", "fast"}), code: 2,
			stderr: "swrank rank: --fsw: \"fast\": not a number\nsee swrank rank -h\n"},
		{name: "bad true/false", args: args([]string{"rank", "--strict=perhaps"}, demoBuck), code: 2,
			stderr: "swrank rank: --strict=perhaps: want true or false (or --strict alone)\nsee swrank rank -h\n"},
		{name: "flag without its value", args: args([]string{"rank"}, demoBuck, []string{"--ta"}), code: 2, errHas: "--ta needs a value"},
		{name: "unknown command", args: []string{"rnak"}, code: 2, stderr: "swrank: unknown command \"rnak\" (did you mean rank?)\nsee swrank -h\n"},
		{name: "misspelt part", args: args([]string{"explain", "slate-30-l"}, demoBuck), code: 1,
			stderr: "swrank explain: no part named \"slate-30-l\" in the library (did you mean slate-30-lo?)\n"},
		{name: "misspelt partner", args: args([]string{"rank", "--partner", "slate-25-snyc"}, demoBuck), code: 1,
			errHas: "(did you mean slate-25-sync?)"},
		{name: "misspelt fitted", args: args([]string{"compare", "--fitted", "basalt-04"}, demoBuck), code: 1,
			errHas: "(did you mean basalt-40?)"},
		{name: "misspelt candidate", args: args([]string{"compare", "--fitted", "basalt-40", "granit-80"}, demoBuck), code: 1,
			errHas: "(did you mean granite-80?)"},
		{name: "misspelt column", args: args([]string{"check", "../../devices/testdata/parts/misspelt_column.csv"}), code: 1, stdout: "did you mean"},
		{name: "two libraries", args: args([]string{"rank", "--parts", cli + "lib.csv"}, buck, []string{"--parts", cli + "hand_a.csv", "--all"}), code: 0,
			stdout: "hand-a"},
		{name: "a part in two libraries", stdin: string(lib), args: args([]string{"rank", "--parts", cli + "lib.csv", "--parts", "-"}, buck), code: 1,
			errHas: "is in both ../../testdata/cli/lib.csv and stdin"},
		{name: "a part in two libraries, explain", stdin: string(lib), args: args([]string{"explain", "--parts", "-", "--parts", cli + "lib.csv"}, buck, []string{"low-r"}), code: 1,
			errHas: "is in both stdin and ../../testdata/cli/lib.csv"},
		{name: "standard input", stdin: string(lib), args: args([]string{"rank", "--parts", "-"}, buck), code: 0, stdout: "library stdin"},
		{name: "standard input twice", args: args([]string{"rank", "--parts", "-", "--parts", "-"}, buck), code: 2, errHas: "standard input can be read once"},
		{name: "check standard input", stdin: string(lib), args: []string{"check", "-"}, code: 0, stdout: "stdin"},
		{name: "explain takes the design", args: []string{"explain", "--design", "../../testdata/decisions/stage.toml", "lin-a"}, code: 0, stdout: "lin-a"},
		{name: "explain takes rank's flags", args: args([]string{"explain", "slate-30-lo", "--top", "3", "--all", "--parallel", "2"}, demoBuck), code: 0, stdout: "slate-30-lo"},
		{name: "explain refuses a profile", args: args([]string{"explain", "slate-30-lo", "--weighting", "euro"}, demoBuck), code: 1, errHas: "one operating point"},
		{name: "no part passes", args: []string{"rank", "--parts", cli + "hand_a.csv", "--vin", "48", "--vout", "12", "--iout", "8", "--fsw", "200k", "--vdrive", "5"},
			code: 3, errHas: "no part passes every screen"},
		{name: "no part passes, decisions", args: []string{"rank", "--parts", cli + "hand_a.csv", "--vin", "48", "--vout", "12", "--iout", "8", "--fsw", "200k", "--vdrive", "5", "--parallel", "2"},
			code: 3, errHas: "no part passes every screen"},
		{name: "explain a part set aside", args: []string{"explain", "--parts", cli + "hand_a.csv", "--vin", "48", "--vout", "12", "--iout", "8", "--fsw", "200k", "--vdrive", "5", "hand-a"},
			code: 3, errHas: "no part passes every screen"},
		{name: "bad input", args: args([]string{"rank", "--parts", cli + "bad_unit.csv"}, buck), code: 1, errHas: "bad_unit.csv:"},
		{name: "usage: extra argument", args: args([]string{"rank", "extra"}, demoBuck), code: 2, errHas: "see swrank rank -h"},
	} {
		t.Run(c.name, func(t *testing.T) {
			code, out, e := runStdin(t, c.stdin, c.args...)
			if code != c.code {
				t.Errorf("exit %d, want %d; stderr %q", code, c.code, e)
			}
			if !strings.Contains(out, c.stdout) {
				t.Errorf("stdout lacks %q:\n%s", c.stdout, out)
			}
			if c.stderr != "" && e != c.stderr {
				t.Errorf("stderr %q, want %q", e, c.stderr)
			}
			if !strings.Contains(e, c.errHas) {
				t.Errorf("stderr %q lacks %q", e, c.errHas)
			}
		})
	}
}
