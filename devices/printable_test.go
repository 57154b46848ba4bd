package devices

import "testing"

// TestPrintable checks the escapes of control characters, as strconv.Quote
// writes them (the Go specification's escapes), with printable Unicode
// kept. The terminal sequences are those of ECMA-48 (ESC, CSI, OSC).
func TestPrintable(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"FX30A", "FX30A"},
		{"4.5 mΩ µ-part", "4.5 mΩ µ-part"},
		{"a\tb", `a\tb`},
		{"cr\rlf\n", `cr\rlf\n`},
		{"\x1b]0;owned\x07\x1b[2J", `\x1b]0;owned\a\x1b[2J`}, // OSC retitle, then erase display
		{"\u009b2J", `\u009b2J`},                             // C1 CSI
		{"del\x7f", `del\x7f`},
		{"abc\u202egpj.exe", `abc\u202egpj.exe`}, // right-to-left override
		{"bad\xffutf8", `bad\xffutf8`},
		{`back\slash`, `back\slash`},
		{"=1+2", "=1+2"},
		{"", ""},
	} {
		if got := Printable(c.in); got != c.want {
			t.Errorf("Printable(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}
