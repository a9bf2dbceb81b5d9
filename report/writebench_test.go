package report

import (
	"os"
	"path/filepath"
	"runtime/debug"
	"syscall"
	"testing"
	"time"

	"areasweep/report/outfile"
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

// BenchmarkRenderStudy renders each figure of the results.json named by
// AREASWEEP_BENCH_RESULTS (skipped otherwise) in each format, one at a
// time, with the process CPU time of each as cpu-ns/op.
func BenchmarkRenderStudy(b *testing.B) {
	r := benchResults(b)
	if err := Analyze(r); err != nil {
		b.Fatal(err)
	}
	for _, f := range figures(r) {
		for _, format := range figureFormats {
			b.Run(f.Name+"/"+format, func(b *testing.B) {
				var cpu time.Duration
				for b.Loop() {
					c0 := processCPU()
					data, err := render(f, format)
					if err != nil {
						b.Fatal(err)
					}
					cpu += processCPU() - c0
					if format != "svg" {
						outBuffers.put(data)
					}
				}
				b.ReportMetric(float64(cpu)/float64(b.N), "cpu-ns/op")
			})
		}
	}
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

// BenchmarkEncodeStudy times writing results.json as a run does
// (Results.EncodeTo into a file) for the results.json named by
// AREASWEEP_BENCH_RESULTS (skipped otherwise), with cpu-ns/op as in
// BenchmarkWriteStudy but of the writing alone. The heap's free memory is
// given back to the system before each write (untimed), so that, as in a
// run, the write's buffers are fresh memory: in-process repetitions would
// otherwise reuse the previous write's pages.
func BenchmarkEncodeStudy(b *testing.B) {
	r := benchResults(b)
	path := filepath.Join(b.TempDir(), "results.json")
	b.ReportAllocs()
	var cpu time.Duration
	for b.Loop() {
		b.StopTimer()
		debug.FreeOSMemory()
		b.StartTimer()
		c0 := processCPU()
		if err := outfile.WriteFrom(path, 0o666, r.EncodeTo); err != nil {
			b.Fatal(err)
		}
		cpu += processCPU() - c0
	}
	b.ReportMetric(float64(cpu)/float64(b.N), "cpu-ns/op")
}
