package spice

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"os"
	"strings"

	"swrank/devices"
)

// Device is a transistor model read from a model file, as swrank verify
// and swrank characterise simulate it.
type Device struct {
	Path   string   // the file as found, for messages
	Text   []byte   // the file's bytes, included in every deck as model.lib
	Name   string   // the .model card's or the subcircuit's name, as written
	Subckt bool     // true: a subcircuit; false: a VDMOS .model card
	Pins   []string // the subcircuit's pins in order (d, g, s, k); nil for a card
	// Compat is the ngspice compatibility mode the file asks for with a
	// comment line "* ngbehavior=MODE" (ps, psa, lt, lta, ltps, ltpsa,
	// hs, hsa, spsa, ki or kia); "" for none.
	Compat string
}

// ErrModel marks a model file that cannot be used: missing, unreadable,
// or not holding what the library row names.
var ErrModel = errors.New("model")

// compatModes are the values of ngspice's ngbehavior variable (ngspice
// manual, "Compatibility").
var compatModes = map[string]bool{"ps": true, "psa": true, "lt": true, "lta": true, "ltps": true, "ltpsa": true,
	"hs": true, "hsa": true, "spsa": true, "ki": true, "kia": true}

// LoadDevice reads the model file at path. With subckt empty the file must
// hold exactly one VDMOS .model card; otherwise it must hold the
// subcircuit subckt, whose pin count must match pins (a spice_pins cell,
// devices.ParsePins). Errors name the file and wrap ErrModel.
func LoadDevice(path, subckt, pins string) (*Device, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("%w file %s: %w", ErrModel, path, unwrapPath(err))
	}
	d := &Device{Path: path, Text: b}
	lines := logicalLines(b)
	for _, l := range lines {
		if c, ok := strings.CutPrefix(strings.TrimSpace(l.text), "*"); ok {
			if _, v, ok := strings.Cut(strings.ReplaceAll(strings.ToLower(c), " ", ""), "ngbehavior="); ok {
				if !compatModes[v] {
					return nil, fmt.Errorf("%w file %s:%d: ngbehavior=%s: not an ngspice compatibility mode", ErrModel, path, l.line, v)
				}
				d.Compat = v
			}
		}
	}
	if subckt == "" {
		var cards []string
		for _, l := range lines {
			f := strings.Fields(strings.ReplaceAll(l.text, "(", " ( "))
			if len(f) >= 3 && strings.EqualFold(f[0], ".model") && strings.EqualFold(f[2], "vdmos") {
				cards = append(cards, f[1])
			}
		}
		switch len(cards) {
		case 0:
			return nil, fmt.Errorf("%w file %s: no .model NAME VDMOS(...) card (a subcircuit needs spice_subckt and spice_pins)", ErrModel, path)
		case 1:
			d.Name = cards[0]
			return d, nil
		}
		return nil, fmt.Errorf("%w file %s: %d VDMOS cards (%s): keep one per file, or name a subcircuit in spice_subckt",
			ErrModel, path, len(cards), strings.Join(cards, ", "))
	}
	want, err := devices.ParsePins(pins)
	if err != nil {
		return nil, fmt.Errorf("%w file %s: spice_pins %w", ErrModel, path, err)
	}
	for _, l := range lines {
		f := strings.Fields(l.text)
		if len(f) < 2 || !strings.EqualFold(f[0], ".subckt") || !strings.EqualFold(f[1], subckt) {
			continue
		}
		var have []string
		for _, p := range f[2:] {
			if strings.Contains(p, "=") || strings.EqualFold(p, "params:") {
				break
			}
			have = append(have, p)
		}
		if len(have) != len(want) {
			return nil, fmt.Errorf("%w file %s:%d: subcircuit %s has %d pins (%s) but spice_pins lists %d (%s)",
				ErrModel, path, l.line, f[1], len(have), strings.Join(have, " "), len(want), strings.Join(want, " "))
		}
		d.Name, d.Subckt, d.Pins = f[1], true, want
		return d, nil
	}
	return nil, fmt.Errorf("%w file %s: no .subckt %s", ErrModel, path, subckt)
}

func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

type logicalLine struct {
	line int // first physical line, 1-based
	text string
}

// logicalLines joins SPICE continuation lines ("+" at the start).
func logicalLines(b []byte) []logicalLine {
	var out []logicalLine
	sc := bufio.NewScanner(bytes.NewReader(b))
	sc.Buffer(make([]byte, 1<<16), 1<<22)
	n := 0
	for sc.Scan() {
		n++
		t := sc.Text()
		if s := strings.TrimSpace(t); strings.HasPrefix(s, "+") && len(out) > 0 {
			out[len(out)-1].text += " " + s[1:]
			continue
		}
		out = append(out, logicalLine{n, t})
	}
	return out
}

// instance returns the deck line that places the device as ref (a name
// such as "c" or "s") with its drain, gate and source on the given nodes
// and its Kelvin source, if any, on kelvin. It reports whether the device
// has a Kelvin pin (otherwise the deck ties kelvin to source).
func (d *Device) instance(ref, drain, gate, source, kelvin string) (string, bool) {
	if !d.Subckt {
		return fmt.Sprintf("m%s %s %s %s %s\n", ref, drain, gate, source, d.Name), false
	}
	nodes := map[string]string{devices.PinDrain: drain, devices.PinGate: gate, devices.PinSource: source, devices.PinKelvin: kelvin}
	var b strings.Builder
	fmt.Fprintf(&b, "x%s", ref)
	k := false
	for _, p := range d.Pins {
		b.WriteString(" " + nodes[p])
		k = k || p == devices.PinKelvin
	}
	fmt.Fprintf(&b, " %s\n", d.Name)
	return b.String(), k
}
