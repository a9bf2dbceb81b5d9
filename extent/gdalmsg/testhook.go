package gdalmsg

/*
#include <stdlib.h>
*/
import "C"

import "unsafe"

// gdalmsgRecordGo calls the recorder as GDAL would, for tests.
func gdalmsgRecordGo(level, code int, msg string) {
	cs := C.CString(msg)
	defer C.free(unsafe.Pointer(cs))
	gdalmsgRecord(C.int(level), C.int(code), cs)
}
