package geodesy

import "math"

// sectionRadius is rho = b^2 / a (6 335 439 m), the radius of curvature of
// the sharpest bend of any central section of WGS84: a plane through the
// centre cuts the ellipsoid of revolution in an ellipse of semi-axes a (a
// diameter of the equator lies in every such plane) and c in [b, a], whose
// curvature is at most a / c^2 <= a / b^2.
var sectionRadius = SemiMinor * SemiMinor / SemiMajor

// sectionMaxChord is the longest straight (ECEF) distance, in metres, for
// which sectionUpper bounds the geodesic.
const sectionMaxChord = 3e6

// sectionUpper returns an upper bound on the geodesic distance s between
// two points of the ellipsoid at straight (ECEF) distance D <= 3000 km,
// with the safety margin of Index; +Inf beyond 3000 km or for a NaN D:
//
//	s <= 2 rho asin(D / (2 rho)),  rho = b^2 / a
//
// The central section through both points (the plane through them and the
// centre) holds a curve on the ellipsoid joining them, the shorter arc of
// an ellipse whose curvature is at most 1/rho (sectionRadius); the
// geodesic is no longer. By Schur's comparison theorem (Chern, Curves and
// surfaces in Euclidean space, 1967, sec. 5) a plane convex arc of length L
// and curvature at most 1/rho has a chord D >= 2 rho sin(L / (2 rho)), the
// chord of the circular arc of radius rho and the same length, so L <=
// 2 rho asin(D / (2 rho)) while L <= pi rho. The arc spans a central angle
// psi <= 2 asin(D / (2 b)) (both ends lie at least b from the centre), and
// in polar form r(theta) <= a with |dr/dtheta| <= r e^2 / (2 (1 - e^2)), so
// L <= 1.00001 a psi, below 3.1e6 m for D <= 3000 km: far below pi rho.
//
// The bound exceeds the geodesic by about D^3 / 24 (1/rho^2 - 1/R^2), R the
// radius of curvature along the line: under 5 m at 700 km, where
// NearestBounds' upper bound is up to 0.17% (1.2 km) above.
// The distance-only null (extent/nullmodel) brackets its chords with the
// same bound, argued on the geodesic itself as a space curve.
func sectionUpper(D float64) float64 {
	if !(D <= sectionMaxChord) {
		return math.Inf(1)
	}
	// D is rounded up by the margin (the positions are correct to far
	// less), the arc length by 1e-9 relative for the rounding of asinUpper.
	d := withMargin(D)
	return withMargin(2*sectionRadius*asinUpper(d/(2*sectionRadius))*(1+1e-9)) + marginAbs
}

// asinUpper returns an upper bound on asin(x) for 0 <= x < 1, from its
// Maclaurin series asin(x) = sum_k c_k x^(2k+1), c_k = (2k)! / (4^k (k!)^2
// (2k+1)): the terms up to x^7 and, since the c_k are positive and
// decreasing, the rest bounded by c_4 x^9 / (1 - x^2) (Abramowitz and
// Stegun 1964, Handbook of Mathematical Functions, 4.4.40):
//
//	asin(x) <= x + x^3/6 + 3x^5/40 + 5x^7/112 + (35/1152) x^9 / (1 - x^2)
//
// It exceeds asin(x) by under 1e-7 relative for x <= 0.24 (sectionUpper's
// chords up to 3000 km), far less for short ones (2e-12 at 300 km), and
// costs a division and a few products where math.Asin takes an arctangent
// and a square root. Rounding adds a few 1e-16 relative, which the caller's
// margin covers.
func asinUpper(x float64) float64 {
	x2 := x * x
	return x * (1 + x2*(1.0/6+x2*(3.0/40+x2*(5.0/112+x2*(35.0/1152)/(1-x2)))))
}

// TightBoundsAt is BoundsAt with hi lowered, when that is smaller, to
// sectionUpper of the straight distance to the chord-nearest site: an
// upper bound on the distance to that site, so on the nearest distance.
// The lower bound and slot are BoundsAt's. Close to the sites the two
// upper bounds are alike; at hundreds of kilometres this one is a few
// metres above the distance where BoundsAt's is up to 0.17% above.
func (ix *Index) TightBoundsAt(pt *Point, maxDist float64, hint int) (lo, hi float64, slot int) {
	lo, hi, slot = ix.BoundsAt(pt, maxDist, hint)
	if slot >= 0 {
		hi = math.Min(hi, sectionUpper(math.Sqrt(d2(&ix.ecef[slot], &pt.p))))
	}
	return lo, hi, slot
}
