package gdalmsg

/*
#include <stdlib.h>
void gdalmsgPrintStderr(const char *s);
*/
import "C"

import "unsafe"

// gdalmsgRecordGo calls the recorder as GDAL would, for tests.
func gdalmsgRecordGo(level, code int, msg string) {
	cs := C.CString(msg)
	defer C.free(unsafe.Pointer(cs))
	gdalmsgRecord(C.int(level), C.int(code), cs)
}

// printCStderr prints s on C's stderr stream as a C library would, for
// tests.
func printCStderr(s string) {
	cs := C.CString(s)
	defer C.free(unsafe.Pointer(cs))
	C.gdalmsgPrintStderr(cs)
}
