package geodesy

import "math"

// QuickBounds returns bounds lo <= s <= hi on the geodesic distance s from
// pt to its nearest site, valid, like Bounds, provided that site is in the
// list. It takes over the listed sites i the smallest squared rectifying
// chord r* and the smallest straight (ECEF) distance D* (which may belong
// to different sites), and gives
//
//	lo = max(R_r sigma(r*) (1 - 1e-9) - margin,  D* - margin)
//	hi = sectionUpper(D*)
//
// with sigma(r) = 2 asin(sqrt(r) / 2) the angle of bound (1) of Index.
// Both lower bounds grow with the chord, so the smallest over the sites of
// either is a lower bound on every listed site's distance, hence on s
// (min_i max(a_i, b_i) >= max(min_i a_i, min_i b_i)); hi bounds the
// distance to the site at D*, hence s (beyond sectionUpper's 3000 km, hi
// is NearestBounds' upper bound from the site of smallest rectifying
// chord). lo is at most Bounds' lower bound (which takes the larger
// bound site by site), so the interval can be a little wider than Bounds'
// where two sites are almost equally near, but it costs two squared chords
// per listed site and two arcsines in all, where Bounds also takes an
// arcsine and a square root for every site near the smallest lower bound.
// ok is false for an empty list or an invalid point.
func (n *Near) QuickBounds(pt *Point) (lo, hi float64, ok bool) {
	if len(n.slots) == 0 || !pt.ok {
		return 0, 0, false
	}
	ix := n.ix
	r, e, at := math.Inf(1), math.Inf(1), -1
	for _, s := range n.slots {
		if d := d2(&ix.pts[s], &pt.q); d < r {
			r, at = d, int(s)
		}
		e = math.Min(e, d2(&ix.ecef[s], &pt.p))
	}
	chord := math.Sqrt(e)
	sigma := 2 * math.Asin(math.Min(1, math.Sqrt(r)/2))
	lo = math.Max(0, math.Max(sigma*rectBound*(1-1e-9)-marginAbs, chord*(1-marginRel)-marginAbs))
	hi = sectionUpper(chord)
	if math.IsInf(hi, 1) {
		st := query{lat: pt.lat, lon: pt.lon, q: pt.q, bestD2: r, bestAt: at}
		_, hi = ix.chordBounds(&st, pt.k)
	}
	return lo, hi, true
}

// StraightBounds returns bounds lo <= s <= hi on the geodesic distance s
// from pt to its nearest site, valid, like QuickBounds, provided that site
// is in the list, from the smallest straight (ECEF) distance D* over the
// listed sites alone:
//
//	lo = D* (1 - 1e-12) - margin     (bound (2) of Index)
//	hi = sectionUpper(D*)
//
// It skips QuickBounds' rectifying chords (one squared chord per site and
// an arcsine): lo falls short of s by about s^3 / (24 R^2) (1 m at 100 km,
// 28 m at 300 km), where bound (1) can be tighter on north-south lines
// longer than a few hundred kilometres; callers that need an interval only
// far from a threshold lose little. Beyond sectionUpper's 3000 km it is
// QuickBounds. ok is false for an empty list or an invalid point.
func (n *Near) StraightBounds(pt *Point) (lo, hi float64, ok bool) {
	if len(n.slots) == 0 || !pt.ok {
		return 0, 0, false
	}
	e := math.Inf(1)
	for i := range n.ecef {
		if d := d2(&n.ecef[i], &pt.p); d < e {
			e = d
		}
	}
	chord := math.Sqrt(e)
	hi = sectionUpper(chord)
	if math.IsInf(hi, 1) {
		return n.QuickBounds(pt)
	}
	return math.Max(0, chord*(1-marginRel)-marginAbs), hi, true
}
