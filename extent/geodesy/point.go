package geodesy

import "math"

// Point is a query position prepared once for any number of Index queries:
// its coordinates, its rectifying unit vector and ECEF position (those of
// siteVectors, bit for bit) and the stretch k at its latitude (stretchAt).
// Prepare it with NewPoint, or with Parallel.Point for many points on one
// parallel (the cells of a row of a latitude-longitude grid).
type Point struct {
	lat, lon float64
	q, p     [3]float64
	k        float64 // stretchAt(|lat|); NaN for invalid coordinates
	ok       bool    // lat in [-90, 90] and lon finite
}

// NewPoint prepares (lat, lon) in degrees. Invalid coordinates (latitude
// outside [-90, 90], non-finite longitude) give a Point for which every
// query answers as for those coordinates (see Nearest, NearestBounds).
func NewPoint(lat, lon float64) Point {
	pl := NewParallel(lat)
	s, c := math.Sincos(lon * math.Pi / 180)
	return pl.Point(lon, s, c)
}

// Parallel holds what the points of one latitude share, so that preparing
// a point on it costs a few multiplications given the sine and cosine of
// its longitude.
type Parallel struct {
	lat      float64
	cm, sm   float64 // cos and sin of the rectifying latitude
	acb, bsb float64 // a cos(beta) and b sin(beta), beta the reduced latitude
	k        float64 // stretchAt(|lat|)
	ok       bool
}

// NewParallel prepares latitude lat (degrees).
func NewParallel(lat float64) Parallel {
	pl := Parallel{lat: lat, ok: math.Abs(lat) <= 90}
	if !pl.ok {
		pl.k = math.NaN()
		return pl
	}
	phi := lat * math.Pi / 180
	pl.sm, pl.cm = math.Sincos(rectifying(phi))
	// As in siteVectors.
	sp, cp := math.Sincos(phi)
	sp *= 1 - Flattening
	h := math.Hypot(sp, cp)
	sb, cb := sp/h, cp/h
	pl.acb, pl.bsb = SemiMajor*cb, SemiMinor*sb
	pl.k = stretchAt(math.Abs(lat))
	return pl
}

// Point returns the point of the parallel at longitude lon (degrees), given
// sinLon and cosLon, the sine and cosine of lon in radians (as math.Sincos
// gives them for lon*math.Pi/180). The vectors equal those of
// NewPoint(lat, lon) bit for bit.
func (pl *Parallel) Point(lon, sinLon, cosLon float64) Point {
	pt := Point{lat: pl.lat, lon: lon, k: pl.k, ok: pl.ok && !math.IsInf(lon, 0) && !math.IsNaN(lon)}
	if !pt.ok {
		return pt
	}
	pt.q = [3]float64{pl.cm * cosLon, pl.cm * sinLon, pl.sm}
	pt.p = [3]float64{pl.acb * cosLon, pl.acb * sinLon, pl.bsb}
	return pt
}

// Lat and Lon return the point's coordinates in degrees.
func (pt *Point) Lat() float64 { return pt.lat }

// Lon returns the point's longitude in degrees.
func (pt *Point) Lon() float64 { return pt.lon }

// NearestAt is Nearest at a prepared point: the same site and distance,
// bit for bit.
func (ix *Index) NearestAt(pt *Point, maxDist float64) (int, float64) {
	if !pt.ok {
		return -1, math.NaN()
	}
	return ix.nearest(pt, maxDist)
}

// BoundsAt is NearestBounds at a prepared point, with a hint: the tree
// slot returned by an earlier call for a nearby point (or -1), from which
// the chord search starts, so that it prunes from its first node. The
// bounds are NearestBounds' whatever the hint (the chord stage finds the
// smallest chord either way; among sites at exactly equal chords the
// stretch of the one found is used, each one giving rigorous bounds).
// slot is the tree slot of the chord-nearest site, to pass as the next
// hint (-1 when no site can lie within maxDist).
func (ix *Index) BoundsAt(pt *Point, maxDist float64, hint int) (lo, hi float64, slot int) {
	if !pt.ok {
		return math.NaN(), math.NaN(), -1
	}
	st := query{lat: pt.lat, lon: pt.lon, q: pt.q, p: pt.p, bestD2: 5, bestAt: -1, cap: math.Inf(1)}
	if maxDist > 0 && !math.IsInf(maxDist, 1) {
		st.bestD2 = math.Nextafter(chordBound(withMargin(maxDist)), 5)
	}
	if hint >= 0 && hint < len(ix.pts) {
		if d := d2(&ix.pts[hint], &st.q); d < st.bestD2 {
			st.bestD2, st.bestAt = d, hint
		}
	}
	ix.nearestChord(0, len(ix.pts), &st)
	if st.bestAt < 0 {
		return maxDist, math.Inf(1), -1
	}
	lo, hi = ix.chordBounds(&st, pt.k)
	return lo, hi, st.bestAt
}

