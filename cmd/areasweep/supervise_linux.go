package main

/*
#include <errno.h>
#include <fcntl.h>
#include <poll.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/prctl.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/types.h>
#include <sys/wait.h>
#include <unistd.h>

// areasweepStderrTerminal is 1 in the supervised program when its
// standard error, now the supervisor's pipe, was a terminal.
int areasweepStderrTerminal = 0;

static volatile pid_t areasweepChild = 0;

static void areasweepForward(int sig) {
	if (areasweepChild > 0) {
		kill(areasweepChild, sig);
	}
}

// The beginnings of the lines with which a crash report starts: Go's
// runtime (a fatal error, a panic no code recovered, a signal in C code),
// the C++ runtime and the C library's heap checks.
static const char *areasweepMarkers[] = {
	"fatal error: ", "panic: ", "runtime: ", "runtime/cgo: ", "SIGSEGV", "SIGBUS", "SIGABRT",
	"SIGILL", "SIGFPE", "SIGTRAP", "unexpected fault address", "terminate called",
	"malloc(): ", "free(): ", "double free", "corrupted ", NULL,
};

#define AREASWEEP_MARKER_MAX 32

// areasweepMarks returns 2 when line (n bytes) starts with a marker, 1
// when it is a beginning of one still (too short to tell), 0 otherwise.
static int areasweepMarks(const char *line, size_t n) {
	int maybe = 0;
	for (int i = 0; areasweepMarkers[i] != NULL; i++) {
		size_t m = strlen(areasweepMarkers[i]);
		size_t k = n < m ? n : m;
		if (memcmp(line, areasweepMarkers[i], k) == 0) {
			if (n >= m) {
				return 2;
			}
			maybe = 1;
		}
	}
	return maybe;
}

static void areasweepWriteAll(int fd, const char *b, size_t n) {
	while (n > 0) {
		ssize_t w = write(fd, b, n);
		if (w < 0) {
			if (errno == EINTR) {
				continue;
			}
			return; // standard error is gone: nothing to tell
		}
		b += w;
		n -= (size_t)w;
	}
}

// The supervisor's state: the beginning of the current line, held until
// it is known not to start a crash report; whether the rest of the line is
// being relayed; the report once one has started (crashed).
static char areasweepLine[AREASWEEP_MARKER_MAX];
static size_t areasweepLineLen = 0;
static int areasweepRelaying = 0, areasweepCrashed = 0;
static char *areasweepReport = NULL;
static size_t areasweepReportLen = 0, areasweepReportCap = 0;

// areasweepKeep adds n bytes to the crash report (at most 16 MiB of it).
static void areasweepKeep(const char *b, size_t n) {
	const size_t most = 16 << 20;
	areasweepCrashed = 1;
	if (areasweepReportLen + n > most) {
		n = most > areasweepReportLen ? most - areasweepReportLen : 0;
	}
	if (areasweepReportLen + n > areasweepReportCap) {
		size_t c = areasweepReportCap ? 2 * areasweepReportCap : 65536;
		while (c < areasweepReportLen + n) {
			c *= 2;
		}
		char *r = realloc(areasweepReport, c);
		if (r == NULL) {
			return;
		}
		areasweepReport = r;
		areasweepReportCap = c;
	}
	memcpy(areasweepReport + areasweepReportLen, b, n);
	areasweepReportLen += n;
}

// areasweepFeed relays n bytes the program wrote to standard error, line
// by line as they come, holding each line's first bytes until they show
// it does not start a crash report, and keeps everything from the line
// that starts one on.
static void areasweepFeed(const char *b, size_t n) {
	size_t i = 0;
	while (i < n) {
		if (areasweepCrashed) {
			areasweepKeep(b + i, n - i);
			return;
		}
		if (areasweepRelaying) {
			size_t j = i;
			while (j < n && b[j] != '\n' && b[j] != '\r') {
				j++;
			}
			if (j == n) {
				areasweepWriteAll(2, b + i, n - i);
				return;
			}
			areasweepWriteAll(2, b + i, j + 1 - i);
			areasweepRelaying = 0;
			i = j + 1;
			continue;
		}
		char c = b[i++];
		areasweepLine[areasweepLineLen++] = c;
		int m = areasweepMarks(areasweepLine, areasweepLineLen);
		if (m == 2) {
			areasweepKeep(areasweepLine, areasweepLineLen);
			areasweepLineLen = 0;
		} else if (m == 0 || c == '\n' || c == '\r' || areasweepLineLen == AREASWEEP_MARKER_MAX) {
			areasweepWriteAll(2, areasweepLine, areasweepLineLen);
			areasweepRelaying = !(c == '\n' || c == '\r');
			areasweepLineLen = 0;
		}
	}
}

// areasweepMentions reports whether the kept report holds s.
static int areasweepMentions(const char *s) {
	size_t m = strlen(s);
	for (size_t i = 0; i + m <= areasweepReportLen; i++) {
		if (memcmp(areasweepReport + i, s, m) == 0) {
			return 1;
		}
	}
	return 0;
}

// areasweepOwnEnd reports whether the kept text's last line is one of the
// program's own messages ("areasweep: ..."), as a run refused (exit 2)
// ends, and no crash report does.
static int areasweepOwnEnd(void) {
	size_t e = areasweepReportLen;
	while (e > 0 && (areasweepReport[e - 1] == '\n' || areasweepReport[e - 1] == '\r')) {
		e--;
	}
	size_t b = e;
	while (b > 0 && areasweepReport[b - 1] != '\n' && areasweepReport[b - 1] != '\r') {
		b--;
	}
	return e - b >= 11 && memcmp(areasweepReport + b, "areasweep: ", 11) == 0;
}

// areasweepSaveReport writes the kept report into a new folder
// areasweep-crash-XXXXXX under TMPDIR (else /tmp), as run.log, and
// returns its path, or NULL.
static char *areasweepSaveReport(void) {
	static char dir[4096], path[4200];
	const char *tmp = getenv("TMPDIR");
	if (tmp == NULL || tmp[0] == 0) {
		tmp = "/tmp";
	}
	if (snprintf(dir, sizeof dir, "%s/areasweep-crash-XXXXXX", tmp) >= (int)sizeof dir || mkdtemp(dir) == NULL) {
		return NULL;
	}
	snprintf(path, sizeof path, "%s/run.log", dir);
	int fd = open(path, O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
	if (fd < 0) {
		return NULL;
	}
	areasweepWriteAll(fd, areasweepReport, areasweepReportLen);
	if (close(fd) != 0) {
		return NULL;
	}
	return path;
}

// areasweepSupervise runs when the process has a limit of address space
// (limit bytes): it forks, the child goes on as the program with its
// standard error piped to the parent, and the parent, which never
// returns, watches it (see superviseCrashes).
void areasweepSupervise(unsigned long long limit) {
	int p[2];
	if (pipe(p) != 0) {
		return; // unsupervised: the program still runs
	}
	int tty = isatty(2);
	pid_t parent = getpid();
	fflush(NULL);
	pid_t pid = fork();
	if (pid < 0) {
		close(p[0]);
		close(p[1]);
		return;
	}
	if (pid == 0) {
		dup2(p[1], 2);
		close(p[0]);
		close(p[1]);
		areasweepStderrTerminal = tty;
		// A supervisor killed outright (SIGKILL) cannot forward: the
		// program is then stopped as by SIGTERM, which removes what it
		// was writing, rather than left running unwatched.
		prctl(PR_SET_PDEATHSIG, SIGTERM);
		if (getppid() != parent) {
			kill(getpid(), SIGTERM);
		}
		return;
	}
	close(p[1]);
	areasweepChild = pid;
	struct sigaction sa;
	memset(&sa, 0, sizeof sa);
	sa.sa_handler = areasweepForward;
	sigemptyset(&sa.sa_mask);
	sa.sa_flags = SA_RESTART;
	int sigs[] = {SIGINT, SIGTERM, SIGHUP, SIGQUIT, SIGUSR1, SIGUSR2, SIGALRM, SIGXCPU};
	for (size_t i = 0; i < sizeof sigs / sizeof sigs[0]; i++) {
		sigaction(sigs[i], &sa, NULL);
	}
	signal(SIGPIPE, SIG_IGN);
	char buf[65536];
	int status = 0, exited = 0;
	for (;;) {
		struct pollfd pf = {p[0], POLLIN, 0};
		int r = poll(&pf, 1, 100);
		if (r < 0 && errno != EINTR) {
			break;
		}
		if (r > 0) {
			ssize_t n = read(p[0], buf, sizeof buf);
			if (n > 0) {
				areasweepFeed(buf, (size_t)n);
				continue;
			}
			if (n == 0 || (n < 0 && errno != EINTR && errno != EAGAIN)) {
				break; // every writer has closed the pipe
			}
		}
		if (r == 0 && areasweepLineLen > 0 && !areasweepCrashed) {
			// A line's beginning has waited 0.1 s for more: a prompt or
			// a progress bar, not a report, which comes whole.
			areasweepWriteAll(2, areasweepLine, areasweepLineLen);
			areasweepRelaying = 1;
			areasweepLineLen = 0;
		}
		if (!exited && waitpid(pid, &status, WNOHANG) == pid) {
			// Gone, but a process it started may hold the pipe: read
			// what is there, then stop.
			exited = 1;
			fcntl(p[0], F_SETFL, fcntl(p[0], F_GETFL) | O_NONBLOCK);
		}
		if (exited && r == 0) {
			break;
		}
	}
	if (!exited) {
		while (waitpid(pid, &status, 0) < 0 && errno == EINTR) {
		}
	}
	if (areasweepLineLen > 0 && !areasweepCrashed) {
		areasweepWriteAll(2, areasweepLine, areasweepLineLen);
	}
	if (areasweepCrashed && WIFEXITED(status) && (WEXITSTATUS(status) != 2 || areasweepOwnEnd())) {
		// What began like a crash report was the program's own lines (a
		// log line starting with a model named "panic" or "runtime"):
		// it ended as it does by itself (a crash exits 2 or by a
		// signal, and never with an "areasweep: " line), so they are
		// relayed as they were written.
		areasweepWriteAll(2, areasweepReport, areasweepReportLen);
		areasweepCrashed = 0;
	}
	if (areasweepCrashed) {
		char *where = areasweepSaveReport();
		char msg[2048];
		if (areasweepMentions("out of memory") || areasweepMentions("cannot allocate") || areasweepMentions("bad_alloc") ||
			areasweepMentions("pthread_create failed") || areasweepMentions("failed to create new OS thread") ||
			areasweepMentions("failed to reserve")) {
			snprintf(msg, sizeof msg,
				"areasweep: stopped: it ran out of the address space its limit of virtual memory allows (%llu MiB: ulimit -v, or a cluster job's such as h_vmem), "
				"which counts space reserved, not used; what it was writing was not moved into place, and the next areasweep on the same folder removes what it left. "
				"Raise the limit (ulimit -v %llu, twice it, in KiB) or remove it (ulimit -v unlimited); a limit of resident memory (a cgroup's, as SLURM's --mem sets) does not count reserved space%s%s\n",
				limit >> 20, (2 * limit) >> 10, where ? "; the runtime's report is in " : "", where ? where : "");
			areasweepWriteAll(2, msg, strlen(msg));
			_exit(1);
		}
		snprintf(msg, sizeof msg, "areasweep: internal error (the program crashed); this is a bug, please report it with %s\n",
			where ? where : "the command line (the crash report could not be written)");
		areasweepWriteAll(2, msg, strlen(msg));
		_exit(3);
	}
	if (WIFSIGNALED(status)) {
		int sig = WTERMSIG(status);
		signal(sig, SIG_DFL);
		sigset_t set;
		sigemptyset(&set);
		sigaddset(&set, sig);
		sigprocmask(SIG_UNBLOCK, &set, NULL);
		kill(getpid(), sig);
		_exit(128 + sig);
	}
	_exit(WIFEXITED(status) ? WEXITSTATUS(status) : 1);
}
*/
import "C"

