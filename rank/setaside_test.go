package rank_test

import (
	"strings"
	"testing"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank"
	"swrank/rank/internal/testkit"
)

// TestPrepareSetsAside checks that a part whose laws cannot be fitted is
// set aside with its reason, and the others prepared in library order.
func TestPrepareSetsAside(t *testing.T) {
	a, b, c := testkit.CaseDPart(), testkit.CaseDPart(), testkit.CaseDPart()
	a.Name, b.Name, c.Name = "A", "B\x1b[2J", "C"
	b.Line = 7
	b.Qrr, b.QrrHot, b.QrrHotTj = q.Some[q.Charge](10e-9), q.Some[q.Charge](20e-9), q.Some[q.Temperature](25)
	devs, aside := rank.Prepare([]devices.Part{a, b, c})
	if len(devs) != 2 || devs[0].Part.Name != "A" || devs[1].Part.Name != "C" {
		t.Fatalf("devices %d", len(devs))
	}
	if len(aside) != 1 || aside[0].Part != b.Name || aside[0].Line != 7 || !strings.Contains(aside[0].Reason, "qrr_hot") {
		t.Fatalf("set aside %+v", aside)
	}
	if s := aside[0].String(); !strings.HasPrefix(s, `B\x1b[2J (line 7): not evaluated: part "B\x1b[2J": qrr_hot`) {
		t.Errorf("String %q", s)
	}
}
