//go:build !linux

package metrics

import "time"

// threadCPU is unavailable here; benchmarks then report wall-clock
// throughput only.
func threadCPU() time.Duration { return 0 }

func lockThread()   {}
func unlockThread() {}