// Under a limit of address space (ulimit -v, a cluster job's h_vmem),
// which Go's runtime meets with a crash report that no code can catch
// ("fatal error: runtime: out of memory" and every goroutine's stack), the
// program runs watched by a supervisor, areasweepSupervise above. The
// check of the address-space floor (addressfloor_linux.go), before Go's
// runtime starts, forks: the child goes on as the program, its standard
// error a pipe to the parent, which stays a small C program (no Go
// runtime, no GDAL) under the pid the caller started. The parent relays
// every line as it comes, forwards the stop signals (SIGINT, SIGTERM,
// SIGHUP, ...) it receives to the program, and exits as the program did
// (its code, or the same signal); killed outright, it takes the program
// with it (SIGTERM, so that it removes what it was writing). A line that
// starts a crash report (Go's "fatal error: ", "panic: ", "runtime: ", a
// signal's name; the C++ or C library's) is held, not relayed: when the
// program then ends as a crash does (exit 2, without an "areasweep: "
// line at the end, or by a signal), the report is
// kept in a new folder areasweep-crash-… under the temporary folder, and
// one line says what happened, with exit code 1 when the report speaks of
// memory (with the limit to ask for) and 3 otherwise (a bug); otherwise
// the held lines were the program's own (a model named "panic" starts
// its log lines "panic: ...") and are relayed then, late. Standard
// input and output and every other open file are the program's own, as
// without a limit, and progress bars are drawn when standard error was a
// terminal.

// stderrTerminal reports whether the program's standard error was a
// terminal before a supervisor piped it.
func stderrTerminal() bool { return C.areasweepStderrTerminal != 0 }
