package report

import (
	"encoding/json"
	"testing"
)

// TestEscapes checks each format's escaping of a library's text: CSV
// keeps the neutralising prefix first (OWASP, "CSV Injection": cells
// starting with = + - @ tab or CR) and is idempotent, numbers stay
// numbers; JSON's guard decodes to the same string (RFC 8259, section 7).
func TestEscapes(t *testing.T) {
	for _, c := range []struct{ in, csv, md string }{
		{"=1+2", "'=1+2", "=1+2"},
		{"\tcmd", `'\tcmd`, `\tcmd`},
		{"\rcmd", `'\rcmd`, `\rcmd`},
		{"-2+3", "'-2+3", "-2+3"},
		{"-2.5", "-2.5", "-2.5"},
		{"1e-3", "1e-3", "1e-3"},
		{"a|b\x1b[2J", `a|b\x1b[2J`, `a\|b\x1b[2J`},
		{"µFET-Ω", "µFET-Ω", "µFET-Ω"},
	} {
		if got := CSVText(c.in); got != c.csv || CSVText(got) != got {
			t.Errorf("CSVText(%q) = %q, want %q (and idempotent)", c.in, got, c.csv)
		}
		if got := MarkdownCell(c.in); got != c.md {
			t.Errorf("MarkdownCell(%q) = %q, want %q", c.in, got, c.md)
		}
	}
	for _, s := range []string{"plain", "del\x7f", "csi\u009b2J", "rlo\u202e", "µΩ", "emoji \U0001F600", "tag \U000E0041"} {
		b, err := json.Marshal(s)
		if err != nil {
			t.Fatal(err)
		}
		g := GuardJSON(b)
		var back string
		if err := json.Unmarshal(g, &back); err != nil || back != s {
			t.Errorf("%q: guarded %s decodes to %q, %v", s, g, back, err)
		}
		for _, c := range g {
			if c == 0x7f || c == 0xc2 && len(s) > 3 && s[:3] == "csi" {
				t.Errorf("%q: raw control left in %s", s, g)
			}
		}
	}
}
