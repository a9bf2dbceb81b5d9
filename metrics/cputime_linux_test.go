//go:build linux

package metrics

import (
	"runtime"
	"syscall"
	"time"
)

// rusageThread is Linux's RUSAGE_THREAD.
const rusageThread = 1

// threadCPU returns the CPU time used so far by the calling OS thread, so
// that benchmarks on a shared machine can report throughput per CPU second
// beside wall-clock throughput. The caller must hold runtime.LockOSThread.
func threadCPU() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(rusageThread, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

func lockThread()   { runtime.LockOSThread() }
func unlockThread() { runtime.UnlockOSThread() }
