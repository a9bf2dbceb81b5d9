// Package stopsig catches the signals that stop a run (SIGINT, SIGTERM,
// SIGHUP, SIGQUIT) from the program's first moments, so that one arriving while
// the program still sets itself up (GDAL's drivers, the command line) is
// neither lost nor left to the runtime's default, which ends the process
// without the exit code and message of a stopped run. A SIGINT or
// SIGHUP that the parent process ignores (a background job of a
// non-interactive shell, nohup) is caught too, from the same moment, as
// it was before this package existed, once the set-up was done: a stop
// signal stops a run whenever it arrives.
//
// It depends on nothing beyond the standard library's signal handling,
// so its init runs among the first of the program's packages (about 6 ms
// after the Go runtime starts, before GDAL's binding and the report's
// packages). Earlier than that nothing of the program runs: while the
// system loads the shared libraries (GDAL and its ~100 dependencies,
// about 0.1 s on a small machine) a signal meets the disposition the
// parent set: by default it ends the process at once, before anything is
// created (a shell reports 128+N, as for a stopped run); ignored, the
// kernel drops it.
package stopsig

import (
	"os"
	"os/signal"
	"syscall"
)

// caught receives the stop signals; buffered, so that one arriving
// before anyone reads it waits there.
var caught = make(chan os.Signal, 1)

// brokenPipe receives SIGPIPE, and nobody reads it: catching the signal
// makes a write to a pipe whose reader is gone (standard error piped into
// `head`) fail with EPIPE instead of ending the process. A run would
// otherwise die at its next progress line, its outputs unwritten and its
// staging folder left beside --out; it now finishes, the lines kept in
// run.log. Caught rather than ignored, so that a program areasweep starts
// (sbatch) gets the default disposition back.
var brokenPipe = make(chan os.Signal, 1)

func init() {
	Listen()
	signal.Notify(brokenPipe, syscall.SIGPIPE)
}

// Listen catches SIGINT, SIGTERM, SIGHUP and SIGQUIT and returns the
// channel they arrive on. SIGQUIT (Ctrl-\ on a terminal) is a stop like
// the others: left to Go's runtime, it printed every goroutine's stack
// on the terminal, exited 2 (the code of bad input) and left the staging
// folder beside --out. The package's init calls it; calling it again (a command run
// twice in one process, as tests do) after Stop catches them again.
func Listen() <-chan os.Signal {
	signal.Notify(caught, syscall.SIGINT, syscall.SIGTERM, syscall.SIGHUP, syscall.SIGQUIT)
	return caught
}

// Stop stops catching them.
func Stop() {
	signal.Stop(caught)
}
