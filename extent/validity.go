package extent

/*
#cgo pkg-config: gdal
#include <stdlib.h>
#include <string.h>
#include <cpl_error.h>
#include <cpl_vsi.h>
#include <ogr_api.h>

// extentValidMsg keeps the first message raised while one geometry's
// validity is checked: GEOS says why a geometry is invalid only as a
// notice, which GDAL raises as a warning.
typedef struct {
	char msg[512];
	int n;
} extentValidMsg;

static void CPL_STDCALL extentValidHandler(CPLErr e, CPLErrorNum num, const char *m) {
	extentValidMsg *u = (extentValidMsg *)CPLGetErrorHandlerUserData();
	if (u == NULL) {
		return;
	}
	if (u->n == 0 && m != NULL) {
		strncpy(u->msg, m, sizeof(u->msg) - 1);
		u->msg[sizeof(u->msg) - 1] = 0;
	}
	u->n++;
}

// extentValid returns 1 when the geometry in wkb is valid, 0 when not
// (reason then holds GEOS's reason, or is empty) and -1 when wkb cannot be
// read. The messages raised meanwhile go to this thread's own handler,
// never to the process-wide one.
static int extentValid(const unsigned char *wkb, int len, char *reason, int reasonLen) {
	OGRGeometryH g = NULL;
	extentValidMsg u;
	memset(&u, 0, sizeof(u));
	CPLPushErrorHandlerEx(extentValidHandler, &u);
	OGRErr err = OGR_G_CreateFromWkb(wkb, NULL, &g, len);
	int ok = -1;
	if (err == OGRERR_NONE && g != NULL) {
		u.n = 0;
		u.msg[0] = 0;
		ok = OGR_G_IsValid(g) ? 1 : 0;
		OGR_G_DestroyGeometry(g);
	}
	CPLPopErrorHandler();
	strncpy(reason, u.msg, reasonLen - 1);
	reason[reasonLen - 1] = 0;
	return ok;
}

// extentMakeValid returns the geometry in wkb made valid by GEOS's
// MakeValid with its structure method (the area inside any outer ring
// and outside every hole), as WKB of *outLen bytes to free with VSIFree,
// or NULL when it cannot. Messages raised meanwhile are dropped.
static unsigned char *extentMakeValid(const unsigned char *wkb, int len, int *outLen) {
	OGRGeometryH g = NULL, v = NULL;
	unsigned char *out = NULL;
	const char *opts[] = {"METHOD=STRUCTURE", NULL};
	CPLPushErrorHandler(CPLQuietErrorHandler);
	if (OGR_G_CreateFromWkb(wkb, NULL, &g, len) == OGRERR_NONE && g != NULL) {
		v = OGR_G_MakeValidEx(g, (CSLConstList)opts);
		if (v != NULL) {
			int n = OGR_G_WkbSize(v);
			out = (unsigned char *)VSIMalloc(n);
			if (out != NULL && OGR_G_ExportToWkb(v, wkbNDR, out) == OGRERR_NONE) {
				*outLen = n;
			} else {
				VSIFree(out);
				out = NULL;
			}
			OGR_G_DestroyGeometry(v);
		}
		OGR_G_DestroyGeometry(g);
	}
	CPLPopErrorHandler();
	return out;
}

// extentFaces returns the geometry in wkb, a triangle, TIN or polyhedral
// surface or a collection holding them, as the area its faces cover: a
// multipolygon of the faces (OGR_G_ForceTo), made valid by MakeValid's
// structure method when faces share edges or overlap (their union), as
// WKB of *outLen bytes to free with VSIFree; NULL when it is not made of
// areas alone (a collection holding a point). Messages raised meanwhile
// are dropped.
static unsigned char *extentFaces(const unsigned char *wkb, int len, int *outLen) {
	OGRGeometryH g = NULL;
	unsigned char *out = NULL;
	const char *opts[] = {"METHOD=STRUCTURE", NULL};
	CPLPushErrorHandler(CPLQuietErrorHandler);
	if (OGR_G_CreateFromWkb(wkb, NULL, &g, len) == OGRERR_NONE && g != NULL) {
		g = OGR_G_ForceTo(g, wkbMultiPolygon, NULL);
		if (g != NULL && wkbFlatten(OGR_G_GetGeometryType(g)) == wkbMultiPolygon && !OGR_G_IsValid(g)) {
			OGRGeometryH v = OGR_G_MakeValidEx(g, (CSLConstList)opts);
			OGR_G_DestroyGeometry(g);
			g = v;
		}
		if (g != NULL && wkbFlatten(OGR_G_GetGeometryType(g)) != wkbMultiPolygon && wkbFlatten(OGR_G_GetGeometryType(g)) != wkbPolygon) {
			OGR_G_DestroyGeometry(g);
			g = NULL;
		}
		if (g != NULL) {
			int n = OGR_G_WkbSize(g);
			out = (unsigned char *)VSIMalloc(n);
			if (out != NULL && OGR_G_ExportToWkb(g, wkbNDR, out) == OGRERR_NONE) {
				*outLen = n;
			} else {
				VSIFree(out);
				out = NULL;
			}
			OGR_G_DestroyGeometry(g);
		}
	}
	CPLPopErrorHandler();
	return out;
}
*/
import "C"

