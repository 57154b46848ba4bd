package main

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"swrank/devices"
	"swrank/devices/synth"
	"swrank/rank"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
)

// TestMain lets the benchmarks run the command line in a child process of
// this test binary (to read the process's memory high-water mark).
func TestMain(m *testing.M) {
	if os.Getenv("SWRANK_RUN_MAIN") == "1" {
		code := run(os.Args[1:], os.Stdout, os.Stderr)
		if f := os.Getenv("SWRANK_HWM_FILE"); f != "" {
			// The process's own high-water mark (VmHWM), after exec: the
			// parent's pages do not count, as they can in a forked child's
			// rusage.
			if st, err := os.ReadFile("/proc/self/status"); err == nil {
				for _, line := range strings.Split(string(st), "\n") {
					if strings.HasPrefix(line, "VmHWM:") {
						_ = os.WriteFile(f, []byte(strings.TrimSpace(strings.TrimPrefix(line, "VmHWM:"))), 0o644)
					}
				}
			}
		}
		os.Exit(code)
	}
	os.Exit(m.Run())
}

var libCache sync.Map // n → []byte

// library returns a generated library of n parts (seed 1), made once.
func library(b *testing.B, n int) []byte {
	if v, ok := libCache.Load(n); ok {
		return v.([]byte)
	}
	var buf bytes.Buffer
	if err := synth.Generate(&buf, n, 1); err != nil {
		b.Fatal(err)
	}
	libCache.Store(n, buf.Bytes())
	return buf.Bytes()
}

func readEncodingCSV(data []byte) (int, error) {
	r := csv.NewReader(bytes.NewReader(data))
	r.Comment = '#'
	n := 0
	for {
		_, err := r.Read()
		if err == io.EOF {
			return n, nil
		}
		if err != nil {
			return n, err
		}
		n++
	}
}

var benchStage = []string{"--vin", "48", "--vout", "12", "--iout", "10", "--fsw", "250k", "--vdrive", "10", "--rth-ca", "8"}

// BenchmarkEndToEnd is the whole rank command on an in-memory library:
// parse, validate, evaluate at one operating point, select and sort, render
// the top 20 as a table. Each iteration also reads the same bytes with a
// plain encoding/csv reader (ReuseRecord off) and reports the ratio, so the
// two are measured under the same load. Target (docs/performance.md):
// ratio ≤ 2 at 100k parts.
func BenchmarkEndToEnd(b *testing.B) {
	for _, n := range []int{1000, 10000, 100000} {
		b.Run(fmt.Sprintf("%dk", n/1000), func(b *testing.B) {
			data := library(b, n)
			var in inputs
			fs := newFlagSet("rank", "", io.Discard)
			in.register(fs)
			in.registerOutput(fs)
			if err := fs.Parse(append(benchStage, "--top", "20")); err != nil {
				b.Fatal(err)
			}
			pt, err := in.stage.Resolve()
			if err != nil {
				b.Fatal(err)
			}
			b.SetBytes(int64(len(data)))
			b.ReportAllocs()
			var tCSV, tE2E time.Duration
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				t0 := time.Now()
				if _, err := readEncodingCSV(data); err != nil {
					b.Fatal(err)
				}
				t1 := time.Now()
				best := rank.Best{N: in.top}
				var aside []rank.SetAside
				src, err := rankReader(&in, &pt, bytes.NewReader(data), "bench", &best, &aside, nil, io.Discard)
				if err != nil {
					b.Fatal(err)
				}
				rep := rankingOf(&in, &pt, &best, aside, src)
				if err := writeReport(io.Discard, rep.Report(), &in); err != nil {
					b.Fatal(err)
				}
				t2 := time.Now()
				tCSV += t1.Sub(t0)
				tE2E += t2.Sub(t1)
				if rep.Parts != n {
					b.Fatalf("ranked %d of %d parts", rep.Parts, n)
				}
			}
			b.ReportMetric(float64(tE2E.Nanoseconds())/float64(b.N), "e2e-ns/op")
			b.ReportMetric(float64(tCSV.Nanoseconds())/float64(b.N), "csv-ns/op")
			b.ReportMetric(float64(tE2E)/float64(tCSV), "x-csv")
			b.ReportMetric(float64(tE2E.Nanoseconds())/float64(b.N)/float64(n), "ns/part")
		})
	}
}

// BenchmarkPeakMemory runs the rank command on a generated library file in
// a child process and reports the process's high-water mark against the
// file's size. Target (docs/performance.md): ≤ 3× the CSV size at 100k.
func BenchmarkPeakMemory(b *testing.B) {
	for _, n := range []int{10000, 100000} {
		b.Run(fmt.Sprintf("%dk", n/1000), func(b *testing.B) {
			path := filepath.Join(b.TempDir(), "lib.csv")
			if err := os.WriteFile(path, library(b, n), 0o644); err != nil {
				b.Fatal(err)
			}
			var peak int64
			hwm := filepath.Join(b.TempDir(), "hwm")
			for i := 0; i < b.N; i++ {
				cmd := exec.Command(os.Args[0], append([]string{"rank", "--parts", path, "--top", "20"}, benchStage...)...)
				cmd.Env = append(os.Environ(), "SWRANK_RUN_MAIN=1", "SWRANK_HWM_FILE="+hwm)
				cmd.Stdout, cmd.Stderr = io.Discard, io.Discard
				if err := cmd.Run(); err != nil {
					b.Fatal(err)
				}
				raw, err := os.ReadFile(hwm)
				if err != nil {
					b.Fatal(err)
				}
				var kb int64
				if _, err := fmt.Sscanf(string(raw), "%d kB", &kb); err != nil {
					b.Fatalf("VmHWM %q: %v", raw, err)
				}
				peak = max(peak, kb*1024)
			}
			size := float64(len(library(b, n)))
			b.ReportMetric(float64(peak)/(1<<20), "peak-MiB")
			b.ReportMetric(float64(peak)/size, "x-csv-size")
		})
	}
}

// BenchmarkEvaluate is one part at one operating point, thermal solve
// included (target: ≥ 1,000,000 per second on one core, 0 allocations).
func BenchmarkEvaluate(b *testing.B) {
	lib, err := rankReaderDevices(library(b, 1000))
	if err != nil {
		b.Fatal(err)
	}
	var in inputs
	fs := newFlagSet("rank", "", io.Discard)
	in.register(fs)
	if err := fs.Parse(benchStage); err != nil {
		b.Fatal(err)
	}
	pt, err := in.stage.Resolve()
	if err != nil {
		b.Fatal(err)
	}
	var r evaluate.Result
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		evaluate.EvaluateInto(&r, &pt, &lib[i%len(lib)], nil, nil)
		if r.N == 0 {
			b.Fatal("no result")
		}
	}
	b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "evals/s")
}

// rankReaderDevices loads and prepares a library from memory.
func rankReaderDevices(data []byte) ([]fit.Device, error) {
	lib, err := devices.Read(bytes.NewReader(data), "bench")
	if err != nil {
		return nil, err
	}
	devs := make([]fit.Device, len(lib.Parts))
	for i := range lib.Parts {
		if devs[i], err = fit.Prepare(&lib.Parts[i]); err != nil {
			return nil, err
		}
	}
	return devs, nil
}
