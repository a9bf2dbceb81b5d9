package extent

import (
	"syscall"
	"testing"
)

// unlimited is RLIM_INFINITY as a uint64 (syscall gives it as -1).
const unlimited = ^uint64(0)

// TestAddressSpaceLimit: the soft limit of address space (RLIMIT_AS, what
// ulimit -v sets) in bytes, 0 when unlimited. The test sets a large
// finite soft limit (32 TiB, far above what the test uses) and puts the
// old one back.
func TestAddressSpaceLimit(t *testing.T) {
	var old syscall.Rlimit
	if err := syscall.Getrlimit(syscall.RLIMIT_AS, &old); err != nil {
		t.Fatal(err)
	}
	defer syscall.Setrlimit(syscall.RLIMIT_AS, &old)
	if old.Cur == unlimited {
		if got := AddressSpaceLimit(); got != 0 {
			t.Errorf("unlimited: %d, want 0", got)
		}
	}
	const lim = 32 << 40
	if old.Max != unlimited && old.Max < lim {
		t.Fatalf("the hard limit %d is below the test's %d", old.Max, uint64(lim))
	}
	if err := syscall.Setrlimit(syscall.RLIMIT_AS, &syscall.Rlimit{Cur: lim, Max: old.Max}); err != nil {
		t.Fatal(err)
	}
	if got := AddressSpaceLimit(); got != lim {
		t.Errorf("limit %d: got %d", int64(lim), got)
	}
}
