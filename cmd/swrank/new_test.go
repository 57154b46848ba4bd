package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"swrank/devices"
	"swrank/rank/stage"
)

// new writes a starter design and library that work together, whose rows
// pass validation, and refuses to overwrite either file.
func TestNew(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "stage")
	code, out, errOut := runSw(t, "new", dir)
	if code != 0 {
		t.Fatalf("new: exit %d: %s", code, errOut)
	}
	design, parts := filepath.Join(dir, "stage.toml"), filepath.Join(dir, "parts.csv")
	if !strings.Contains(out, design) {
		t.Errorf("output %q does not name %s", out, design)
	}
	lib, err := devices.Load(parts)
	if err != nil {
		t.Fatalf("starter library: %v", err)
	}
	if len(lib.Parts) < 3 || len(lib.Warnings) > 0 {
		t.Errorf("starter library: %d parts, warnings %v", len(lib.Parts), lib.Warnings)
	}
	// From 20 V to 100 V, silicon and GaN.
	lo, hi, techs := 1e9, 0.0, map[devices.Technology]bool{}
	for _, p := range lib.Parts {
		lo, hi = min(lo, float64(p.VdsMax)), max(hi, float64(p.VdsMax))
		techs[p.Technology] = true
	}
	if lo > 20 || hi < 100 || !techs[devices.Silicon] || !techs[devices.GaN] {
		t.Errorf("starter library spans %g V to %g V, technologies %v: want 20 V to 100 V, si and gan", lo, hi, techs)
	}
	// The design states the default ambient, so that leaving the line out
	// changes nothing.
	text, _ := os.ReadFile(design)
	if want := fmt.Sprintf("ta = %q", strconv.FormatFloat(float64(stage.DefaultAmbient), 'g', -1, 64)); !strings.Contains(string(text), want) {
		t.Errorf("starter design lacks %s", want)
	}
	if code, _, errOut := runSw(t, "rank", "--design", design); code != 0 {
		t.Fatalf("rank --design starter: exit %d: %s", code, errOut)
	}
	before, _ := os.ReadFile(design)
	beforeParts, _ := os.ReadFile(parts)

	// A second run refuses, leaving both files as they were.
	code, _, errOut = runSw(t, "new", dir)
	if code == 0 || !strings.Contains(errOut, "already exists") || !strings.Contains(errOut, "never overwrites") {
		t.Errorf("second new: exit %d, %q", code, errOut)
	}
	after, _ := os.ReadFile(design)
	afterParts, _ := os.ReadFile(parts)
	if string(before) != string(after) || string(beforeParts) != string(afterParts) {
		t.Error("new changed an existing file")
	}

	// One of the two present: refuse, and write nothing.
	dir2 := t.TempDir()
	mine := []byte("part,vds_max\n# my own file\n")
	if err := os.WriteFile(filepath.Join(dir2, "parts.csv"), mine, 0o644); err != nil {
		t.Fatal(err)
	}
	if code, _, _ := runSw(t, "new", dir2); code == 0 {
		t.Error("new over an existing parts.csv: exit 0")
	}
	if _, err := os.Stat(filepath.Join(dir2, "stage.toml")); err == nil {
		t.Error("new wrote stage.toml beside an existing parts.csv")
	}
	if got, _ := os.ReadFile(filepath.Join(dir2, "parts.csv")); string(got) != string(mine) {
		t.Error("new changed the existing parts.csv")
	}
	// No temporary files left behind.
	for _, d := range []string{dir, dir2} {
		ents, _ := os.ReadDir(d)
		for _, e := range ents {
			if strings.Contains(e.Name(), ".tmp-") {
				t.Errorf("temporary file %s left in %s", e.Name(), d)
			}
		}
	}
}
