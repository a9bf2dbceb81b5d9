package extent

/*
#include <malloc.h>
#include <stdlib.h>
#include <sys/resource.h>

// extentCapArenas runs when the program is loaded, before any thread
// starts: see MallocArenasUnderLimit. The 4 is that constant.
__attribute__((constructor)) static void extentCapArenas(void) {
#ifdef M_ARENA_MAX
	struct rlimit r;
	if (getenv("MALLOC_ARENA_MAX") != NULL) {
		return;
	}
	if (getrlimit(RLIMIT_AS, &r) != 0 || r.rlim_cur == RLIM_INFINITY) {
		return;
	}
	mallopt(M_ARENA_MAX, 4);
#endif
}
*/
import "C"

import "syscall"

// MallocArenasUnderLimit is the number of C heap arenas a process under a
// limit of address space keeps to (our choice), set when the program is
// loaded unless MALLOC_ARENA_MAX says otherwise. glibc gives each thread
// that allocates while another holds the lock an arena of its own, up to
// 8 per core, and each reserves 64 MiB of address space: on the 2-core VM
// of the README's figures a 27-million-cell run reserved 2.15 GiB at its
// peak (VmPeak) for 190 MiB used, and 1.83 GiB with 4 arenas. A limit of
// virtual memory (ulimit -v, a cluster job's h_vmem) counts what is
// reserved, not what is used. Without a limit glibc's default is kept
// (fewer arenas can slow the workers' decoding).
const MallocArenasUnderLimit = 4

// AddressSpaceLimit returns the process's limit of address space in bytes
// (RLIMIT_AS: ulimit -v, or a scheduler's virtual-memory limit), or 0
// when there is none.
func AddressSpaceLimit() int64 {
	var r syscall.Rlimit
	if err := syscall.Getrlimit(syscall.RLIMIT_AS, &r); err != nil || r.Cur > 1<<62 { // RLIM_INFINITY is all ones
		return 0
	}
	return int64(r.Cur)
}
