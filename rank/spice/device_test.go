package spice

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// LoadDevice on invented model files: a card, a subcircuit, the
// compatibility mode a file asks for, and each error naming the file.
func TestLoadDevice(t *testing.T) {
	dir := t.TempDir()
	files := map[string]string{
		"card.lib":  "* invented\n.model c1 VDMOS(vto=2 kp=10\n+ rd=1m)\n",
		"two.lib":   ".model a VDMOS(vto=2)\n.model b vdmos (vto=2)\n",
		"none.lib":  ".model d1 D(is=1e-12)\n",
		"sub.lib":   "* ngbehavior=ps\n.subckt S1 d g s k params: x=1\nm1 d g s s c\n.ends\n",
		"bad.lib":   "* ngbehavior=xyz\n.model c1 VDMOS(vto=2)\n",
		"empty.lib": "",
	}
	for n, s := range files {
		if err := os.WriteFile(filepath.Join(dir, n), []byte(s), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	cases := []struct {
		file, subckt, pins string
		name, compat, err  string
	}{
		{"card.lib", "", "", "c1", "", ""},
		{"sub.lib", "s1", "d g s k", "S1", "ps", ""},
		{"two.lib", "", "", "", "", "2 VDMOS cards (a, b)"},
		{"none.lib", "", "", "", "", "no .model NAME VDMOS(...) card"},
		{"sub.lib", "s1", "d g s", "", "", "sub.lib:2: subcircuit S1 has 4 pins (d g s k) but spice_pins lists 3 (d g s)"},
		{"sub.lib", "s2", "d g s", "", "", "no .subckt s2"},
		{"sub.lib", "s1", "d g x k", "", "", `pin "x" is not d, g, s or k`},
		{"bad.lib", "", "", "", "", "bad.lib:1: ngbehavior=xyz: not an ngspice compatibility mode"},
		{"absent.lib", "", "", "", "", "absent.lib: no such file or directory"},
		{"empty.lib", "", "", "", "", "no .model NAME VDMOS"},
	}
	for _, c := range cases {
		t.Run(c.file+"/"+c.subckt+c.pins, func(t *testing.T) {
			d, err := LoadDevice(filepath.Join(dir, c.file), c.subckt, c.pins)
			if c.err != "" {
				if err == nil || !strings.Contains(err.Error(), c.err) || !errors.Is(err, ErrModel) || !strings.Contains(err.Error(), c.file) {
					t.Errorf("err %v, want %q naming %s", err, c.err, c.file)
				}
				return
			}
			if err != nil || d.Name != c.name || d.Compat != c.compat {
				t.Errorf("%+v, %v; want name %s, compat %q", d, err, c.name, c.compat)
			}
		})
	}
}

// A subcircuit is placed with its pins in the file's order, the Kelvin
// pin on the driver return; a card as an M line.
func TestInstance(t *testing.T) {
	card := &Device{Name: "c1"}
	if l, k := card.instance("0", "d", "g", "s", "k"); l != "m0 d g s c1\n" || k {
		t.Errorf("card: %q %v", l, k)
	}
	sub := &Device{Name: "S1", Subckt: true, Pins: []string{"g", "k", "d", "s"}}
	if l, k := sub.instance("1", "d", "g", "s", "k"); l != "x1 g k d s S1\n" || !k {
		t.Errorf("subcircuit: %q %v", l, k)
	}
}
