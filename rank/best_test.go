package rank

import (
	"fmt"
	"math/rand/v2"
	"slices"
	"testing"

	"swrank/devices"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/internal/testkit"
	"swrank/rank/stage"

	q "swrank/devices/quantity"
)

// Best, fed one part at a time through a reused Part and Device, keeps the
// same leaders in the same order as Rank over the whole library (a property
// of the selection, checked against the full sort; no outside source is
// needed for ordering).
func TestBestMatchesRank(t *testing.T) {
	var devs []fit.Device
	for i := 0; i < 40; i++ {
		p := testkit.HandCasePart()
		p.Name = fmt.Sprintf("part-%02d", i)
		p.RdsOn = q.Resistance(2e-3 + 0.4e-3*float64(i%7))
		p.Qg = q.Charge(4e-9 + 1e-9*float64(i%5))
		if i%9 == 0 {
			p.VdsMax = 12 // screened: 12 V cell above 80 % of rating
		}
		d, err := fit.Prepare(&p)
		if err != nil {
			t.Fatal(err)
		}
		devs = append(devs, d)
	}
	st := stage.Stage{Topology: stage.Buck, Vin: 12, Vout: 1.8, Iout: 8, Fsw: 600e3, Driver: stage.Driver{VOn: 5}}
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	all := Rank(&pt, devs, nil, Options{Workers: 1})
	for _, n := range []int{0, 1, 5} {
		b := Best{N: n}
		var reused fit.Device
		for i := range devs {
			reused = devs[i]
			p := *devs[i].Part
			reused.Part = &p
			r := evaluate.Evaluate(&pt, &reused, nil, nil)
			b.Offer(&r)
			p.Name = "overwritten" // the caller reuses its part
		}
		got := b.Results()
		if b.Passed+b.Screened != len(devs) || b.Screened != 5 {
			t.Errorf("N=%d: counted %d passed, %d screened", n, b.Passed, b.Screened)
		}
		var want []evaluate.Result
		if n == 0 {
			want = all
		} else {
			want = append(append(want, all[:n]...), all[len(all)-b.Screened:len(all)-b.Screened+n]...)
		}
		if len(got) != len(want) {
			t.Fatalf("N=%d: %d results, want %d", n, len(got), len(want))
		}
		for i := range got {
			if got[i].Dev.Part.Name != want[i].Dev.Part.Name || got[i].Losses != want[i].Losses {
				t.Errorf("N=%d #%d: %s, want %s", n, i, got[i].Dev.Part.Name, want[i].Dev.Part.Name)
			}
		}
	}
	// Rank gives the same order whatever the number of workers.
	par := Rank(&pt, devs, nil, Options{Workers: 4})
	for i := range par {
		if par[i].Dev != all[i].Dev {
			t.Fatalf("parallel rank differs at %d", i)
		}
	}
}

// Rank over a library large enough to split among workers gives the same
// results as one worker.
func TestRankParallelIdentical(t *testing.T) {
	parts := make([]fit.Device, 5000)
	for i := range parts {
		p := testkit.HandCasePart()
		p.Name = fmt.Sprintf("p%05d", i)
		p.RdsOn = q.Resistance(2e-3 + 1e-6*float64((i*7919)%5000))
		p.Qg = q.Charge(5e-9 + 1e-12*float64((i*104729)%5000))
		d, err := fit.Prepare(&p)
		if err != nil {
			t.Fatal(err)
		}
		parts[i] = d
	}
	st := stage.Stage{Topology: stage.Buck, Vin: 12, Vout: 1.8, Iout: 8, Fsw: 600e3, Driver: stage.Driver{VOn: 5}}
	pt, _ := st.Resolve()
	one := Rank(&pt, parts, nil, Options{Workers: 1})
	two := Rank(&pt, parts, nil, Options{Workers: 2})
	for i := range one {
		if one[i].Dev != two[i].Dev || one[i].Losses != two[i].Losses {
			t.Fatalf("workers differ at %d: %s vs %s", i, one[i].Dev.Part.Name, two[i].Dev.Part.Name)
		}
	}
}

// sortResults (a permutation applied by its cycles) puts results in the
// order the standard library's sort gives them under CompareRef.
func TestSortResultsInPlace(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, n := range []int{0, 1, 2, 17, 500} {
		devs := make([]fit.Device, n)
		rs := make([]evaluate.Result, n)
		for i := range rs {
			devs[i].Part = &devices.Part{Name: fmt.Sprintf("p%03d", rng.IntN(50))}
			rs[i] = evaluate.Result{Dev: &devs[i], N: 1}
			rs[i].Losses.Conduction = q.Power(rng.IntN(20))
			if rng.IntN(4) == 0 {
				rs[i].Screens = evaluate.ScreenTjMax
			}
		}
		want := slices.Clone(rs)
		slices.SortStableFunc(want, func(a, b evaluate.Result) int { return CompareRef(&a, &b) })
		got := sortResults(rs)
		for i := range got {
			if CompareRef(&got[i], &want[i]) != 0 {
				t.Fatalf("n %d: place %d holds %s %v, want %s %v", n, i, got[i].Dev.Part.Name, got[i].Losses.Total(), want[i].Dev.Part.Name, want[i].Losses.Total())
			}
		}
	}
}
