package geodesy

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"sync"
)

// Safety margin added to a geodesic distance before it is turned into a
// bound: covers PROJ's ~15 nm error and the rounding of the unit vectors
// (~1e-16 rad, ~1 nm) with room to spare.
const (
	marginAbs = 1e-6  // metres
	marginRel = 1e-12 // relative
)

// leafSize is the largest kd-tree range scanned linearly.
const leafSize = 8

// Index answers nearest-site queries exactly in WGS84 geodesic distance.
//
// Each site is stored as the Earth-centred unit vector of its rectifying
// latitude mu and longitude lambda,
//
//	v = (cos mu cos lambda, cos mu sin lambda, sin mu),  mu = m(phi) / R_r,
//
// where m(phi) is the meridian arc from the equator and R_r = m(90)/(pi/2) =
// 6 367 449.146 m the rectifying radius (Helmert's series in the third
// flattening n; e.g. Karney 2011, Transverse Mercator with an accuracy of a
// few nanometers, J. Geodesy 85:475-485, eqs. 3 and 5), together with its
// ECEF position. Sites are kept in a kd-tree on v (median splits, a bounding
// box per node) searched by chord length |v1 - v2| = 2 sin(sigma/2). Two lower
// bounds on the geodesic distance s
// prune the search, both rigorous:
//
//	s >= R_r sigma (1 - 1e-9)     (1)
//	s >= D  (straight ECEF chord) (2)
//
// (2) holds because the segment is the shortest curve. For (1), the map from
// the ellipsoid to the unit sphere (phi, lambda) -> v stretches a meridian
// element M dphi to dmu = M dphi / R_r, exactly 1/R_r, and a parallel element
// N cos(phi) dlambda to cos(mu) dlambda, a stretch cos(mu)/(N cos phi) that
// is below 1/R_r at every latitude (the gap 1 - R_r cos(mu)/(N cos phi) falls
// from 0.0017 at the equator to 0 at the poles; checked on a 0.001-degree grid
// in the tests). So the image of the geodesic is a curve of length <= s/R_r
// joining v1 and v2, and sigma <= s/R_r; the factor 1 - 1e-9 absorbs the
// ~1e-13 truncation of the series. Bound (1) is exact for meridians and within
// 0.17% of s at worst (east-west on the equator: R_r/a); bound (2) is within
// s^2/(24 R^2) for short lines; a randomised test checks both against Inverse.
//
// A query first finds the chord-nearest site j and its exact geodesic
// distance s_j (Inverse). It then collects the sites not excluded by (1) and
// (2) applied to
//
//	s_lim = s_best (1 + 1e-12) + 1e-6 m       (s_lim <= maxDist when given)
//
// and measures them exactly (Inverse) in increasing order of chord, shrinking
// s_best as better sites appear and stopping at the first site whose chord
// exceeds the bound for the current s_best. No excluded site can be nearer,
// so the answer is the true geodesic nearest site, identical to a brute-force
// minimum of Distance (ties go to the smallest site index). Only sites within
// at most 0.17% of the nearest distance (much less for short or north-south
// lines) are ever measured: typically none besides j for nearby queries and a
// few for queries thousands of kilometres from a dense cluster.
//
// An Index is read-only after NewIndex and safe for concurrent use.
type Index struct {
	lat, lon []float64       // site coordinates in input order
	pts      [][3]float64    // rectifying unit vectors in tree order
	ecef     [][3]float64    // ECEF positions (m) in tree order
	ids      []int32         // site index of each tree slot
	axis     []uint8         // split axis of each tree slot (internal nodes)
	box      [][2][3]float64 // bounding box (min, max) of the range at each mid slot
	stretch  []float64       // stretchAt(|latitude|) of each tree slot's site
	slot     []int32         // tree slot of each site (the inverse of ids)
}

