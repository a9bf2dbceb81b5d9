package report

import (
	"os"
	"syscall"
	"testing"
	"time"
)

// BenchmarkWriteStudy times Write on the results.json named by
// AREASWEEP_BENCH_RESULTS (e.g. a sweepbench run's; skipped otherwise):
// wall time per op and, as cpu-ns/op, the process's CPU time (user and
// system, all threads) per op, the fair measure on a shared machine.
func BenchmarkWriteStudy(b *testing.B) {
	r := benchResults(b)
	if err := Analyze(r); err != nil {
		b.Fatal(err)
	}
	dir := b.TempDir()
	b.ReportAllocs()
	c0 := processCPU()
	for b.Loop() {
		if err := Write(dir, r); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(processCPU()-c0)/float64(b.N), "cpu-ns/op")
}

// benchResults loads the results.json named by AREASWEEP_BENCH_RESULTS and
// skips the benchmark when it names none.
func benchResults(b *testing.B) *Results {
	path := os.Getenv("AREASWEEP_BENCH_RESULTS")
	if path == "" {
		b.Skip("set AREASWEEP_BENCH_RESULTS to a results.json")
	}
	r, err := Load(path)
	if err != nil {
		b.Fatal(err)
	}
	return r
}

// processCPU is the process's user and system CPU time so far.
func processCPU() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// BenchmarkEncodeStudy times Results.Encode (results.json's bytes) on the
// results.json named by AREASWEEP_BENCH_RESULTS (skipped otherwise), with
// cpu-ns/op as in BenchmarkWriteStudy.
func BenchmarkEncodeStudy(b *testing.B) {
	r := benchResults(b)
	b.ReportAllocs()
	c0 := processCPU()
	for b.Loop() {
		if _, err := r.Encode(); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(processCPU()-c0)/float64(b.N), "cpu-ns/op")
}
