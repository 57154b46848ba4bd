package rank

import (
	"fmt"
	"os"
	"testing"

	q "swrank/devices/quantity"
)

func TestTmpGolden(t *testing.T) {
	devs := benchDevices(t, 2000)
	stages := []Stage{
		{Topology: Buck, Vin: 48, Vout: 12, Iout: 10, Fsw: 250e3, Driver: Driver{VOn: 10}},
		{Topology: Buck, Vin: 24, Vout: 5, Iout: 4, Fsw: 300e3, Driver: Driver{VOn: 10}, RthCA: q.Some[q.ThermalResistance](10)},
		{Topology: Buck, Vin: 12, Vout: 3.3, Iout: 3, Fsw: 500e3, Driver: Driver{VOn: 10}},
		{Topology: Boost, Vin: 12, Vout: 48, Iout: 2, Fsw: 200e3, Driver: Driver{VOn: 10}, Ambient: 60},
		{Topology: Buck, Vin: 48, Vout: 12, Iout: 20, Fsw: 100e3, Driver: Driver{VOn: 12, VOff: -3}, RthCA: q.Some[q.ThermalResistance](5)},
	}
	f, _ := os.Create(os.Getenv("GOLDEN"))
	defer f.Close()
	for si, st := range stages {
		pt, err := st.Resolve()
		if err != nil {
			t.Fatal(err)
		}
		for i := range devs {
			r := Evaluate(&pt, &devs[i], nil, nil)
			for j := 0; j < r.N; j++ {
				d := &r.Devices[j]
				fmt.Fprintf(f, "%d %d %d %s %v %.4f %.6g %.3f %x\n", si, i, j, d.Thermal.Status, d.Thermal.Found, float64(d.Thermal.Tj), float64(d.Losses.Total()), d.Thermal.Gain, d.Screens)
			}
		}
	}
}