// Rectifying latitude (Helmert's series, Karney 2011 eqs. 3 and 5).
var (
	thirdFlat = Flattening / (2 - Flattening) // n
	// rectRadius is R_r = a/(1+n) (1 + n^2/4 + n^4/64).
	rectRadius = SemiMajor / (1 + thirdFlat) * (1 + thirdFlat*thirdFlat/4 + thirdFlat*thirdFlat*thirdFlat*thirdFlat/64)
	// rectBound is the radius of bound (1), R_r shrunk to absorb the series
	// truncation.
	rectBound = rectRadius * (1 - 1e-9)
	rectC     = func() [4]float64 {
		n := thirdFlat
		n2, n3, n4 := n*n, n*n*n, n*n*n*n
		return [4]float64{-(3*n/2 - 9*n3/16), 15*n2/16 - 15*n4/32, -35 * n3 / 48, 315 * n4 / 512}
	}()
)

// rectifying returns the rectifying latitude mu (radians) of geodetic
// latitude phi (radians):
//
//	mu = phi - (3n/2 - 9n^3/16) sin 2phi + (15n^2/16 - 15n^4/32) sin 4phi
//	         - (35n^3/48) sin 6phi + (315n^4/512) sin 8phi
func rectifying(phi float64) float64 {
	s2, c2 := math.Sincos(2 * phi)
	s4 := 2 * s2 * c2
	c4 := c2*c2 - s2*s2
	s6 := s4*c2 + c4*s2
	s8 := 2 * s4 * c4
	return phi + rectC[0]*s2 + rectC[1]*s4 + rectC[2]*s6 + rectC[3]*s8
}

// siteVectors returns the rectifying unit vector and the ECEF position (m)
// of geodetic (lat, lon) in degrees.
func siteVectors(lat, lon float64) (v, p [3]float64) {
	phi := lat * math.Pi / 180
	sl, cl := math.Sincos(lon * math.Pi / 180)
	sm, cm := math.Sincos(rectifying(phi))
	v = [3]float64{cm * cl, cm * sl, sm}
	return v, ecefOf(phi, sl, cl)
}

// ECEF returns the Earth-centred, Earth-fixed position (m) of geodetic
// (lat, lon) in degrees on WGS84, the position the Index keeps for a
// site there, bit for bit.
func ECEF(lat, lon float64) [3]float64 {
	sl, cl := math.Sincos(lon * math.Pi / 180)
	return ecefOf(lat*math.Pi/180, sl, cl)
}

// ecefOf is ECEF for latitude phi in radians, given the sine and cosine
// of the longitude, via the parametric latitude beta:
//
//	(a cos beta cos lon, a cos beta sin lon, b sin beta),  tan beta = (1 - f) tan phi.
func ecefOf(phi, sl, cl float64) [3]float64 {
	ar, zr := parametric(phi)
	return [3]float64{ar * cl, ar * sl, zr}
}

// ECEFRow returns the parts of ECEF that depend on the latitude alone,
// a cos(beta) and b sin(beta) at geodetic latitude lat (degrees), so that
// ECEF(lat, lon) = (ar cos lon, ar sin lon, zr) bit for bit: a row of a
// latitude-longitude grid computes them once.
func ECEFRow(lat float64) (ar, zr float64) { return parametric(lat * math.Pi / 180) }

// parametric is ECEFRow for latitude phi in radians.
func parametric(phi float64) (ar, zr float64) {
	sp, cp := math.Sincos(phi)
	sp *= 1 - Flattening
	h := math.Hypot(sp, cp)
	return SemiMajor * (cp / h), SemiMinor * (sp / h)
}

// ChordUpper returns an upper bound on the geodesic distance (m) between
// two points of the ellipsoid given by their ECEF positions (ECEF): the
// bound of the straight distance D between them described at
// sectionUpper, 2 rho asin(D / (2 rho)) with rho = b^2 / a and a safety
// margin, under 0.1 mm above the geodesic for points up to 10 km apart;
// +Inf when D exceeds 3000 km or a position is NaN.
func ChordUpper(a, b *[3]float64) float64 { return sectionUpper(math.Sqrt(d2(a, b))) }

