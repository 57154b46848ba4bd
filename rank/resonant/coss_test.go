package resonant

import (
	"errors"
	"math"
	"testing"

	q "swrank/devices/quantity"
)

// TestOssEnergy checks E_oss(V) = ∫v·C dv computed from the charge law.
func TestOssEnergy(t *testing.T) {
	// Graded junction: closed form of ∫₀^V Q(v) dv for
	// Q = C_j0·V_j/(1−m)·((1+v/V_j)^{1−m} − 1), derived from the SPICE
	// depletion law (Sze & Ng 2007 ch. 2); E = V·Q(V) − ∫Q.
	junction := func(cj0, vj, m, v float64) float64 {
		k := 1 - m
		qv := cj0 * vj / k * (math.Pow(1+v/vj, k) - 1)
		iq := cj0 * vj / k * (vj/(2-m)*(math.Pow(1+v/vj, 2-m)-1) - v)
		return v*qv - iq
	}
	for _, tc := range []struct {
		name   string
		law    QossFunc
		v      q.Voltage
		want   float64
		source string
	}{
		// By hand: C_oss(48 V) = 500 pF, √ law: Q_oss = 48 nC,
		// E_oss = (2/3)·C·V² = 0.768 µJ (Erickson & Maksimović ch. 4).
		{"√ law, 500 pF at 48 V", SqrtQoss(500e-12, 48), 48, 0.768e-6, "hand calculation from Erickson & Maksimović 2001 ch. 4"},
		{"√ law at 12 V", SqrtQoss(500e-12, 48), 12, 2.0 / 3 * 500e-12 * 2 * 144, "Erickson & Maksimović ch. 4 (C(12 V) = 2·C(48 V))"},
		{"linear", LinearQoss(100e-12), 400, 0.5 * 100e-12 * 400 * 400, "½CV²"},
		{"junction m = 0.5", JunctionQoss(1e-9, 0.7, 0.5), 48, junction(1e-9, 0.7, 0.5, 48), "SPICE depletion law, integrated by hand"},
		{"junction m = 0.33", JunctionQoss(2e-9, 0.5, 0.33), 100, junction(2e-9, 0.5, 0.33, 100), "SPICE depletion law, integrated by hand"},
	} {
		e, err := OssEnergy(tc.law, tc.v)
		if err != nil {
			t.Fatal(err)
		}
		check(t, tc.name, float64(e), tc.want, 1e-6, tc.source)
	}
	check(t, "Q_oss √ law, 500 pF at 48 V", float64(SqrtQoss(500e-12, 48)(48)), 48e-9, 1e-12, "hand calculation from Erickson & Maksimović 2001 ch. 4")
	bad := func(v q.Voltage) q.Charge { return q.Charge(math.NaN()) }
	if _, err := OssEnergy(bad, 10); !errors.Is(err, ErrSpec) {
		t.Errorf("NaN law: got %v, want ErrSpec", err)
	}
	if _, err := OssEnergy(nil, 10); !errors.Is(err, ErrSpec) {
		t.Errorf("nil law: got %v, want ErrSpec", err)
	}
}
