package report

import "testing"

// CSV cells a spreadsheet would run as formulas are neutralised (OWASP
// CSV-injection guidance); numbers are left alone.
func TestSafeCell(t *testing.T) {
	for _, c := range []struct{ in, want string }{{"-1.5", "-1.5"}, {"=1+1", "'=1+1"}, {"+x", "'+x"}, {"@a", "'@a"}, {"a", "a"}} {
		if got := safeCell(c.in); got != c.want {
			t.Errorf("safeCell(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}