import (
	"errors"
	"regexp"
	"strings"
	"unsafe"

	"github.com/airbusgeo/godal"
)

// geosReason is the shape of GEOS's reason for an invalid geometry, e.g.
// "Self-intersection at or near point 0.5 0.5" or "Hole lies outside
// shell at or near point 20 20" (geos::operation::valid::
// TopologyValidationError: a fixed phrase, then the point).
var geosReason = regexp.MustCompile(`^([A-Za-z][A-Za-z -]{0,60}?)(?: at or near point (-?[0-9.eE+-]{1,32}|nan|inf) (-?[0-9.eE+-]{1,32}|nan|inf))?$`)

// validity reports whether g is a valid geometry (OGC simple features, as
// GEOS checks it) and, when it is not, why in our own words: the kind of
// problem GEOS names, lower-cased, and where, e.g. "a self-intersection
// at or near 0.5 0.5". GEOS's text is used only when it has the shape of
// its validation errors (geosReason); anything else gives "" rather than
// a raw library message. A geometry whose WKB cannot be made counts as
// invalid, without a reason.
func validity(g *godal.Geometry) (valid bool, reason string) {
	b, err := g.WKB()
	if err != nil || len(b) == 0 {
		return false, ""
	}
	buf := make([]byte, 512)
	ok := C.extentValid((*C.uchar)(unsafe.Pointer(&b[0])), C.int(len(b)), (*C.char)(unsafe.Pointer(&buf[0])), C.int(len(buf)))
	if ok == 1 {
		return true, ""
	}
	raw := C.GoString((*C.char)(unsafe.Pointer(&buf[0])))
	return false, invalidReason(raw)
}

// makeValid returns g (in srs) repaired by GEOS's MakeValid with its
// structure method: the area inside any outer ring and outside every
// hole, so a bow-tie keeps both triangles, two overlapping parts of a
// multipolygon keep their overlap and a hole that runs out of its shell
// takes nothing outside it. The default (linework) method, which
// ogr2ogr -makevalid uses, keeps the area an odd number of rings
// enclose: it dropped the overlap of two parts and added the part of
// such a hole outside its shell.
func makeValid(g *godal.Geometry, srs *godal.SpatialRef) (*godal.Geometry, error) {
	return throughC(g, srs, func(b *C.uchar, n C.int, out *C.int) *C.uchar { return C.extentMakeValid(b, n, out) },
		"GEOS gave no geometry", "GEOS gave a geometry that cannot be read")
}

// throughC hands g's WKB to one of our C functions (call: the bytes,
// their length, and where it writes the length of the WKB it returns,
// freed with VSIFree; nil for none) and reads back what it returns, in
// srs; none and bad are the errors when it returns nothing or bytes that
// do not read as a geometry.
func throughC(g *godal.Geometry, srs *godal.SpatialRef, call func(b *C.uchar, n C.int, out *C.int) *C.uchar, none, bad string) (*godal.Geometry, error) {
	b, err := g.WKB()
	if err != nil || len(b) == 0 {
		return nil, errors.New("its geometry cannot be read")
	}
	var n C.int
	out := call((*C.uchar)(unsafe.Pointer(&b[0])), C.int(len(b)), &n)
	if out == nil {
		return nil, errors.New(none)
	}
	defer C.VSIFree(unsafe.Pointer(out))
	r, err := godal.NewGeometryFromWKB(C.GoBytes(unsafe.Pointer(out), n), srs)
	if err != nil {
		return nil, errors.New(bad)
	}
	return r, nil
}

// faces returns g (in srs), a triangle, TIN or polyhedral surface or a
// collection holding them, as the area its faces cover in the plane (see
// extentFaces), or an error when it is not made of faces and polygons
// alone.
func faces(g *godal.Geometry, srs *godal.SpatialRef) (*godal.Geometry, error) {
	return throughC(g, srs, func(b *C.uchar, n C.int, out *C.int) *C.uchar { return C.extentFaces(b, n, out) },
		"it is not made of faces alone", "its faces gave a geometry that cannot be read")
}

// invalidReason turns GEOS's reason for an invalid geometry into our words
// (see validity): "" when raw does not read as one.
func invalidReason(raw string) string {
	m := geosReason.FindStringSubmatch(strings.TrimSpace(raw))
	if m == nil {
		return ""
	}
	what := strings.ToLower(strings.TrimSpace(m[1]))
	switch what {
	case "", "topology validation error", "unknown":
		return ""
	}
	if strings.HasPrefix(what, "too few") || strings.HasPrefix(what, "duplicate") || strings.HasPrefix(what, "nested") || strings.HasPrefix(what, "invalid") {
		// "too few points in geometry component", "duplicate rings",
		// "nested holes", "invalid coordinate" read without an article.
	} else if strings.HasPrefix(what, "hole") || strings.HasPrefix(what, "interior") || strings.HasPrefix(what, "ring is") {
		// "hole lies outside shell", "interior is disconnected",
		// "ring is not closed": a sentence of its own.
	} else if strings.ContainsAny(what[:1], "aeiou") {
		what = "an " + what
	} else {
		what = "a " + what
	}
	if m[2] != "" {
		what += " at or near " + m[2] + " " + m[3]
	}
	return what
}

// valid is validity without the reason.
func valid(g *godal.Geometry) bool {
	ok, _ := validity(g)
	return ok
}
