//go:build !unix

package nullmodel

import "testing"

// cpuNanos is 0 where getrusage is not available: the benchmarks then
// report no CPU time.
func cpuNanos(testing.TB) int64 { return 0 }