// chordBounds turns the chord stage's result into NearestBounds' interval;
// kq is stretchAt(|lat|) of the query.
func (ix *Index) chordBounds(st *query, kq float64) (lo, hi float64) {
	sigma := 2 * math.Asin(math.Min(1, math.Sqrt(st.bestD2)/2))
	// k falls with |latitude| and an arc between two points of one
	// hemisphere is nowhere nearer the equator than its ends, so the
	// stretch along the arc is at most k at the end nearer the equator:
	// the larger of the two ends' k.
	k := stretchMax
	if slat := ix.lat[ix.ids[st.bestAt]]; st.lat*slat >= 0 {
		k = math.Min(k, math.Max(kq, ix.stretch[st.bestAt])*(1+1e-9))
	}
	lo = math.Max(0, sigma*rectBound*(1-1e-9)-marginAbs)
	hi = withMargin(sigma*rectRadius*k*(1+1e-9)) + marginAbs
	return lo, hi
}

// Near is a short list of sites, those that may be nearest to some point
// of a small area, for cheap bounds at many points of it (Bounds). Fill it
// with Index.NearSites; the zero value is an empty list.
type Near struct {
	ix    *Index
	slots []int32
	ecef  [][3]float64 // ECEF position of each listed site, in list order
}

// NearSites fills n with every site that may lie within radius metres
// (geodesic) of pt: a superset from the two lower bounds of Index, like
// Within. For a point x at most rho from pt, whose nearest site is at most
// radius - rho from pt (e.g. radius = hi + 2 rho with hi >= the nearest
// distance at pt), the nearest site of x is in the list.
func (ix *Index) NearSites(pt *Point, radius float64, n *Near) {
	n.ix, n.slots, n.ecef = ix, n.slots[:0], n.ecef[:0]
	if !pt.ok || math.IsNaN(radius) || radius < 0 {
		return
	}
	st := query{lat: pt.lat, lon: pt.lon, q: pt.q, p: pt.p, skip: -1, cap: math.Inf(1), s: radius}
	st.setLimits()
	bp := candPool.Get().(*[]cand)
	buf := (*bp)[:0]
	ix.collect(0, len(ix.pts), &st, &buf)
	for _, c := range buf {
		n.slots = append(n.slots, c.slot)
		n.ecef = append(n.ecef, ix.ecef[c.slot])
	}
	if cap(buf) <= maxPooledCands {
		*bp = buf[:0]
		candPool.Put(bp)
	}
}

// Len is the number of sites in the list.
func (n *Near) Len() int { return len(n.slots) }

// Bounds returns bounds lo <= s <= hi on the geodesic distance s from pt
// to its nearest site, computed over the listed sites only and valid
// provided that site is in the list (see NearSites). hi is the smaller of
// NearestBounds' upper bound from the listed site of smallest chord and
// sectionUpper of the straight distance to that site (see TightBoundsAt).
// lo is the smallest
// over the listed sites i of the larger of bounds (1) and (2) of Index for
// site i,
//
//	lo = min_i max(R_r sigma_i (1 - 1e-9), D_i) - margin
//
// with D_i the straight ECEF chord, which is at most s_i; the nearest
// site's term is at most s. Bound (2) falls short of s by about
// s^3 / (24 R^2) (28 m at 300 km), far less than bound (1) on lines
// running east-west, so lo is often much tighter than NearestBounds'. The
// cost is one squared chord per listed site, plus a square root for the
// few within the first lower bound. ok is false for an empty list or an
// invalid point.
func (n *Near) Bounds(pt *Point) (lo, hi float64, ok bool) {
	if len(n.slots) == 0 || !pt.ok {
		return 0, 0, false
	}
	ix := n.ix
	st := query{lat: pt.lat, lon: pt.lon, q: pt.q, bestD2: math.Inf(1), bestAt: -1}
	for _, s := range n.slots {
		if d := d2(&ix.pts[s], &st.q); d < st.bestD2 {
			st.bestD2, st.bestAt = d, int(s)
		}
	}
	lo, hi = ix.chordBounds(&st, pt.k)
	chord := math.Sqrt(d2(&ix.ecef[st.bestAt], &pt.p))
	lo = math.Max(lo, math.Max(0, chord*(1-marginRel)-marginAbs)) // ecefBound
	hi = math.Min(hi, sectionUpper(chord))
	// Another site can lower lo only if its bound (1) lies below lo: its
	// squared chord lies below that of distance lo under bound (1), taken
	// a little large so that rounding never skips one.
	thr := chordBound(withMargin(lo)) * (1 + 1e-8)
	for _, s := range n.slots {
		if int(s) == st.bestAt {
			continue
		}
		d := d2(&ix.pts[s], &st.q)
		if d >= thr {
			continue
		}
		sigma := 2 * math.Asin(math.Min(1, math.Sqrt(d)/2))
		b1 := math.Max(0, sigma*rectBound*(1-1e-9)-marginAbs)
		lo = math.Min(lo, math.Max(b1, ecefBound(&ix.ecef[s], &pt.p)))
	}
	return lo, hi, true
}

// ecefBound is bound (2) of Index between ECEF positions a and b (metres):
// their straight distance, less the safety margin.
func ecefBound(a, b *[3]float64) float64 {
	return math.Max(0, math.Sqrt(d2(a, b))*(1-marginRel)-marginAbs)
}
