package rank

import (
	"strconv"

	"swrank/devices"
	"swrank/rank/fit"
)

// SetAside is a library part that is not evaluated, with the reason: the
// models' laws cannot be fitted to its values (fit.Prepare's error). A
// part set aside costs only itself: the others are ranked.
type SetAside struct {
	Part   string // the part's name as the library writes it
	Line   int    // its file line (0: not from a file)
	Reason string // why, e.g. "part \"X\": rds_on_vgs must exceed vgs_th"
}

// String prints "NAME (line N): not evaluated: REASON", control characters
// escaped.
func (s SetAside) String() string {
	at := ""
	if s.Line > 0 {
		at = " (line " + strconv.Itoa(s.Line) + ")"
	}
	return devices.Printable(s.Part + at + ": not evaluated: " + s.Reason)
}

// Prepare fits every part of parts (fit.Prepare) and returns the devices
// in library order; a part that cannot be fitted is set aside with the
// reason instead of stopping the others. The devices point into parts.
func Prepare(parts []devices.Part) ([]fit.Device, []SetAside) {
	devs := make([]fit.Device, 0, len(parts))
	var aside []SetAside
	for i := range parts {
		d, err := fit.Prepare(&parts[i])
		if err != nil {
			aside = append(aside, SetAside{Part: parts[i].Name, Line: parts[i].Line, Reason: err.Error()})
			continue
		}
		devs = append(devs, d)
	}
	return devs, aside
}
