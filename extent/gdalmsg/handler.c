#include <cpl_error.h>

extern void gdalmsgRecord(int level, int code, char *msg);

static void gdalmsgHandler(CPLErr level, CPLErrorNum code, const char *msg) {
	gdalmsgRecord((int)level, (int)code, (char *)msg);
}

void gdalmsgInstall(void) {
	CPLSetErrorHandler(gdalmsgHandler);
}

#include <stdio.h>

/* gdalmsgRedirectStderr makes C's stderr stream write to fd, unbuffered:
 * what C libraries print there themselves (HDF5's error stacks) then
 * reaches the recorder, not the terminal. Go writes to file descriptor 2,
 * not to this stream, so its own messages are not affected. */
int gdalmsgRedirectStderr(int fd) {
	FILE *f = fdopen(fd, "w");
	if (f == NULL) {
		return -1;
	}
	setvbuf(f, NULL, _IONBF, 0);
	fflush(stderr);
	stderr = f;
	return 0;
}

/* gdalmsgPrintStderr prints s on C's stderr stream, as a C library would
 * (for tests). */
void gdalmsgPrintStderr(const char *s) {
	fputs(s, stderr);
}
