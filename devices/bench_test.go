package devices_test

import (
	"bytes"
	"encoding/csv"
	"errors"
	"io"
	"math"
	"runtime"
	"strconv"
	"syscall"
	"testing"
	"time"

	"github.com/gocarina/gocsv"

	"swrank/devices"
	"swrank/devices/synth"
)

// library returns a generated library of n parts.
func library(b *testing.B, n int) []byte {
	b.Helper()
	var buf bytes.Buffer
	if err := synth.Generate(&buf, n, 1); err != nil {
		b.Fatal(err)
	}
	return buf.Bytes()
}

var sizes = []int{10_000, 100_000}

func name(n int) string { return strconv.Itoa(n/1000) + "k" }

// BenchmarkReadEncodingCSV is the baseline: encoding/csv reading every
// record of the same bytes (ReuseRecord off), nothing decoded.
func BenchmarkReadEncodingCSV(b *testing.B) {
	for _, n := range sizes {
		buf := library(b, n)
		b.Run(name(n), func(b *testing.B) {
			b.SetBytes(int64(len(buf)))
			b.ReportAllocs()
			for b.Loop() {
				cr := csv.NewReader(bytes.NewReader(buf))
				cr.Comment = '#'
				cr.FieldsPerRecord = -1
				rows := 0
				for {
					_, err := cr.Read()
					if errors.Is(err, io.EOF) {
						break
					}
					if err != nil {
						b.Fatal(err)
					}
					rows++
				}
				if rows != n+1 {
					b.Fatalf("%d rows", rows)
				}
			}
		})
	}
}

// BenchmarkReadGocsv is the loader with gocsv's reflective unmarshal: parse
// and validate the whole library.
func BenchmarkReadGocsv(b *testing.B) {
	benchLoader(b, devices.CheckGocsv)
}

// BenchmarkReadFast is the loader as Read and Check use it: the decoder
// driven by Part's tags, streaming rows.
func BenchmarkReadFast(b *testing.B) {
	benchLoader(b, devices.ReadOptions{}.Check)
}

// BenchmarkReadSequential is Check with the tag-driven decoder on one
// goroutine.
func BenchmarkReadSequential(b *testing.B) {
	benchLoader(b, devices.CheckSequential)
}

// BenchmarkGocsvUnmarshal is gocsv's own fastest path on the same bytes,
// for the record: gocsv.UnmarshalCSV from an encoding/csv reader into a
// slice of Part, with no validation and no located problems.
func BenchmarkGocsvUnmarshal(b *testing.B) {
	for _, n := range sizes {
		buf := library(b, n)
		b.Run(name(n), func(b *testing.B) {
			b.SetBytes(int64(len(buf)))
			b.ReportAllocs()
			for b.Loop() {
				var parts []devices.Part
				if err := gocsv.UnmarshalCSV(csv.NewReader(bytes.NewReader(buf)), &parts); err != nil || len(parts) != n {
					b.Fatalf("%d parts, %v", len(parts), err)
				}
			}
		})
	}
}

// BenchmarkScan is the streaming form, keeping no parts.
func BenchmarkScan(b *testing.B) {
	benchLoader(b, func(r io.Reader, name string) (*devices.Library, devices.ProblemList) {
		count := 0
		_, probs := (devices.ReadOptions{}).Scan(r, name, func(*devices.Part) error { count++; return nil })
		return &devices.Library{Parts: make([]devices.Part, count)}, probs
	})
}

func benchLoader(b *testing.B, read func(io.Reader, string) (*devices.Library, devices.ProblemList)) {
	for _, n := range sizes {
		buf := library(b, n)
		b.Run(name(n), func(b *testing.B) {
			b.SetBytes(int64(len(buf)))
			b.ReportAllocs()
			for b.Loop() {
				lib, probs := read(bytes.NewReader(buf), "bench.csv")
				if len(probs) != 0 || len(lib.Parts) != n {
					b.Fatalf("%d parts, problems %v", len(lib.Parts), probs)
				}
			}
		})
	}
}

