#include <cpl_error.h>

extern void gdalmsgRecord(int level, int code, char *msg);

static void gdalmsgHandler(CPLErr level, CPLErrorNum code, const char *msg) {
	gdalmsgRecord((int)level, (int)code, (char *)msg);
}

void gdalmsgInstall(void) {
	CPLSetErrorHandler(gdalmsgHandler);
}
