package devices_test

import (
	"bytes"
	"encoding/csv"
	"errors"
	"io"
	"strconv"
	"testing"

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
	benchLoader(b, devices.Check)
}

// BenchmarkScan is the streaming form, keeping no parts.
func BenchmarkScan(b *testing.B) {
	benchLoader(b, func(r io.Reader, name string) (*devices.Library, devices.ProblemList) {
		count := 0
		_, probs := devices.Scan(r, name, func(*devices.Part) error { count++; return nil })
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