// NewIndex builds an Index over sites (lats[i], lons[i]) in degrees. Latitudes
// must lie in [-90, 90] and longitudes in [-360, 360]. The coordinates are
// copied.
func NewIndex(lats, lons []float64) (*Index, error) {
	if len(lats) != len(lons) {
		return nil, fmt.Errorf("geodesy: NewIndex: %d latitudes but %d longitudes", len(lats), len(lons))
	}
	n := len(lats)
	if n == 0 {
		return nil, fmt.Errorf("geodesy: NewIndex: no sites")
	}
	if n > math.MaxInt32 {
		return nil, fmt.Errorf("geodesy: NewIndex: %d sites exceed the limit of %d", n, math.MaxInt32)
	}
	ix := &Index{
		lat:  append([]float64(nil), lats...),
		lon:  append([]float64(nil), lons...),
		pts:  make([][3]float64, n),
		ecef: make([][3]float64, n),
		ids:  make([]int32, n),
		axis: make([]uint8, n),
		box:  make([][2][3]float64, n),

		stretch: make([]float64, n),
	}
	for i := range n {
		if !(math.Abs(lats[i]) <= 90) {
			return nil, fmt.Errorf("geodesy: NewIndex: site %d: latitude %v outside [-90, 90]", i, lats[i])
		}
		if !(math.Abs(lons[i]) <= 360) {
			return nil, fmt.Errorf("geodesy: NewIndex: site %d: longitude %v outside [-360, 360]", i, lons[i])
		}
		ix.pts[i], ix.ecef[i] = siteVectors(lats[i], lons[i])
		ix.ids[i] = int32(i)
		ix.stretch[i] = stretchAt(math.Abs(lats[i]))
	}
	ix.build(0, n)
	ix.slot = make([]int32, n)
	for i, id := range ix.ids {
		ix.slot[id] = int32(i)
	}
	return ix, nil
}

// Slot returns the position of site i in the tree's order, in which
// sites near each other sit near each other (a kd-tree's ranges): a
// cache of per-site values indexed by it touches fewer blocks of memory
// for the sites of one neighbourhood than one indexed by i.
func (ix *Index) Slot(i int) int { return int(ix.slot[i]) }

// Len returns the number of sites.
func (ix *Index) Len() int { return len(ix.lat) }

// Site returns the coordinates (degrees) of site i as given to NewIndex.
func (ix *Index) Site(i int) (lat, lon float64) { return ix.lat[i], ix.lon[i] }

// build arranges pts[lo:hi] as an implicit kd-tree: the median along the
// axis of largest spread sits at mid = (lo+hi)/2, smaller-or-equal values to
// its left, larger-or-equal to its right. Ranges of at most leafSize slots
// are leaves. Every non-empty range, leaf or not, stores the bounding box of
// its points at its mid slot (mid slots of distinct ranges are distinct).
func (ix *Index) build(lo, hi int) {
	if hi <= lo {
		return
	}
	mn, mx := ix.pts[lo], ix.pts[lo]
	for _, p := range ix.pts[lo+1 : hi] {
		for k := range 3 {
			mn[k] = math.Min(mn[k], p[k])
			mx[k] = math.Max(mx[k], p[k])
		}
	}
	mid := (lo + hi) / 2
	ix.box[mid] = [2][3]float64{mn, mx}
	if hi-lo <= leafSize {
		return
	}
	ax := 0
	for k := 1; k < 3; k++ {
		if mx[k]-mn[k] > mx[ax]-mn[ax] {
			ax = k
		}
	}
	ix.selectNth(lo, hi, mid, ax)
	ix.axis[mid] = uint8(ax)
	ix.build(lo, mid)
	ix.build(mid+1, hi)
}

