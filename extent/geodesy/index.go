package geodesy

import (
	"fmt"
	"math"
)

// minCurvRadius is the smallest principal radius of curvature of WGS84. Every
// principal radius, meridional M = a(1-e^2)/(1-e^2 sin^2 phi)^(3/2) or prime
// vertical N = a/(1-e^2 sin^2 phi)^(1/2), lies in [a(1-e^2), a/sqrt(1-e^2)]
// = [6335439.3 m, 6399593.6 m] (M at the equator; M = N at the poles).
const minCurvRadius = SemiMajor * (1 - EccentricitySq)

// Safety margin added to a geodesic distance before it is turned into a
// chord bound: covers PROJ's ~15 nm error and rounding of the unit vectors
// (~1e-16 rad, ~1 nm) with room to spare.
const (
	marginAbs = 1e-6  // metres
	marginRel = 1e-12 // relative
)

// leafSize is the largest kd-tree range scanned linearly.
const leafSize = 8

// Index answers nearest-site queries exactly in WGS84 geodesic distance.
//
// Sites are stored as Earth-centred unit normal vectors n = (cos phi cos
// lambda, cos phi sin lambda, sin phi) of their geodetic latitude phi and
// longitude lambda, in a kd-tree searched by chord length |n1 - n2| =
// 2 sin(theta/2), theta being the angle between the normals. Because the
// Gauss map of the ellipsoid has derivative bounded by the principal
// curvatures, the geodesic distance s and theta satisfy, for any two points,
//
//	a(1-e^2) theta  <=  s  <=  a/sqrt(1-e^2) theta
//
// (|dn/ds| <= 1/min radius along any curve gives the left side; the preimage
// of the great-circle arc between the normals has length <= max radius *
// theta, giving the right). A query therefore first finds the chord-nearest
// site j and its exact geodesic distance s_j (Inverse), and then evaluates
// Inverse for every site with
//
//	theta <= (s_best (1 + 1e-12) + 1e-6 m) / (a(1-e^2))
//
// shrinking s_best as better sites appear. No site outside this bound can be
// nearer, so the answer is the true geodesic nearest site (ties go to the
// smallest site index), identical to a brute-force minimum of Distance. The
// chord margin is at most a(1-e^2)/(a/sqrt(1-e^2)) ~ 1.01: only sites within
// about 1% of the nearest distance are ever measured exactly.
//
// An Index is read-only after NewIndex and safe for concurrent use.
type Index struct {
	lat, lon []float64    // site coordinates in input order
	pts      [][3]float64 // unit normals in tree order
	ids      []int32      // site index of each tree slot
	axis     []uint8      // split axis of each tree slot (internal nodes)
}

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
		ids:  make([]int32, n),
		axis: make([]uint8, n),
	}
	for i := range n {
		if !(math.Abs(lats[i]) <= 90) {
			return nil, fmt.Errorf("geodesy: NewIndex: site %d: latitude %v outside [-90, 90]", i, lats[i])
		}
		if !(math.Abs(lons[i]) <= 360) {
			return nil, fmt.Errorf("geodesy: NewIndex: site %d: longitude %v outside [-360, 360]", i, lons[i])
		}
		ix.pts[i] = unitNormal(lats[i], lons[i])
		ix.ids[i] = int32(i)
	}
	ix.build(0, n)
	return ix, nil
}

// Len returns the number of sites.
func (ix *Index) Len() int { return len(ix.lat) }

// Site returns the coordinates (degrees) of site i as given to NewIndex.
func (ix *Index) Site(i int) (lat, lon float64) { return ix.lat[i], ix.lon[i] }

// unitNormal returns the outward unit normal of WGS84 at geodetic (lat, lon).
func unitNormal(lat, lon float64) [3]float64 {
	sp, cp := math.Sincos(lat * math.Pi / 180)
	sl, cl := math.Sincos(lon * math.Pi / 180)
	return [3]float64{cp * cl, cp * sl, sp}
}

// build arranges pts[lo:hi] as an implicit kd-tree: the median along the
// axis of largest spread sits at mid = (lo+hi)/2, smaller-or-equal values to
// its left, larger-or-equal to its right. Ranges of at most leafSize slots
// are leaves.
func (ix *Index) build(lo, hi int) {
	for hi-lo > leafSize {
		var mn, mx [3]float64
		mn, mx = ix.pts[lo], ix.pts[lo]
		for _, p := range ix.pts[lo+1 : hi] {
			for k := range 3 {
				mn[k] = math.Min(mn[k], p[k])
				mx[k] = math.Max(mx[k], p[k])
			}
		}
		ax := 0
		for k := 1; k < 3; k++ {
			if mx[k]-mn[k] > mx[ax]-mn[ax] {
				ax = k
			}
		}
		mid := (lo + hi) / 2
		ix.selectNth(lo, hi, mid, ax)
		ix.axis[mid] = uint8(ax)
		ix.build(lo, mid)
		lo = mid + 1
	}
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
	ix.ids[i], ix.ids[j] = ix.ids[j], ix.ids[i]
}

