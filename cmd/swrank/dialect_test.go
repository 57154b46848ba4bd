package main

import (
	"strings"
	"testing"
)

// TestSpreadsheetExports ranks the exports of testdata/dialects: the
// European export (semicolons, decimal commas, byte-order mark, CRLF) and
// the tab-separated one rank exactly as the plain CSV file of the same
// parts; the dialect is named once on stderr, never on stdout; a file
// whose separator cannot be told is refused with one located message.
func TestSpreadsheetExports(t *testing.T) {
	const dir = "../../testdata/dialects/"
	_, plain, plainErr := runCLI(t, args([]string{"rank", "--format", "csv", "--parts", dir + "plain.csv"}, buck)...)
	if plainErr != "" {
		t.Fatalf("plain.csv: stderr %q", plainErr)
	}
	for _, c := range []struct {
		file, dialect string
	}{
		{"european.csv", "semicolon-separated, decimal commas accepted"},
		{"tabs.tsv", "tab-separated, decimal commas accepted"},
	} {
		for _, cmd := range [][]string{{"rank"}, {"rank", "--parallel", "auto"}, {"check"}} {
			a := append(append([]string(nil), cmd...), "--parts", dir+c.file)
			if cmd[0] == "check" {
				a = []string{"check", dir + c.file}
			} else {
				a = append(a, buck...)
			}
			code, out, errOut := runCLI(t, a...)
			want := "swrank: " + dir + c.file + ": read as " + c.dialect + "\n"
			if code != 0 || errOut != want || strings.Contains(out, "decimal commas") {
				t.Errorf("%v: code %d, stderr %q, want %q", a, code, errOut, want)
			}
			if cmd[0] == "rank" && len(cmd) == 1 && !strings.Contains(out, "EU-30A") {
				t.Errorf("%v: no ranking:\n%s", a, out)
			}
		}
		_, out, _ := runCLI(t, args([]string{"rank", "--format", "csv", "--parts", dir + c.file}, buck)...)
		if out != plain {
			t.Errorf("%s ranks otherwise than plain.csv:\n%s\nwant\n%s", c.file, out, plain)
		}
	}
	for _, f := range []string{"pipes.csv", "ambiguous.csv"} {
		code, out, errOut := runCLI(t, args([]string{"rank", "--parts", dir + f}, buck)...)
		if code != 1 || out != "" || !strings.Contains(errOut, dir+f+":1: cannot tell the cell separator: the header line \"") {
			t.Errorf("%s: code %d, stdout %q, stderr %q", f, code, out, errOut)
		}
	}
}
