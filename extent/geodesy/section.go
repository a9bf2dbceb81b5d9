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
	// less), the arc length by 1e-9 relative for the rounding of asin.
	d := withMargin(D)
	return withMargin(2*sectionRadius*math.Asin(d/(2*sectionRadius))*(1+1e-9)) + marginAbs
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
