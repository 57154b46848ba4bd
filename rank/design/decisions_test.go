package design

import (
	"slices"
	"testing"
)

// The counts each --parallel value asks for, and the refusals.
func TestParallelCounts(t *testing.T) {
	cases := []struct {
		parallel string
		max      int
		counts   []int
		auto     bool
		bad      bool
	}{
		{"", 4, []int{1}, false, false},
		{"1", 4, []int{1}, false, false},
		{" 3 ", 4, []int{1, 3}, false, false},
		{"auto", 4, []int{1, 2, 3, 4}, true, false},
		{"AUTO", 2, []int{1, 2}, true, false},
		{"auto", 0, nil, false, true},
		{"auto", 65, nil, false, true},
		{"0", 4, nil, false, true},
		{"65", 4, nil, false, true},
		{"two", 4, nil, false, true},
	}
	for _, c := range cases {
		d := Decisions{Parallel: c.parallel, ParallelMax: c.max}
		counts, auto, err := d.ParallelCounts()
		if (err != nil) != c.bad || !slices.Equal(counts, c.counts) || auto != c.auto {
			t.Errorf("--parallel %q --parallel-max %d: %v %v %v", c.parallel, c.max, counts, auto, err)
		}
		if want := c.parallel != "" && c.parallel != "1"; d.Paralleled() != want || d.OwnPath() != want {
			t.Errorf("--parallel %q: paralleled %v, own path %v", c.parallel, d.Paralleled(), d.OwnPath())
		}
	}
}

// Keys are located by line and column, in tables and arrays of tables.
func TestLocateKeys(t *testing.T) {
	src := "parts = \"x.csv\"\n[stage]\n  vin = 12\n[[point]]\n\"iout\" = 3\n[[point]]\nweight = 1\n"
	got := locateKeys([]byte(src))
	want := map[string]keyPos{"parts": {1, 1}, "stage": {2, 1}, "stage.vin": {3, 3}, "point.1": {4, 1},
		"point.1.iout": {5, 1}, "point.2": {6, 1}, "point.2.weight": {7, 1}}
	for k, w := range want {
		if got[k] != w {
			t.Errorf("%s at %v, want %v", k, got[k], w)
		}
	}
}
