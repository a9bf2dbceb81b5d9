// Package geodesy provides geodesic computations on the WGS84 ellipsoid for
// building evaluation extents: distances, azimuths and forward positions,
// geodesic polygon areas, exact areas of latitude-longitude raster cells,
// densified geodesic lines, and an exact nearest-site index.
//
// Geodesics are solved by PROJ's public geodesic API (geodesic.h) through cgo,
// which implements
//
//	Karney, C. F. F. (2013). Algorithms for geodesics. Journal of Geodesy
//	87(1):43-55. doi:10.1007/s00190-012-0578-z
//
// accurate to about 15 nm for any pair of points, including nearly antipodal
// ones where Vincenty's (1975) iteration fails. The WGS84 geod_geodesic is
// initialised once at package initialisation and only read afterwards, so
// every function here is safe for concurrent use.
//
// Cell areas use the closed-form zone area of the ellipsoid of revolution
// (Snyder 1987, Map Projections - A Working Manual, USGS Professional Paper
// 1395, eqs. 3-11 to 3-13), evaluated without cancellation so small raster
// cells keep full precision:
//
//	S(phi) = b^2/2 [ sin(phi)/(1-e^2 sin^2 phi) + 1/(2e) ln((1+e sin phi)/(1-e sin phi)) ]
//	A(cell) = dlon_rad (S(lat2) - S(lat1)) = R_q^2 dlon_rad (sin beta2 - sin beta1)
//
// with beta the authalic latitude and R_q the authalic radius.
//
// Index answers nearest-site queries exactly in geodesic distance: a kd-tree
// on rectifying-latitude unit vectors proposes candidates, two rigorous lower
// bounds on the geodesic distance (see Index) discard sites that cannot be
// nearest, and Inverse decides among the rest. ChordUpper bounds a
// geodesic from above by the straight (ECEF) distance between its ends
// (Schur's comparison theorem, see sectionUpper), for callers that need a
// safe step without solving the inverse problem.
//
// Angles are in degrees, lengths in metres and areas in square metres.
package geodesy