// BenchmarkReadRatio interleaves the baseline (encoding/csv reading every
// record) and the loader (Check, parse and validate) on the same 100k-part
// buffer and reports their ratio, by wall time and by process CPU time,
// taking the fastest run of each: on a machine shared with other work the
// ratio of interleaved runs is steadier than two separate benchmarks.
func BenchmarkReadRatio(b *testing.B) {
	buf := library(b, 100_000)
	baseline := func() {
		cr := csv.NewReader(bytes.NewReader(buf))
		cr.Comment = '#'
		cr.FieldsPerRecord = -1
		for {
			if _, err := cr.Read(); err != nil {
				if !errors.Is(err, io.EOF) {
					b.Fatal(err)
				}
				return
			}
		}
	}
	loaders := []struct {
		name string
		run  func()
	}{
		{"check", func() {
			if _, probs := (devices.ReadOptions{}).Check(bytes.NewReader(buf), "bench.csv"); len(probs) > 0 {
				b.Fatal(probs)
			}
		}},
		{"scan", func() {
			if _, probs := (devices.ReadOptions{}).Scan(bytes.NewReader(buf), "bench.csv", func(*devices.Part) error { return nil }); len(probs) > 0 {
				b.Fatal(probs)
			}
		}},
		{"check-sequential", func() {
			if _, probs := devices.CheckSequential(bytes.NewReader(buf), "bench.csv"); len(probs) > 0 {
				b.Fatal(probs)
			}
		}},
		{"scan-sequential", func() {
			if _, probs := devices.ScanSequential(bytes.NewReader(buf), "bench.csv", func(*devices.Part) error { return nil }); len(probs) > 0 {
				b.Fatal(probs)
			}
		}},
	}
	for _, l := range loaders {
		b.Run(l.name, func(b *testing.B) {
			minWall := [2]time.Duration{math.MaxInt64, math.MaxInt64}
			minCPU := [2]time.Duration{math.MaxInt64, math.MaxInt64}
			for b.Loop() {
				for k, f := range []func(){baseline, l.run} {
					runtime.GC()
					c0, w0 := cpuTime(), time.Now()
					f()
					w, c := time.Since(w0), cpuTime()-c0
					minWall[k], minCPU[k] = min(minWall[k], w), min(minCPU[k], c)
				}
			}
			b.ReportMetric(float64(minWall[1])/float64(minWall[0]), "x-wall")
			b.ReportMetric(float64(minCPU[1])/float64(minCPU[0]), "x-cpu")
			b.ReportMetric(float64(minWall[0].Milliseconds()), "csv-ms")
			b.ReportMetric(float64(minWall[1].Milliseconds()), "loader-ms")
		})
	}
}

// cpuTime is the process's user and system CPU time.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// BenchmarkReadDecimalComma is BenchmarkReadSequential on the same
// library saved as a spreadsheet does where the comma is the decimal
// separator: semicolons between cells, decimal commas in the numbers.
func BenchmarkReadDecimalComma(b *testing.B) {
	for _, n := range sizes[:1] {
		plain := library(b, n)
		eu := bytes.ReplaceAll(bytes.ReplaceAll(plain, []byte(","), []byte(";")), []byte("."), []byte(","))
		for _, c := range []struct {
			name string
			data []byte
		}{{"plain", plain}, {"semicolon-decimal-comma", eu}} {
			b.Run(name(n)+"/"+c.name, func(b *testing.B) {
				b.SetBytes(int64(len(c.data)))
				b.ReportAllocs()
				for b.Loop() {
					lib, probs := devices.CheckSequential(bytes.NewReader(c.data), "lib.csv")
					if probs.Fatal() || len(lib.Parts) != n {
						b.Fatalf("%d parts: %v", len(lib.Parts), probs.Fatals())
					}
				}
			})
		}
	}
}
