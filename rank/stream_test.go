package rank

import (
	"bytes"
	"fmt"
	"reflect"
	"testing"

	"swrank/devices"
	"swrank/devices/synth"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// A Stream on any number of workers keeps the same results, counts and
// parts set aside, in the same order, as one goroutine preparing,
// evaluating and offering each part in turn.
func TestStreamMatchesSequential(t *testing.T) {
	var buf bytes.Buffer
	if err := synth.Generate(&buf, 1500, 3); err != nil {
		t.Fatal(err)
	}
	lib, err := devices.Read(&buf, "synth")
	if err != nil {
		t.Fatal(err)
	}
	parts := lib.Parts
	for i := 7; i < len(parts); i += 97 {
		parts[i].RdsOnVgs = parts[i].VgsTh / 2 // cannot be prepared: set aside
	}
	st := stage.Stage{Topology: stage.Buck, Vin: 48, Vout: 12, Iout: 10, Fsw: 250e3, Driver: stage.Driver{VOn: 10}}
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []int{0, 1, 20} {
		want := Best{N: n}
		var wantAside []SetAside
		for i := range parts {
			p := parts[i]
			d, err := fit.Prepare(&p)
			if err != nil {
				wantAside = append(wantAside, SetAside{Part: p.Name, Line: p.Line, Reason: err.Error()})
				continue
			}
			r := evaluate.Evaluate(&pt, &d, nil, nil)
			want.Offer(&r)
		}
		if len(wantAside) == 0 || want.Screened == 0 || want.Passed == 0 {
			t.Fatalf("the library should hold parts set aside, screened and passing: %d, %d, %d", len(wantAside), want.Screened, want.Passed)
		}
		for _, workers := range []int{1, 2, 3, 8} {
			t.Run(fmt.Sprintf("N=%d/workers=%d", n, workers), func(t *testing.T) {
				got := Best{N: n}
				s := NewStream(&pt, nil, &got, Options{Workers: workers})
				var p devices.Part
				for i := range parts {
					p = parts[i] // the caller reuses its part
					s.Add(&p)
					p.Name = "overwritten"
				}
				aside := s.Close()
				if got.Passed != want.Passed || got.Screened != want.Screened {
					t.Errorf("counted %d passed, %d screened; want %d, %d", got.Passed, got.Screened, want.Passed, want.Screened)
				}
				if !reflect.DeepEqual(aside, wantAside) {
					t.Errorf("set aside %v, want %v", aside, wantAside)
				}
				g, w := got.Results(), want.Results()
				if len(g) != len(w) {
					t.Fatalf("kept %d results, want %d", len(g), len(w))
				}
				for i := range g {
					if !reflect.DeepEqual(g[i], w[i]) {
						t.Fatalf("result %d: %s %g, want %s %g", i, g[i].Dev.Part.Name, float64(g[i].Losses.Total()), w[i].Dev.Part.Name, float64(w[i].Losses.Total()))
					}
				}
			})
		}
	}
}
