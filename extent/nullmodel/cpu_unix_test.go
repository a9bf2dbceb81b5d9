//go:build unix

package nullmodel

import (
	"syscall"
	"testing"
)

// cpuNanos returns the process's user plus system CPU time in nanoseconds,
// for benchmarks that report CPU time per cell (other load on the machine
// then does not enter).
func cpuNanos(tb testing.TB) int64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		tb.Fatal(err)
	}
	return ru.Utime.Nano() + ru.Stime.Nano()
}
