package devices

import "io"

// Hooks for the external benchmark package (devices_test), which cannot be
// internal because it imports devices/synth.

// CheckGocsv is Check with the gocsv decoder.
func CheckGocsv(r io.Reader, name string) (*Library, ProblemList) {
	return check(r, name, decodeGocsv, ReadOptions{})
}

// CheckSequential is Check with the tag-driven decoder on one goroutine.
func CheckSequential(r io.Reader, name string) (*Library, ProblemList) {
	return check(r, name, decodeFast, ReadOptions{})
}

// ScanSequential is Scan on one goroutine.
func ScanSequential(r io.Reader, name string, fn func(*Part) error) (Header, ProblemList) {
	l := newLoader(name, fn, ReadOptions{})
	l.sizeHint = sizeOf(r)
	return l.scan(r, decodeFast)
}