// chordBound returns the squared chord between unit normals that corresponds
// to a geodesic distance s under the lower bound s >= a(1-e^2) theta, with the
// safety margin applied: every site at geodesic distance <= s has squared
// chord <= chordBound(s).
func chordBound(s float64) float64 {
	theta := (s*(1+marginRel) + marginAbs) / minCurvRadius
	if !(theta < math.Pi) {
		return 5 // larger than any squared chord (max 4)
	}
	c := 2 * math.Sin(theta/2)
	return c * c
}

// query is the per-call search state (kept on the caller's stack).
type query struct {
	lat, lon float64
	q        [3]float64
	// chord stage
	bestD2 float64
	bestAt int // tree slot, -1 if none
	// exact stage
	skip  int32   // site already measured
	limit float64 // squared chord bound for the exact stage
	cap   float64 // maxDist cap for limit (+Inf if none)
	id    int32   // best site so far
	s     float64 // its geodesic distance
}

func d2(a, b *[3]float64) float64 {
	x, y, z := a[0]-b[0], a[1]-b[1], a[2]-b[2]
	return x*x + y*y + z*z
}

// Nearest returns the index of the site nearest to (lat, lon) (degrees) in
// WGS84 geodesic distance, and that distance in metres, equal to
// Distance(lat, lon, siteLat, siteLon). Ties go to the smallest site index.
// When maxDist > 0 and no site lies within maxDist metres it returns
// (-1, +Inf); that path touches only a few kd-tree nodes and makes no
// geodesic computation. A non-positive or NaN maxDist means no limit. If
// lat is outside [-90, 90] or lon is not finite it returns (-1, NaN). Safe
// for concurrent use; it does not allocate.
func (ix *Index) Nearest(lat, lon, maxDist float64) (int, float64) {
	if !(math.Abs(lat) <= 90) || math.IsInf(lon, 0) || math.IsNaN(lon) {
		return -1, math.NaN()
	}
	st := query{lat: lat, lon: lon, q: unitNormal(lat, lon), bestD2: 5, bestAt: -1, cap: math.Inf(1)}
	if maxDist > 0 && !math.IsInf(maxDist, 1) {
		st.cap = maxDist
		st.bestD2 = chordBound(maxDist)
	}
	// Stage 1: chord-nearest site, pruned by the maxDist bound.
	ix.nearestChord(0, len(ix.pts), &st)
	if st.bestAt < 0 {
		return -1, math.Inf(1)
	}
	id := ix.ids[st.bestAt]
	// Stage 2: exact geodesic distance for every site that could be nearer.
	st.id = id
	st.skip = id
	st.s = wgs84.distance(lat, lon, ix.lat[id], ix.lon[id])
	st.limit = chordBound(math.Min(st.s, st.cap))
	ix.nearestExact(0, len(ix.pts), &st)
	if st.s > st.cap {
		return -1, math.Inf(1)
	}
	return int(st.id), st.s
}

func (ix *Index) nearestChord(lo, hi int, st *query) {
	for {
		if hi-lo <= leafSize {
			for i := lo; i < hi; i++ {
				if d := d2(&ix.pts[i], &st.q); d < st.bestD2 {
					st.bestD2, st.bestAt = d, i
				}
			}
			return
		}
		mid := (lo + hi) / 2
		if d := d2(&ix.pts[mid], &st.q); d < st.bestD2 {
			st.bestD2, st.bestAt = d, mid
		}
		ax := ix.axis[mid]
		diff := st.q[ax] - ix.pts[mid][ax]
		nlo, nhi, flo, fhi := lo, mid, mid+1, hi
		if diff > 0 {
			nlo, nhi, flo, fhi = mid+1, hi, lo, mid
		}
		ix.nearestChord(nlo, nhi, st)
		if diff*diff >= st.bestD2 {
			return
		}
		lo, hi = flo, fhi
	}
}

// visit measures site slot i exactly if its chord is within the bound.
func (ix *Index) visit(i int, st *query) {
	if d2(&ix.pts[i], &st.q) > st.limit {
		return
	}
	id := ix.ids[i]
	if id == st.skip {
		return
	}
	s := wgs84.distance(st.lat, st.lon, ix.lat[id], ix.lon[id])
	if s < st.s || (s == st.s && id < st.id) {
		if s < st.s {
			st.limit = chordBound(math.Min(s, st.cap))
		}
		st.s, st.id = s, id
	}
}

func (ix *Index) nearestExact(lo, hi int, st *query) {
	for {
		if hi-lo <= leafSize {
			for i := lo; i < hi; i++ {
				ix.visit(i, st)
			}
			return
		}
		mid := (lo + hi) / 2
		ix.visit(mid, st)
		ax := ix.axis[mid]
		diff := st.q[ax] - ix.pts[mid][ax]
		nlo, nhi, flo, fhi := lo, mid, mid+1, hi
		if diff > 0 {
			nlo, nhi, flo, fhi = mid+1, hi, lo, mid
		}
		ix.nearestExact(nlo, nhi, st)
		if diff*diff > st.limit {
			return
		}
		lo, hi = flo, fhi
	}
}
