package extent

/*
#cgo pkg-config: gdal
#include <stdlib.h>
#include <gdal.h>
#include <cpl_string.h>

static char **extentFileList(const char *path, int vector) {
	unsigned int flags = GDAL_OF_READONLY | (vector ? GDAL_OF_VECTOR : GDAL_OF_RASTER);
	GDALDatasetH ds = GDALOpenEx(path, flags, NULL, NULL, NULL);
	if (ds == NULL) {
		return NULL;
	}
	char **files = GDALGetFileList(ds);
	GDALClose(ds);
	return files;
}
*/
import "C"

import (
	"fmt"
	"unsafe"
)

// DatasetFiles returns the files GDAL lists for the raster (or, when
// vector, the vector dataset) at path: GDALGetFileList, path first, then
// whatever else the driver has opened or will read for it, such as a
// shapefile's .shx and .dbf, an ENVI header or a virtual raster's (VRT)
// source files. The list is what the driver knows after opening: files
// read only later (external overviews, masks) may be missing, so callers
// that must see every file add the names they know (inputs.Sidecars).
// It opens the dataset once, read-only, and closes it.
func DatasetFiles(path string, vector bool) ([]string, error) {
	Register()
	cpath := C.CString(path)
	defer C.free(unsafe.Pointer(cpath))
	v := C.int(0)
	if vector {
		v = 1
	}
	list := C.extentFileList(cpath, v)
	if list == nil {
		return nil, fmt.Errorf("extent: GDAL cannot open %s to list its files", path)
	}
	defer C.CSLDestroy(list)
	var out []string
	for p := list; *p != nil; p = (**C.char)(unsafe.Add(unsafe.Pointer(p), unsafe.Sizeof(*p))) {
		out = append(out, C.GoString(*p))
	}
	return out, nil
}
