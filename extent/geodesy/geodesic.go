package geodesy

/*
#cgo pkg-config: proj
#cgo noescape areasweep_geod_edgeareas
#cgo nocallback areasweep_geod_edgeareas
#cgo noescape areasweep_geod_polygonarea
#cgo nocallback areasweep_geod_polygonarea
#cgo noescape areasweep_geod_densify
#cgo nocallback areasweep_geod_densify
#include <geodesic.h>

typedef struct { double s12, azi1, azi2; } areasweep_inv;
typedef struct { double lat2, lon2, azi2; } areasweep_dir;

static areasweep_inv areasweep_geod_inverse(const struct geod_geodesic* g,
		double lat1, double lon1, double lat2, double lon2) {
	areasweep_inv r;
	geod_inverse(g, lat1, lon1, lat2, lon2, &r.s12, &r.azi1, &r.azi2);
	return r;
}

static double areasweep_geod_distance(const struct geod_geodesic* g,
		double lat1, double lon1, double lat2, double lon2) {
	double s12;
	geod_inverse(g, lat1, lon1, lat2, lon2, &s12, 0, 0);
	return s12;
}

static areasweep_dir areasweep_geod_direct(const struct geod_geodesic* g,
		double lat1, double lon1, double azi1, double s12) {
	areasweep_dir r;
	geod_direct(g, lat1, lon1, azi1, s12, &r.lat2, &r.lon2, &r.azi2);
	return r;
}

// areasweep_geod_edgeareas sets S12[i] to the area between the geodesic
// from (lat1[i],lon1[i]) to (lat2[i],lon2[i]) and the equator.
static void areasweep_geod_edgeareas(const struct geod_geodesic* g,
		const double* lat1, const double* lon1, const double* lat2, const double* lon2,
		int n, double* S12) {
	for (int i = 0; i < n; i++) {
		geod_geninverse(g, lat1[i], lon1[i], lat2[i], lon2[i], 0, 0, 0, 0, 0, 0, &S12[i]);
	}
}

static void areasweep_geod_polygonarea(const struct geod_geodesic* g,
		double* lats, double* lons, int n, double* area, double* perim) {
	geod_polygonarea(g, lats, lons, n, area, perim);
}

// areasweep_geod_densify fills lats[0..n] and lons[0..n] with n+1 points
// equally spaced along the geodesic from (lat1,lon1) to (lat2,lon2) and returns
// its length. The end points are copied from the input.
static double areasweep_geod_densify(const struct geod_geodesic* g,
		double lat1, double lon1, double lat2, double lon2,
		int n, double* lats, double* lons) {
	struct geod_geodesicline l;
	geod_inverseline(&l, g, lat1, lon1, lat2, lon2,
		GEOD_LATITUDE | GEOD_LONGITUDE | GEOD_DISTANCE_IN);
	lats[0] = lat1; lons[0] = lon1;
	for (int i = 1; i < n; i++) {
		geod_position(&l, l.s13 * ((double)i / (double)n), &lats[i], &lons[i], 0);
	}
	lats[n] = lat2; lons[n] = lon2;
	return l.s13;
}
*/
import "C"

import (
	"math"
	"unsafe"
)

// WGS84 ellipsoid (NIMA TR8350.2, 3rd ed., 2000, table 3.1).
const (
	// SemiMajor is the WGS84 equatorial radius a in metres.
	SemiMajor = 6378137.0
	// Flattening is the WGS84 flattening f = (a-b)/a.
	Flattening = 1 / 298.257223563
	// SemiMinor is the WGS84 polar radius b = a(1-f) in metres.
	SemiMinor = SemiMajor * (1 - Flattening)
	// EccentricitySq is the WGS84 first eccentricity squared e^2 = f(2-f).
	EccentricitySq = Flattening * (2 - Flattening)
)

// geodesic is an initialised PROJ geod_geodesic. After newGeodesic returns it
// is only read, so one value may be shared by any number of goroutines.
type geodesic struct {
	g C.struct_geod_geodesic
}

