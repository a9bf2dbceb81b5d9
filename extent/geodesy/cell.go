package geodesy

import "math"

// Derived WGS84 constants for the area formulas.
var (
	ecc = math.Sqrt(EccentricitySq) // first eccentricity e
	// qPolar is q at the pole (Snyder 1987, eq. 3-12 with phi = 90 deg):
	//	q_p = 1 + (1-e^2)/e * atanh(e)
	qPolar = 1 + (1-EccentricitySq)/ecc*math.Atanh(ecc)
)

// qOf is Snyder's q for latitude phi (radians; Snyder 1987, Map Projections -
// A Working Manual, USGS PP 1395, eq. 3-12):
//
//	q(phi) = (1-e^2) [ sin(phi)/(1-e^2 sin^2 phi) + atanh(e sin(phi))/e ]
//
// The ellipsoidal area from the equator to phi per radian of longitude is
// a^2 q(phi) / 2 = S(phi) of CellArea.
func qOf(phi float64) float64 {
	x := math.Sin(phi)
	return (1 - EccentricitySq) * (x/(1-EccentricitySq*x*x) + math.Atanh(ecc*x)/ecc)
}

// qDiff returns q(phi2) - q(phi1) given x1 = sin(phi1), x2 = sin(phi2) and
// d = x2 - x1 computed without cancellation. With the identities
//
//	x2/(1-e^2 x2^2) - x1/(1-e^2 x1^2) = d (1 + e^2 x1 x2) / ((1-e^2 x1^2)(1-e^2 x2^2))
//	atanh(e x2) - atanh(e x1)         = atanh(e d / (1 - e^2 x1 x2))
//
// the difference keeps full relative precision even for tiny cells, where
// subtracting two values of q would lose about log10(1/d) digits.
func qDiff(x1, x2, d float64) float64 {
	e2 := EccentricitySq
	t := d*(1+e2*x1*x2)/((1-e2*x1*x1)*(1-e2*x2*x2)) + math.Atanh(ecc*d/(1-e2*x1*x2))/ecc
	return (1 - e2) * t
}

// CellArea returns the exact area in m^2 of the WGS84 latitude-longitude
// quadrangle bounded by the parallels lat1 < lat2 and by two meridians dlon
// degrees apart. With
//
//	S(phi) = b^2/2 [ sin(phi)/(1-e^2 sin^2 phi) + 1/(2e) ln((1+e sin phi)/(1-e sin phi)) ]
//	area   = dlon_rad (S(lat2) - S(lat1))
//
// (the zone area of the ellipsoid of revolution, e.g. Snyder 1987, USGS PP
// 1395, eqs. 3-11 and 3-12: S = a^2 q / 2). The difference S(lat2) - S(lat1)
// is evaluated in an algebraically equal, cancellation-free form (see qDiff)
// so small raster cells keep full double precision. The result is
// (lat2-lat1)*dlon signed; NaN if a latitude lies outside [-90, 90].
// Equivalently area = R_q^2 dlon_rad (sin beta2 - sin beta1) with the
// authalic latitude beta and radius R_q (AuthalicLatitude, AuthalicRadius).
func CellArea(lat1, lat2, dlon float64) float64 {
	if !(math.Abs(lat1) <= 90 && math.Abs(lat2) <= 90) {
		return math.NaN()
	}
	p1, p2 := lat1*math.Pi/180, lat2*math.Pi/180
	x1, x2 := math.Sin(p1), math.Sin(p2)
	// sin p2 - sin p1 = 2 cos((p1+p2)/2) sin((p2-p1)/2)
	d := 2 * math.Cos((p1+p2)/2) * math.Sin((p2-p1)/2)
	return dlon * math.Pi / 180 * SemiMajor * SemiMajor / 2 * qDiff(x1, x2, d)
}

// AuthalicLatitude returns the authalic latitude beta (degrees) of the
// geodetic latitude lat (degrees) on WGS84: the latitude on the sphere of
// equal surface area (radius AuthalicRadius) that encloses the same area
// between itself and the equator (Snyder 1987, USGS PP 1395, eq. 3-11):
//
//	sin(beta) = q(lat) / q_p
//
// It is computed as atan2(q, sqrt((q_p-q)(q_p+q))) with q_p - q formed without
// cancellation, so it stays accurate near the poles. NaN for |lat| > 90.
func AuthalicLatitude(lat float64) float64 {
	if !(math.Abs(lat) <= 90) {
		return math.NaN()
	}
	phi := math.Abs(lat) * math.Pi / 180
	x := math.Sin(phi)
	// 1 - sin(phi) = 2 sin^2((90deg - phi)/2)
	h := math.Sin((math.Pi/2 - phi) / 2)
	gap := qDiff(x, 1, 2*h*h) // q_p - q(phi) >= 0
	q := qOf(phi)
	beta := math.Atan2(q, math.Sqrt(gap*(qPolar+q))) * 180 / math.Pi
	return math.Copysign(beta, lat)
}

// AuthalicRadius returns the WGS84 authalic radius R_q in metres, the radius
// of the sphere with the ellipsoid's surface area (Snyder 1987, eq. 3-13):
//
//	R_q = a sqrt(q_p / 2),  q_p = 1 + (1-e^2)/e atanh(e)
func AuthalicRadius() float64 {
	return SemiMajor * math.Sqrt(qPolar/2)
}

// SurfaceArea returns the total WGS84 surface area in m^2:
//
//	A = 2 pi a^2 (1 + (1-e^2)/e atanh(e)) = 4 pi R_q^2
func SurfaceArea() float64 {
	return 2 * math.Pi * SemiMajor * SemiMajor * qPolar
}
