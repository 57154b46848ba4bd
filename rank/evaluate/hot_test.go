package evaluate

import (
	"testing"

	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/internal/testkit"
	"swrank/rank/stage"
)

// A part's own hot threshold and diode drop replace the technology's
// default coefficients (docs/second-order.md): by hand, vgs_th 1.8 V at
// 25 °C and 1.26 V at 125 °C give −5.4 mV/K, so 1.53 V at 75 °C; vsd 0.8 V
// and 0.64 V at 125 °C give −1.6 mV/K.
func TestOwnHotThreshold(t *testing.T) {
	p := testkit.HandCasePart()
	p.VgsThHot, p.VgsThHotTj = q.Some[q.Voltage](1.26), q.Some[q.Temperature](125)
	p.VsdHot, p.VsdHotTj = q.Some[q.Voltage](0.64), q.Some[q.Temperature](125)
	d, err := fit.Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	testkit.Near(t, "Vth coefficient", d.VthTC, -5.4e-3, 1e-9)
	testkit.Near(t, "Vth(75 °C)", float64(d.ThresholdAt(75)), 1.53, 1e-9)
	testkit.Near(t, "Vsd coefficient", d.VsdTC, -1.6e-3, 1e-9)
	if !d.VthOwn || !d.VsdOwn {
		t.Errorf("own coefficients not marked: %v %v", d.VthOwn, d.VsdOwn)
	}
	r := Evaluate(ptOf(t, handCaseStage(75)), &d, nil, nil)
	if r.Flags&fit.FlagVthTempDefault != 0 {
		t.Errorf("default-coefficient flag set although the part gives its own")
	}
}

func ptOf(t *testing.T, st stage.Stage) *stage.Point {
	t.Helper()
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	return &pt
}
