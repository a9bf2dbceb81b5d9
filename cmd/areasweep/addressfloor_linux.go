package main

/*
#include <stdio.h>
#include <sys/resource.h>
#include <unistd.h>

// Keep in step with minAddressSpace.
#define AREASWEEP_MIN_ADDRESS_SPACE (2ULL << 30)

// In supervise_linux.go.
extern void areasweepSupervise(unsigned long long limit);

// Keep in step with minOpenFiles.
#define AREASWEEP_MIN_OPEN_FILES 64

// areasweepAddressFloor runs when the program is loaded, before Go's
// runtime starts: see minOpenFiles and minAddressSpace.
__attribute__((constructor)) static void areasweepAddressFloor(void) {
	struct rlimit r;
	if (getrlimit(RLIMIT_NOFILE, &r) == 0 && r.rlim_max != RLIM_INFINITY && r.rlim_max < AREASWEEP_MIN_OPEN_FILES) {
		fprintf(stderr,
			"areasweep: the process may have at most %llu files open at once (its hard limit of open files, ulimit -Hn), and areasweep needs at least %d "
			"(GDAL's handles on the rasters, one per worker, its layers and PROJ's database); "
			"start it where that limit is higher (ulimit -n %d in a new shell, or ask the system's administrator, or a cluster job that asks for more)\n",
			(unsigned long long)r.rlim_max, AREASWEEP_MIN_OPEN_FILES, 1024);
		_exit(2);
	}
	if (getrlimit(RLIMIT_AS, &r) != 0 || r.rlim_cur == RLIM_INFINITY) {
		return;
	}
	if (r.rlim_cur >= AREASWEEP_MIN_ADDRESS_SPACE) {
		// Go's runtime would meet the limit with a crash report:
		// watched, the program ends with a message instead.
		areasweepSupervise((unsigned long long)r.rlim_cur);
		return;
	}
	fprintf(stderr,
		"areasweep: the process may reserve at most %llu MiB of address space (its limit of virtual memory: ulimit -v, or a cluster job's such as h_vmem), "
		"and areasweep needs at least %llu MiB to start: Go's runtime, GDAL and the C heap reserve most of it without using it. "
		"Raise the limit (ulimit -v %llu, in KiB; more for large rasters, as a warning then says) or remove it (ulimit -v unlimited); "
		"a limit of resident memory (a cgroup's, as SLURM's --mem sets) does not count reserved space",
		(unsigned long long)r.rlim_cur >> 20, AREASWEEP_MIN_ADDRESS_SPACE >> 20, AREASWEEP_MIN_ADDRESS_SPACE >> 10);
	if (r.rlim_max != RLIM_INFINITY && r.rlim_max < AREASWEEP_MIN_ADDRESS_SPACE) {
		// The hard limit is below the floor too: ulimit -v cannot raise
		// the soft limit past it (only root can raise a hard limit), so
		// the advice above alone would fail.
		fprintf(stderr,
			"; its hard limit (ulimit -Hv) is %llu MiB, which only the system's administrator, or a cluster job that asks for more, can raise",
			(unsigned long long)r.rlim_max >> 20);
	}
	fputc('\n', stderr);
	_exit(2);
}
*/
import "C"

// minOpenFiles is the least hard limit of open files (RLIMIT_NOFILE:
// ulimit -Hn) under which areasweep starts, checked when the program is
// loaded: below it the process exits with code 2 and a message before
// reading or writing anything. A soft limit below it is no matter: Go's
// runtime raises the soft limit to the hard one at start. Our choice:
// ten times what the demo's run needs with 2 workers (it finished under
// ulimit -n 20, our measurement), for more models, workers and layers;
// under ulimit -n 8 Go's runtime crashed at start ("eventfd failed"),
// under 12 PROJ's database could not be opened ("Cannot find proj.db"),
// under 16 a run could not write its outputs.
const minOpenFiles = 64

// minAddressSpace is the least limit of address space (RLIMIT_AS: ulimit
// -v, a cluster job's h_vmem) under which areasweep starts, checked when
// the program is loaded, before Go's runtime starts: below it the process
// exits with code 2 and a message saying what to raise, before reading or
// writing anything. Our choice, from measurement (Debian 12, GDAL 3.6, Go
// 1.26, the 2-core VM of the README's figures; the demo's run, --quiet):
// Go's runtime and the C heap reserve about 1.6 GiB of address space
// they do not use, and under lower limits runs stopped with a crash
// report instead of a message. Go's runtime could not start at 900,000
// KiB ("failed to reserve page summary memory"); at 1,500,000 KiB GDAL's
// set-up crashed (SIGSEGV in GDALAllRegister); at 1,600,000 and 1,700,000
// KiB all ten runs, and at 1,800,000 KiB two of five, ended with a crash
// report ("pthread_create failed"); at 1,900,000 KiB and at 2 GiB all six
// finished. Above the floor, a run whose own estimate may not fit warns
// before any work (pipeline's warnAddressSpace).
const minAddressSpace = 2 << 30
