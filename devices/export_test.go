package devices

import "io"

// Hooks for the external benchmark package (devices_test), which cannot be
// internal because it imports devices/synth.

// CheckGocsv is Check with the gocsv decoder.
func CheckGocsv(r io.Reader, name string) (*Library, ProblemList) { return check(r, name, decodeGocsv) }