// boxD2 returns the squared distance from q to the bounding box of the range
// whose mid slot is mid.
func (ix *Index) boxD2(mid int, q *[3]float64) float64 {
	b := &ix.box[mid]
	var d float64
	for k := range 3 {
		if v := b[0][k] - q[k]; v > 0 {
			d += v * v
		} else if v := q[k] - b[1][k]; v > 0 {
			d += v * v
		}
	}
	return d
}

// selectNth reorders slots [lo, hi) so that slot k holds the value it would
// hold if sorted along axis ax (Hoare quickselect, median-of-three pivot).
func (ix *Index) selectNth(lo, hi, k, ax int) {
	hi-- // inclusive
	for lo < hi {
		m := lo + (hi-lo)/2
		// median of three to slot m
		if ix.pts[m][ax] < ix.pts[lo][ax] {
			ix.swap(m, lo)
		}
		if ix.pts[hi][ax] < ix.pts[lo][ax] {
			ix.swap(hi, lo)
		}
		if ix.pts[hi][ax] < ix.pts[m][ax] {
			ix.swap(hi, m)
		}
		pivot := ix.pts[m][ax]
		i, j := lo, hi
		for i <= j {
			for ix.pts[i][ax] < pivot {
				i++
			}
			for ix.pts[j][ax] > pivot {
				j--
			}
			if i <= j {
				ix.swap(i, j)
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return
		}
	}
}

func (ix *Index) swap(i, j int) {
	ix.pts[i], ix.pts[j] = ix.pts[j], ix.pts[i]
	ix.ecef[i], ix.ecef[j] = ix.ecef[j], ix.ecef[i]
	ix.ids[i], ix.ids[j] = ix.ids[j], ix.ids[i]
	ix.stretch[i], ix.stretch[j] = ix.stretch[j], ix.stretch[i]
}

// withMargin returns s with the safety margin added.
func withMargin(s float64) float64 { return s*(1+marginRel) + marginAbs }

// chordBound returns the squared rectifying chord corresponding to the
// geodesic distance sl under bound (1), s >= R_r sigma (1 - 1e-9): every site
// at geodesic distance <= sl has squared chord <= chordBound(sl).
func chordBound(sl float64) float64 {
	sigma := sl / rectBound
	if !(sigma < math.Pi) {
		return 5 // larger than any squared chord (max 4)
	}
	c := 2 * math.Sin(sigma/2)
	return c * c
}

// query is the per-call search state (kept on the caller's stack).
type query struct {
	lat, lon float64
	q        [3]float64 // rectifying unit vector
	p        [3]float64 // ECEF position (m)
	// chord stage
	bestD2 float64
	bestAt int // tree slot, -1 if none
	// exact stage
	skip  int32   // site already measured
	limit float64 // squared chord bound (1) for the exact stage
	ecef2 float64 // squared ECEF chord bound (2), m^2
	cap   float64 // maxDist cap for the bounds (+Inf if none)
	id    int32   // best site so far
	s     float64 // its geodesic distance
}

// setLimits sets the exact-stage bounds from the best distance so far.
func (st *query) setLimits() {
	sl := withMargin(math.Min(st.s, st.cap))
	st.limit = chordBound(sl)
	st.ecef2 = sl * sl
}

func d2(a, b *[3]float64) float64 {
	x, y, z := a[0]-b[0], a[1]-b[1], a[2]-b[2]
	return x*x + y*y + z*z
}

// Nearest returns the index of the site nearest to (lat, lon) (degrees) in
// WGS84 geodesic distance, and that distance in metres, equal to
// Distance(lat, lon, siteLat, siteLon). Ties go to the smallest site index.
// When maxDist > 0 and no site lies within maxDist metres it returns
// (-1, +Inf); when no site passes the cheap chord bound (1) for maxDist, the
// usual case for cells far from all sites, that path touches only a few
// kd-tree nodes and makes no geodesic computation. A non-positive or NaN
// maxDist means no limit; +Inf is the same. If lat is outside [-90, 90] or
// lon is not finite it returns (-1, NaN). Safe for concurrent use; it does not
// allocate. Cost: a kd-tree descent, one Inverse, plus one Inverse per site
// that the bounds cannot exclude (see Index).
func (ix *Index) Nearest(lat, lon, maxDist float64) (int, float64) {
	if !(math.Abs(lat) <= 90) || math.IsInf(lon, 0) || math.IsNaN(lon) {
		return -1, math.NaN()
	}
	pt := Point{lat: lat, lon: lon, ok: true}
	pt.q, pt.p = siteVectors(lat, lon)
	return ix.nearest(&pt, maxDist)
}

// nearest is Nearest at a valid prepared point.
func (ix *Index) nearest(pt *Point, maxDist float64) (int, float64) {
	lat, lon := pt.lat, pt.lon
	st := query{lat: lat, lon: lon, q: pt.q, p: pt.p, bestD2: 5, bestAt: -1, cap: math.Inf(1)}
	if maxDist > 0 && !math.IsInf(maxDist, 1) {
		st.cap = maxDist
		// Sites with chord equal to the bound remain eligible: use the next float.
		st.bestD2 = math.Nextafter(chordBound(withMargin(maxDist)), 5)
	}
	// Stage 1: chord-nearest site, pruned by the maxDist bound.
	ix.nearestChord(0, len(ix.pts), &st)
	if st.bestAt < 0 {
		return -1, math.Inf(1)
	}
	id := ix.ids[st.bestAt]
	// Stage 2: exact geodesic distance for every site that could be nearer,
	// measured in increasing order of the chord bound so that s_best shrinks
	// to the true minimum after a few sites and the rest are cut off.
	st.id = id
	st.skip = id
	st.s = wgs84.distance(lat, lon, ix.lat[id], ix.lon[id])
	st.setLimits()
	bp := candPool.Get().(*[]cand)
	buf := (*bp)[:0]
	ix.collect(0, len(ix.pts), &st, &buf)
	slices.SortFunc(buf, func(a, b cand) int { return cmp.Compare(a.d2, b.d2) })
	for _, c := range buf {
		if c.d2 > st.limit {
			break
		}
		ix.visit(int(c.slot), &st)
	}
	if cap(buf) <= maxPooledCands {
		*bp = buf[:0]
		candPool.Put(bp)
	}
	if st.s > st.cap {
		return -1, math.Inf(1)
	}
	return int(st.id), st.s
}

// nearestChord finds the slot with the smallest chord to st.q below
// st.bestD2 in the range [lo, hi), pruning ranges by their bounding boxes.
func (ix *Index) nearestChord(lo, hi int, st *query) {
	if hi <= lo {
		return
	}
	mid := (lo + hi) / 2
	if ix.boxD2(mid, &st.q) >= st.bestD2 {
		return
	}
	if hi-lo <= leafSize {
		for i := lo; i < hi; i++ {
			if d := d2(&ix.pts[i], &st.q); d < st.bestD2 {
				st.bestD2, st.bestAt = d, i
			}
		}
		return
	}
	if d := d2(&ix.pts[mid], &st.q); d < st.bestD2 {
		st.bestD2, st.bestAt = d, mid
	}
	if st.q[ix.axis[mid]] > ix.pts[mid][ix.axis[mid]] {
		ix.nearestChord(mid+1, hi, st)
		ix.nearestChord(lo, mid, st)
	} else {
		ix.nearestChord(lo, mid, st)
		ix.nearestChord(mid+1, hi, st)
	}
}

// visit measures site slot i exactly unless bound (1) or (2) excludes it.
func (ix *Index) visit(i int, st *query) {
	if d2(&ix.pts[i], &st.q) > st.limit || d2(&ix.ecef[i], &st.p) > st.ecef2 {
		return
	}
	id := ix.ids[i]
	if id == st.skip {
		return
	}
	s := wgs84.distance(st.lat, st.lon, ix.lat[id], ix.lon[id])
	if s < st.s || (s == st.s && id < st.id) {
		better := s < st.s
		st.s, st.id = s, id
		if better {
			st.setLimits()
		}
	}
}

// cand is a site slot that passed the bounds, with its squared chord.
type cand struct {
	d2   float64
	slot int32
}

// candPool recycles candidate buffers so that queries do not allocate.
var candPool = sync.Pool{New: func() any { b := make([]cand, 0, 64); return &b }}

// maxPooledCands limits the capacity of buffers returned to candPool.
const maxPooledCands = 1 << 16

// collect appends to buf every site slot in [lo, hi) that passes bounds (1)
// and (2) for the current limits, except the site already measured.
func (ix *Index) collect(lo, hi int, st *query, buf *[]cand) {
	if hi <= lo {
		return
	}
	mid := (lo + hi) / 2
	if ix.boxD2(mid, &st.q) > st.limit {
		return
	}
	if hi-lo <= leafSize {
		for i := lo; i < hi; i++ {
			ix.consider(i, st, buf)
		}
		return
	}
	ix.consider(mid, st, buf)
	ix.collect(lo, mid, st, buf)
	ix.collect(mid+1, hi, st, buf)
}

func (ix *Index) consider(i int, st *query, buf *[]cand) {
	d := d2(&ix.pts[i], &st.q)
	if d > st.limit || d2(&ix.ecef[i], &st.p) > st.ecef2 || ix.ids[i] == st.skip {
		return
	}
	*buf = append(*buf, cand{d2: d, slot: int32(i)})
}

// stretchMax bounds k = N cos(phi) / (R_r cos(mu)), the factor by which the
// ellipsoid's east-west length element exceeds R_r times the unit sphere's
// at the same point (k >= 1 is bound (1)'s stretch condition). k is largest
// at the equator, a/R_r = 1.001679; TestStretchMax checks the bound on a
// 0.001-degree grid.
const stretchMax = 1.0017

// NearestBounds returns bounds lo <= s <= hi on the geodesic distance s
// (metres) from (lat, lon) to its nearest site, from the kd-tree's chord
// stage alone (no geodesic computation). With sigma the angle of the
// smallest rectifying chord, bound (1) gives s >= R_r sigma, and the curve
// on the ellipsoid whose image is the great-circle arc of angle sigma has
// length at most R_r k_max sigma, since
//
//	ds^2 = R_r^2 (dmu^2 + k^2 cos^2(mu) dlambda^2) <= (R_r k_max dsigma)^2,
//
// so s <= R_r k_max sigma, with k_max the stretch at the arc's end nearer
// the equator (k falls with |latitude|; at most 1.0017 at the equator,
// 1.0009 at 45 degrees). The interval is at most 0.17% of s wide. When no site can lie within maxDist (> 0) it returns
// (maxDist, +Inf): every site is farther. Invalid coordinates give
// (NaN, NaN). Safe for concurrent use.
func (ix *Index) NearestBounds(lat, lon, maxDist float64) (lo, hi float64) {
	pt := NewPoint(lat, lon)
	lo, hi, _ = ix.BoundsAt(&pt, maxDist, -1)
	return lo, hi
}

// stretchAt is k = a cos(beta) / (R_r cos(mu)) at geodetic latitude lat
// (degrees, 0 <= lat < 90), beta the reduced and mu the rectifying latitude.
// It is 1 at the poles' limit and a/R_r at the equator, and falls in
// between (TestStretchMax).
func stretchAt(lat float64) float64 {
	phi := lat * math.Pi / 180
	beta := math.Atan2((1-Flattening)*math.Sin(phi), math.Cos(phi))
	cm := math.Cos(rectifying(phi))
	if cm <= 0 {
		return stretchMax
	}
	return SemiMajor * math.Cos(beta) / (rectRadius * cm)
}
