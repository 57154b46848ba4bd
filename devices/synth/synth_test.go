package synth

import (
	"bytes"
	"testing"

	"swrank/devices"
)

// TestGenerate checks that 1000 generated parts load with no problem at all
// and that the same seed gives the same bytes (a different seed others).
func TestGenerate(t *testing.T) {
	var a, b, c bytes.Buffer
	if err := Generate(&a, 1000, 7); err != nil {
		t.Fatal(err)
	}
	if err := Generate(&b, 1000, 7); err != nil {
		t.Fatal(err)
	}
	if err := Generate(&c, 1000, 8); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Error("same seed, different bytes")
	}
	if bytes.Equal(a.Bytes(), c.Bytes()) {
		t.Error("different seeds, same bytes")
	}
	lib, probs := (devices.ReadOptions{}).Check(bytes.NewReader(a.Bytes()), "synth.csv")
	if len(probs) != 0 {
		n := min(len(probs), 20)
		t.Fatalf("%d problems, first %d:\n%v", len(probs), n, probs[:n])
	}
	if len(lib.Parts) != 1000 || len(lib.Columns) != len(devices.Columns()) {
		t.Fatalf("%d parts, %d columns", len(lib.Parts), len(lib.Columns))
	}
	// Every column filled on every row.
	for _, p := range lib.Parts {
		if !p.IdPulse.OK || !p.QrrHot.OK || !p.Lloop.OK || !p.EossLoss.OK || !p.RdsDyn.OK || p.RdsCurve == "" || !p.Price.OK || p.Package == "" {
			t.Fatalf("%s: a column is blank: %+v", p.Name, p)
		}
	}
	if err := Generate(&a, -1, 1); err == nil {
		t.Error("negative count accepted")
	}
}