// newGeodesic initialises the geodesic data for an ellipsoid with equatorial
// radius a (metres) and flattening f (geod_init).
func newGeodesic(a, f float64) *geodesic {
	gd := new(geodesic)
	C.geod_init(&gd.g, C.double(a), C.double(f))
	return gd
}

// wgs84 is the package-wide WGS84 geodesic, initialised once at package
// initialisation and read-only afterwards.
var wgs84 = newGeodesic(SemiMajor, Flattening)

func (gd *geodesic) inverse(lat1, lon1, lat2, lon2 float64) (s12, azi1, azi2 float64) {
	r := C.areasweep_geod_inverse(&gd.g, C.double(lat1), C.double(lon1), C.double(lat2), C.double(lon2))
	return float64(r.s12), float64(r.azi1), float64(r.azi2)
}

func (gd *geodesic) distance(lat1, lon1, lat2, lon2 float64) float64 {
	return float64(C.areasweep_geod_distance(&gd.g, C.double(lat1), C.double(lon1), C.double(lat2), C.double(lon2)))
}

func (gd *geodesic) direct(lat1, lon1, azi1, s12 float64) (lat2, lon2, azi2 float64) {
	r := C.areasweep_geod_direct(&gd.g, C.double(lat1), C.double(lon1), C.double(azi1), C.double(s12))
	return float64(r.lat2), float64(r.lon2), float64(r.azi2)
}

// Inverse solves the inverse geodesic problem on the WGS84 ellipsoid: given two
// points (degrees) it returns the length s12 (metres) of the shortest geodesic
// between them and the forward azimuths azi1 at point 1 and azi2 at point 2
// (degrees clockwise from north, in [-180, 180]). The back azimuth from point 2
// to point 1 is azi2 ± 180. Latitudes must lie in [-90, 90]; otherwise the
// results are NaN. It wraps PROJ's geod_inverse, which implements
//
//	Karney, C. F. F. (2013). Algorithms for geodesics. J. Geodesy 87:43-55.
//
// and is accurate to about 15 nanometres. Safe for concurrent use.
func Inverse(lat1, lon1, lat2, lon2 float64) (s12, azi1, azi2 float64) {
	return wgs84.inverse(lat1, lon1, lat2, lon2)
}

// Distance returns the WGS84 geodesic distance in metres between two points
// given in degrees (the s12 of Inverse). Safe for concurrent use.
func Distance(lat1, lon1, lat2, lon2 float64) float64 {
	return wgs84.distance(lat1, lon1, lat2, lon2)
}

// Direct solves the direct geodesic problem on the WGS84 ellipsoid (Karney
// 2013, via PROJ's geod_direct): starting at (lat1, lon1) (degrees) with
// azimuth azi1 (degrees clockwise from north), it returns the point reached
// after s12 metres along the geodesic. lon2 is reduced to [-180, 180]. Use
// DirectAzimuth to also obtain the forward azimuth there. Safe for concurrent
// use.
func Direct(lat1, lon1, azi1, s12 float64) (lat2, lon2 float64) {
	lat2, lon2, _ = wgs84.direct(lat1, lon1, azi1, s12)
	return lat2, lon2
}

// DirectAzimuth is Direct that also returns the forward azimuth azi2
// (degrees) of the geodesic at the end point.
func DirectAzimuth(lat1, lon1, azi1, s12 float64) (lat2, lon2, azi2 float64) {
	return wgs84.direct(lat1, lon1, azi1, s12)
}

// PolygonArea returns the signed area (m^2, counter-clockwise traversal
// positive) and the perimeter (m) of the WGS84 polygon whose vertices are
// (lats[i], lons[i]) in degrees and whose edges are geodesics; the polygon is
// closed implicitly (do not repeat the first vertex). It wraps PROJ's
// geod_polygonarea (Karney 2013, sec. 6), which handles polygons that encircle
// a pole or cross the antimeridian. Only the first min(len(lats), len(lons))
// vertices are used; with fewer than three the area is 0. Latitudes outside
// [-90, 90] give NaN. Safe for concurrent use.
func PolygonArea(lats, lons []float64) (area, perimeter float64) {
	n := min(len(lats), len(lons))
	if n == 0 {
		return 0, 0
	}
	if n > math.MaxInt32 {
		n = math.MaxInt32
	}
	var a, p C.double
	C.areasweep_geod_polygonarea(&wgs84.g,
		(*C.double)(unsafe.Pointer(&lats[0])), (*C.double)(unsafe.Pointer(&lons[0])),
		C.int(n), &a, &p)
	return float64(a), float64(p)
}

