package table

import (
	"bytes"
	"strings"
	"testing"
	"unicode/utf8"

	"swrank/rank/report"
)

// Wrap keeps every line within the width and loses no word.
func TestWrap(t *testing.T) {
	s := "peak drain voltage 28.6 V (12.0 V blocked plus the loop-inductance overshoot) exceeds the derating limit 24.0 V"
	for _, w := range []int{40, 60, 100} {
		lines := Wrap(s, w, "- ", "  ")
		for _, l := range lines {
			if utf8.RuneCountInString(l) > w {
				t.Errorf("width %d: %q", w, l)
			}
		}
		if got := strings.Join(strings.Fields(strings.Join(lines, " ")), " "); got != "- "+s {
			t.Errorf("width %d: words lost: %q", w, got)
		}
	}
}

// A ranked table lists DefaultLimit rows and says how many more; --all
// lists them all; the part column is cut to fit the width.
func TestTableLimitAndWidth(t *testing.T) {
	tab := report.Table{Name: "results", Ranked: true, Compact: []string{"rank", "part", "total_w", "status", "notes"}}
	for i := 0; i < 45; i++ {
		var r report.Row
		r.Set("rank", report.Num(float64(i+1)))
		r.Set("part", report.Text(strings.Repeat("a-very-long-part-name-", 4)))
		r.Set("total_w", report.Num(1+float64(i)))
		r.Set("status", report.Text("ok"))
		r.Flags = []string{"l-cs"}
		tab.Rows = append(tab.Rows, r)
	}
	rep := &report.Report{Command: "rank", Tables: []report.Table{tab}}
	cases := []struct {
		name  string
		opt   Options
		rows  int
		more  string
		width int
	}{
		{"default", Options{}, report.DefaultLimit, "… and 25 parts more", DefaultWidth},
		{"all", Options{All: true}, 45, "", DefaultWidth},
		{"a narrow terminal", Options{Width: 60}, report.DefaultLimit, "… and 25 parts more", 60},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var b bytes.Buffer
			if err := Write(&b, rep, c.opt); err != nil {
				t.Fatal(err)
			}
			out := b.String()
			if n := strings.Count(out, " ok "); n != c.rows {
				t.Errorf("%d rows, want %d", n, c.rows)
			}
			if c.more != "" && !strings.Contains(out, c.more) || c.more == "" && strings.Contains(out, "more") {
				t.Errorf("more line: %s", out)
			}
			for _, l := range strings.Split(out, "\n") {
				if utf8.RuneCountInString(l) > c.width {
					t.Errorf("line of %d columns: %q", utf8.RuneCountInString(l), l)
				}
			}
		})
	}
}