// EdgeAreas sets S12[i], for each i < len(S12), to the signed area (m^2)
// between the WGS84 geodesic from (lat1[i], lon1[i]) to (lat2[i], lon2[i])
// (degrees) and the equator: Karney's S12 (2013, sec. 6, via PROJ's
// geod_geninverse), the term PolygonArea adds up for each edge: minus the
// sum of the S12 of a polygon's edges, in order, is its PolygonArea when
// no edge crosses the prime meridian and it holds no pole (PolygonArea's
// corrections for those are then zero), so polygons that share edges can
// share their S12 (the reverse edge has -S12). The
// other slices must be at least as long as S12. Safe for concurrent use.
func EdgeAreas(lat1, lon1, lat2, lon2, S12 []float64) {
	n := len(S12)
	if n == 0 {
		return
	}
	_, _, _, _ = lat1[n-1], lon1[n-1], lat2[n-1], lon2[n-1]
	if n > math.MaxInt32 {
		panic("geodesy: EdgeAreas: too many edges")
	}
	C.areasweep_geod_edgeareas(&wgs84.g,
		(*C.double)(unsafe.Pointer(&lat1[0])), (*C.double)(unsafe.Pointer(&lon1[0])),
		(*C.double)(unsafe.Pointer(&lat2[0])), (*C.double)(unsafe.Pointer(&lon2[0])),
		C.int(n), (*C.double)(unsafe.Pointer(&S12[0])))
}

// MaxDensifySegments caps the number of segments Densify produces, so that a
// tiny maxStep cannot exhaust memory. With the cap the spacing may exceed
// maxStep; the cap is reached only when maxStep is below about 1 m on an
// antipodal line.
const MaxDensifySegments = 1 << 24

// Densify returns points along the shortest WGS84 geodesic from (lat1, lon1)
// to (lat2, lon2) (degrees), including both end points exactly as given, so
// that consecutive points are at most maxStep metres apart along the
// geodesic. The geodesic of length s is cut into
//
//	n = ceil(s / maxStep)
//
// equal pieces (n+1 points; `geod +n_S=n` gives the same points, whereas
// `geod +del_S=` rounds s/del_S to the nearest integer and may space points
// further apart). The interior points come from PROJ's geod_inverseline and
// geod_position (Karney 2013); their longitudes are reduced to [-180, 180].
// If maxStep is not a positive finite number, or the points coincide, only
// the two end points are returned. n is capped at MaxDensifySegments.
// Latitudes outside [-90, 90] give NaN interior points.
func Densify(lat1, lon1, lat2, lon2, maxStep float64) (lats, lons []float64) {
	n := 1
	if maxStep > 0 && !math.IsInf(maxStep, 1) {
		s := wgs84.distance(lat1, lon1, lat2, lon2)
		if q := math.Ceil(s / maxStep); q > 1 {
			n = MaxDensifySegments
			if q < MaxDensifySegments {
				n = int(q)
			}
		}
	}
	lats = make([]float64, n+1)
	lons = make([]float64, n+1)
	if n == 1 {
		lats[0], lons[0], lats[1], lons[1] = lat1, lon1, lat2, lon2
		return lats, lons
	}
	C.areasweep_geod_densify(&wgs84.g, C.double(lat1), C.double(lon1), C.double(lat2), C.double(lon2),
		C.int(n), (*C.double)(unsafe.Pointer(&lats[0])), (*C.double)(unsafe.Pointer(&lons[0])))
	return lats, lons
}
