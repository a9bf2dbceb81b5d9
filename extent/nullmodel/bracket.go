package nullmodel

import (
	"cmp"
	"math"
	"math/bits"
	"slices"
	"sync"

	"areasweep/extent/geodesy"
)

// Binner tells which values a scoring pass keeps apart: a metrics
// Layout's exact bins and the bins of the layout's histogram floor grid,
// whose edges include every edge of every fine histogram on the layout
// (metrics.WithHistFloor; the pass's adapter is in cmd/internal/pass).
// Cell returns the values that share v's exact bin, an interval: u is in
// it iff
//
//	lo < u < hi,  or  u == lo when closed,
//
// so two values u1 <= u2 share it iff u2 < hi of u1's cell, and a
// bracketer that remembers the last cell places most brackets without
// asking again. FloorScale returns s = 2^-e for the floor grid of
// exponent e, whose bin of v is floor(v s), as metrics.Layout.FloorBin
// computes it: exact (a power of two only moves the binary point), -0
// counted as +0, and -1 for a tiny negative v whose product underflows to
// -0.
type Binner = interface {
	Cell(v float64) (lo, hi float64, closed bool)
	FloorScale() float64
}

// EdgeBinner is a Binner that also lists, per floor bin, the edges of the
// exact bins inside it: FloorEdges()[c] is the one value v whose exact bin
// is {v} (an edge) in the floor bin of the values [-c 2^e, -(c-1) 2^e)
// (bin -c), +Inf when that floor bin holds none (it lies inside one exact
// bin) and NaN when it holds several; the floor bins beyond the slice hold
// none. Two values u1 <= u2 of floor bin -c with edge v share their exact
// bin when u2 < v or u1 > v, without asking Cell. Bracket uses it when its
// Binner has it (FloorEdges builds the slice).
type EdgeBinner interface {
	Binner
	FloorEdges() []float64
}

// SubFloor is the number of sub-bins into which SubEdgeBinner cuts each
// floor bin: a power of two, so that the sub-bins are the floor bins of
// the grid of exponent e - 4, whose edges include the floor grid's.
const SubFloor = 16

// SubEdgeBinner is an EdgeBinner that also lists the exact bins' edges on
// the grid SubFloor times finer: SubFloorEdges() is FloorEdges(values,
// SubFloor*s) for the layout's values and its floor scale s. Bracket uses
// it, when its Binner has it, for the brackets whose floor bin holds
// several edges (FloorEdges' NaN), which most often lie in a sub-bin with
// one edge or none.
type SubEdgeBinner interface {
	EdgeBinner
	SubFloorEdges() []float64
}

// FloorEdges returns the FloorEdges slice of a layout whose exact bins
// have the single values edges (any order; the open intervals between
// them are the other bins) on the floor grid of scale s = 2^-e, up to the
// farthest floor bin -c that holds an edge. The floor bin of v is
// floor(v s), as Binner.FloorScale says (-0 counted as +0, a tiny
// negative v whose product underflows in bin -1). It returns nil (no bin
// known) when an edge is not finite or lies beyond maxFloorEdges bins.
func FloorEdges(edges []float64, s float64) []float64 {
	const maxFloorEdges = 1 << 22
	bin := func(v float64) int64 {
		x := v * s
		if x == 0 && v < 0 {
			return -1
		}
		return int64(math.Floor(x))
	}
	n := int64(0)
	for _, v := range edges {
		if !(v-v == 0) || -bin(v) >= maxFloorEdges {
			return nil
		}
		n = max(n, -bin(v)+1)
	}
	out := make([]float64, n)
	for c := range out {
		out[c] = math.Inf(1)
	}
	for _, v := range edges {
		c := -bin(v)
		switch {
		case c < 0:
		case math.IsInf(out[c], 1) || out[c] == v:
			out[c] = v
		default:
			out[c] = math.NaN()
		}
	}
	return out
}

// BracketTol is our choice of the largest relative error of the midpoint
// of a bracket that Bracket leaves unresolved: (hi - lo)/2 <= BracketTol *
// lo, so the midpoint is within 0.1% of the cell's distance, the width of
// Background's histogram bins. The sorting bias is computed from those
// midpoints.
const BracketTol = 1e-3

// Patches of the latitude-longitude fast path: anchors every patchP cells
// along rows and columns (global lattice), patchK cells on each side; the
// nearest-site candidates are found once per super-tile of superP x superP
// patches.
const (
	patchK = 2
	patchP = 2*patchK + 1
	superP = 3
	// SuperTile is the side, in cells, of the super-tiles; blocks whose
	// corners are multiples of it share no super-tile.
	SuperTile = superP * patchP
)

// The anchor rows of stencil assume an odd super-tile side: an even one
// would make the bounds wrong without any error, so it does not compile
// (array length -1).
var _ [SuperTile%2 - 1]struct{}

// Hessian comparison radii of the WGS84 ellipsoid: the Gaussian curvature
// K = 1/(M N) runs from b^2/a^4 (poles) to 1/b^2 (equator), so
// sqrt(Kmin) = b/a^2 and sqrt(Kmax) = 1/b.
var (
	sqrtKmin = geodesy.SemiMinor / (geodesy.SemiMajor * geodesy.SemiMajor)
	sqrtKmax = 1 / geodesy.SemiMinor
)

// maxTaylorDist is the largest distance (m) at which the Taylor bracket is
// used: the lower Hessian bound cot(r/b)/b stays positive below pi b/2 =
// 9985 km, its cheap form (hLoFast) holds below b = 6357 km, and the cut
// locus of a site is about 20 000 km away.
const maxTaylorDist = 6e6

// maxFarDist is the largest distance (m) at which the far form of the
// Taylor bracket is used (from maxTaylorDist on): our choice, 70 km short
// of pi b = 19 970 km, below which no point of the ellipsoid lies on a
// site's cut locus. By Klingenberg's lemma (W. Klingenberg, Ann. of Math.
// 69:654-666, 1959; do Carmo, Riemannian Geometry, 1992, ch. 13, prop.
// 2.12) the injectivity radius of a closed surface whose Gaussian
// curvature is at most 1/b^2 is at least the smaller of pi b and half
// its shortest closed geodesic, a meridian (40 008 km) on WGS84; so the
// distance to a site is smooth, and the Hessian comparison holds, at every
// point within it but the site. The far form's lower Hessian bound
// cot(r/b)/b falls towards -Inf at pi b: it is -1.4e-5 per metre at
// maxFarDist, which lowers the bracket of a cell 3 km from its anchor by
// 64 m. 70 km also keeps sin(r/b), the divisor of farCot, above 0.01,
// where farCot's 1e-12 covers its rounding many times over. Until
// 2026-12 this was 19 000 km, and the cells within 1,000 km of the
// antipodes of a dense cluster took the index's query, 50 to 60
// microseconds of CPU a cell (BenchmarkFieldBracketAntipode).
const maxFarDist = 19.9e6

// lonLat describes a north-up latitude-longitude grid: centre of cell
// (c, r) at (west + (c+0.5) dlon, north + (r+0.5) dlat) degrees, as
// extent.Grid.Centre computes it.
type lonLat struct {
	west, dlon, north, dlat float64
	sites                   [][3]float64 // ECEF position (m) of each site
	mu                      sync.Mutex
	rows                    map[[2]int]*stencil // by half side K and row of patches
}

// stencil holds, for the anchor row of one row of patches, the geodesic
// from the anchor cell to each cell of its patch: length t and the sine
// and cosine of its azimuth at the anchor. ok is false when a latitude of
// the patch lies outside [-90, 90].
type stencil struct {
	once   sync.Once
	ok     bool
	t      []float64
	sa, ca []float64
	tmax   float64
}

// NewLonLat returns the distance field of the sites of ix on a north-up
// latitude-longitude grid whose cell (c, r) has its centre at longitude
// west + (c+0.5) dlon and latitude north + (r+0.5) dlat (dlat < 0), the
// grid's geotransform. Its Distances and Fill are those of New; its
// Bracket uses the fast path described there.
func NewLonLat(ix *geodesy.Index, west, dlon, north, dlat float64) *Field {
	ll := &lonLat{west: west, dlon: dlon, north: north, dlat: dlat, rows: map[[2]int]*stencil{}}
	ll.sites = make([][3]float64, ix.Len())
	for k := range ll.sites {
		lat, lon := ix.Site(k)
		ll.sites[k] = geodesy.ECEF(lat, lon)
	}
	cen := func(row, c0, c1 int, lons, lats []float64) {
		lat := north + (float64(row)+0.5)*dlat
		for c := c0; c < c1; c++ {
			lons[c-c0] = west + (float64(c)+0.5)*dlon
			lats[c-c0] = lat
		}
	}
	return &Field{ix: ix, centres: cen, ll: ll}
}

func (ll *lonLat) lat(r int) float64 { return ll.north + (float64(r)+0.5)*ll.dlat }
func (ll *lonLat) lon(c int) float64 { return ll.west + (float64(c)+0.5)*ll.dlon }

// stencil returns the stencil of the patches of side 2K+1 cells in row pr
// (anchor row pr*(2K+1) + K), computing it once.
func (ll *lonLat) stencil(k, pr int) *stencil {
	ll.mu.Lock()
	s := ll.rows[[2]int{k, pr}]
	if s == nil {
		s = new(stencil)
		ll.rows[[2]int{k, pr}] = s
	}
	ll.mu.Unlock()
	s.once.Do(func() {
		p := 2*k + 1
		ra := pr*p + k
		la := ll.lat(ra)
		if !(math.Abs(la) <= 90) {
			return
		}
		s.t, s.sa, s.ca = make([]float64, p*p), make([]float64, p*p), make([]float64, p*p)
		for dr := -k; dr <= k; dr++ {
			lp := ll.lat(ra + dr)
			if !(math.Abs(lp) <= 90) {
				return
			}
			// The geodesics to columns -dc and dc are mirror images in
			// the anchor's meridian: the same length, azimuths of
			// opposite signs (geod_inverse solves for |dlon| and sets the
			// sign of the azimuths last, and sin is odd, cos even), so
			// one inverse serves both, bit for bit
			// (TestStencilMirror).
			for dc := 0; dc <= k; dc++ {
				j := (dr+k)*p + dc + k
				t, az, _ := geodesy.Inverse(la, 0, lp, float64(dc)*ll.dlon)
				s.t[j] = t
				s.sa[j], s.ca[j] = math.Sincos(az * math.Pi / 180)
				s.tmax = math.Max(s.tmax, t)
				if dc > 0 {
					jm := (dr+k)*p - dc + k
					s.t[jm], s.sa[jm], s.ca[jm] = t, -s.sa[j], s.ca[j]
				}
			}
		}
		// Rounding of the cells' longitudes (the stencil uses dc*dlon) moves
		// a centre by under 1e-8 m; the bracket's margin covers it.
		s.ok = true
	})
	return s
}

// Bracket sets, for every cell (x0+x, y0+y) of the block whose need word
// is not zero (need nil: every cell), lo[i] <= d <= hi[i] around its
// distance d to the nearest site (the value Distances gives, i = y*w+x),
// such that -hi[i] and -lo[i] fall in the same bins of bins and
// hi[i] - lo[i] <= 2 BracketTol lo[i]; where that cannot be shown the cell
// is computed exactly and lo[i] = hi[i] = d. Cells with no geographic
// position, and cells not needed, get NaN. A cell's bracket does not
// depend on the block it is computed in.
//
// A Field made by New or NewPoints brackets its cells as bracketProjected says. One made by
// NewLonLat first brackets each cell from chords. On a global lattice of
// super-tiles of 15 x 15 cells, with rho >= 1.02 times the longest
// geodesic from the super-tile's centre to its cells plus 1 m (from the
// row's stencil, below) and d1 an upper bound on the centre's distance to
// its nearest site (geodesy.Index.NearestBounds, no geodesic), the sites
// the index lists within d1 + 2 rho of the centre hold every cell's
// nearest site (triangle inequality, as in Distances); both queries are
// answered from a list of the sites around the block's row of
// super-tiles when it is shown to hold what the index would give
// (geodesy.Cover: the same values). For each of them the straight chord D between the ECEF positions bounds the geodesic s:
//
//	D <= s <= (2/kappa) asin(kappa D/2) <= D (1 + u/6 + u^2/10),  u = (kappa D/2)^2,
//
// for D <= 6000 km, with kappa = a/b^2 the largest normal curvature of the
// ellipsoid. The lower bound holds because the segment is the shortest
// curve. For the upper one, a geodesic is a curve in space whose
// curvature is its normal curvature, at most kappa; Schur's comparison
// theorem (S. S. Chern, Curves and surfaces in Euclidean space, Studies in
// Global Geometry and Analysis, 1967; do Carmo, Differential Geometry of
// Curves and Surfaces, 1976, sec. 5-7) compares it with a circular arc of
// curvature kappa and the same length s <= pi/kappa: its chord is at least
// the arc's, D >= (2/kappa) sin(kappa s/2), hence the bound. s <= pi/kappa
// (19 903 km) holds for D <= 6000 km: the curve from one point radially
// out to the sphere of radius a, along its great circle and radially in
// (length <= a theta + 2(a - b), theta <= 2 asin(D/(2b)) the angle the
// points make at the centre) lies outside the solid ellipsoid, and the
// nearest-point projection onto a convex body shortens curves, so s <=
// 6313 km. The series of asin has positive coefficients, those from x^5 on
// at most 3/40, and u <= 0.225, so its tail is below 0.097 u^2. Both ends
// grow with D, so the cell's bracket is that of the shortest chord, widened
// by the margin below; no upper bound (+Inf) beyond 6000 km. Every cell's
// chord to a candidate is at least the centre's shortest chord minus rho:
// where the bracket of that chord is already wider than chordSkip floor
// bins, few cells would be placed by their chords, and the super-tile's
// cells go to the anchors at once (with the chord bracket [0, +Inf)).
//
// The cells that bracket leaves undecided (too wide, or across a bin)
// use anchors, and keep the intersection of both brackets (each holds the
// distance): a cell a measured exactly to each site k that can
// be nearest around it (f_k(a) = s(a, k) and the azimuth towards k), and,
// for each cell p near a, a second-order Taylor bound along the geodesic
// from a to p (length t, initial direction u; on such a grid the same for
// every anchor of a row, so measured once per row). Along that geodesic
// gamma, with f = f_k,
//
//	f'(0) = cos(beta) = <u, grad f(a)>,  f'' = Hess f(gamma', gamma') = h (1 - f'^2),
//
// where h is the curvature of the geodesic circle about k (the Hessian of
// the distance function across its gradient). The Hessian comparison
// theorem (e.g. Petersen, Riemannian Geometry, 3rd ed., 2016, sec. 6.4;
// the ellipsoid's Gaussian curvature lies in [b^2/a^4, 1/b^2]) gives
//
//	cot(r/b)/b <= h(r) <= (b/a^2) cot(b r/a^2) <= 1/r
//
// while r = f stays below pi b/2, away from the site and its cut locus
// (about 20 000 km away); both bounds fall with r, and hLoFast bounds the
// lower one without a tangent. With f(u) in [f(a)-t, f(a)+t] (f is
// 1-Lipschitz), the second derivative lies in [H1 q1, H2 q2] =: [A, B] with H1 =
// h_lo(f(a)+t), H2 = 1/(f(a)-t) and q1, q2 the extremes of 1 - f'^2 for f'
// in [f'(0), f'(0) + t B] (it is >= 0; B first taken as H2, then once more
// from the result); so
//
//	f(p) = f(a) + t f'(0) + int_0^t (t-u) f''(u) du  in  f(a) + t f'(0) + [A, B] t^2/2,
//
// widened by a margin (1 mm + 1e-9 f(a)) for PROJ's 15 nm and the rounding
// of coordinates, and intersected with [f(a)-t, f(a)+t] widened by the
// same margin. A site nearer the anchor than twice the anchor's largest t
// gets only the 1-Lipschitz bound; one within that t of 6000 km
// (maxTaylorDist) or farther, up to maxFarDist, the far form of the
// bracket (farHessian), whose lower Hessian bound may be negative; one
// beyond, near the site's antipode, only the 1-Lipschitz bound. The
// cell's bracket is the minimum over the measured sites of both ends (a
// site with f(a) - t above the running upper end changes neither).
//
// The anchors: the super-tile's centre cell is the first anchor of every
// cell of its super-tile that the chords left; the cells it leaves
// (bracket too wide or across a bin) go to the centre of their patch of 5
// x 5 cells (3 x 3 patches per super-tile). A site is left out at an
// anchor when a lower bound on its distance there exceeds the nearest
// measured one by more than twice the largest t (it cannot be nearest
// anywhere around the anchor); the lower bounds at a patch's anchor are
// the exact distances at the super-tile's centre minus pathBound, and
// the candidates are the super-tile's. A cell whose bracket from the
// super-tile's centre crosses a bin edge while narrower than exactWidth
// floor bins, and a cell whose patch bracket still fails, is computed
// exactly: the smallest geodesic to the anchor's measured sites
// whose brackets reach the smallest upper end (the others are farther),
// which is Index.Nearest's value bit for bit.
//
// A super-tile with more than maxCandidates candidates (dense training
// points) first keeps those that can be nearest to one of its cells
// (farPrune); when at most maxCandidates remain it goes on as above.
// Otherwise it takes the chord brackets alone, and the cells they leave (all
// of them when the chords are skipped) are computed exactly: from the
// few candidates that can be nearest to one of its cells (denseSites),
// measured at its centre, as above (one geodesic per cell, about), or,
// when that list is long or holds a site near the centre, with the
// index's query per cell.
func (f *Field) Bracket(x0, y0, w, h int, need []uint64, bins Binner, lo, hi []float64) {
	if f.ll == nil {
		f.bracketProjected(x0, y0, w, h, need, bins, lo, hi)
		return
	}
	f.bracketLonLat(x0, y0, w, h, need, bins, lo, hi, false)
}

// bracketLonLat is Bracket on a Field made by NewLonLat; with neg it sets
// lo[i], hi[i] = 0-hi, 0-lo of Bracket's instead, bit for bit (Bounds).
func (f *Field) bracketLonLat(x0, y0, w, h int, need []uint64, bins Binner, lo, hi []float64, neg bool) {
	n := w * h
	// Every needed cell whose centre has a latitude in [-90, 90] gets its
	// bracket below (the super-tiles, their patches or exactRange set it),
	// so NaN goes only where that may not happen.
	ll := f.ll
	nan := math.NaN()
	if neg {
		nan = 0 - nan
	}
	if !(math.Abs(ll.lat(y0)) <= 90 && math.Abs(ll.lat(y0+h-1)) <= 90) {
		for i := range n {
			lo[i], hi[i] = nan, nan
		}
	} else if need != nil {
		for i, v := range need[:n] {
			if v == 0 {
				lo[i], hi[i] = nan, nan
			}
		}
	}
	sc := scratchPool.Get().(*scratch)
	defer scratchPool.Put(sc)
	if sc.macros == nil {
		sc.macros, sc.macroT = map[[2]int][]int{}, map[int]float64{}
	}
	clear(sc.macros)
	clear(sc.macroT)
	if cap(sc.pending) < n {
		sc.pending = make([]bool, n)
	}
	clear(sc.pending[:n])
	if cap(sc.clo) < n {
		sc.clo, sc.chi = make([]float64, n), make([]float64, n)
	}
	if cap(sc.rowA) < h {
		sc.rowA, sc.rowZ = make([]float64, h), make([]float64, h)
	}
	if cap(sc.colC) < w {
		sc.colC, sc.colS = make([]float64, w), make([]float64, w)
	}
	b := bracketer{f: f, ll: f.ll, neg: neg, x0: x0, y0: y0, w: w, h: h, need: need, bins: bins, lo: lo, hi: hi, sc: sc, pending: sc.pending[:n],
		clo: sc.clo[:n], chi: sc.chi[:n], rowA: sc.rowA[:h], rowZ: sc.rowZ[:h], colC: sc.colC[:w], colS: sc.colS[:w],
		left: sc.left[:0], cover: &sc.cover, cellLo: math.NaN(), cellHi: math.NaN(), quickBins: quickBins{scale: bins.FloorScale()}, binW: 1 / bins.FloorScale()}
	b.setEdges()
	for y := range h {
		b.rowA[y], b.rowZ[y] = geodesy.ECEFRow(f.ll.lat(y0 + y))
	}
	for x := range w {
		b.colS[x], b.colC[x] = math.Sincos(f.ll.lon(x0+x) * math.Pi / 180)
	}
	for sr := floorDiv(y0, SuperTile); sr*SuperTile < y0+h; sr++ {
		for scol := floorDiv(x0, SuperTile); scol*SuperTile < x0+w; scol++ {
			b.super(sr, scol)
		}
	}
	sc.left = b.left
}

func floorDiv(a, b int) int {
	q := a / b
	if a%b != 0 && (a < 0) != (b < 0) {
		q--
	}
	return q
}

// bracketer is the state of one Bracket call.
type bracketer struct {
	f        *Field
	ll       *lonLat
	x0, y0   int
	w, h     int
	need     []uint64
	bins     Binner
	lo, hi   []float64
	neg      bool // lo and hi take 0-hi and 0-lo (bracketLonLat)
	sc       *scratch
	cands    []int
	centreD  []float64 // exact distance from the super-tile's centre to each candidate
	measured []anchorSite
	left     []leftCell // the super-tile's cells the chords leave to the anchors
	pending  []bool     // per block cell: left to the patches
	clo, chi []float64  // per block cell: the chord bracket of a pending cell
	// ECEF of the block's cells: (rowA[y] colC[x], rowA[y] colS[x], rowZ[y])
	rowA, rowZ []float64
	colC, colS []float64
	csites     []chordSite // the super-tile's candidates by chord from its centre
	kept       []int       // denseSites' candidates kept
	// antipodePrune's geodesics from the super-tile's centre to each of
	// b.cands, when it measured them all and kept more than
	// maxCandidates; else nil.
	antiD []float64
	// The last exact-bin cell asked for (Binner.Cell; NaN ends hold
	// nothing) and the floor grid's scale.
	cellLo, cellHi float64
	cellClosed     bool
	quickBins
	binW     float64  // 2^e
	big      *stencil // the stencil of super-tile row bigRow
	bigRow   int
	sub      []float64 // SubEdgeBinner's SubFloorEdges, or nil
	nSub     float64   // len(sub)
	subScale float64   // SubFloor * scale
	cover    *geodesy.Cover
	coverRow int              // the row of super-tiles cover was filled for
	coverSet bool             // cover was filled (or tried) for coverRow
	rowPar   geodesy.Parallel // the latitude of coverRow's centres
}

// setEdges takes the floor bins' edges of b.bins when it is an
// EdgeBinner that has them.
func (b *bracketer) setEdges() {
	if eb, ok := b.bins.(EdgeBinner); ok {
		b.edges = eb.FloorEdges()
		b.tail = b.edges != nil
	}
	b.nEdges = float64(len(b.edges))
	if sb, ok := b.bins.(SubEdgeBinner); ok && b.edges != nil {
		b.sub = sb.SubFloorEdges()
		b.nSub = float64(len(b.sub))
		b.subScale = b.scale * SubFloor
	}
}

// anchorSite is a site measured at a patch's anchor: its index, exact
// distance, the sine and cosine of the azimuth from the anchor towards it,
// and whether the Taylor bracket applies.
type anchorSite struct {
	k          int
	f0, inv    float64 // distance and its inverse
	margin     float64 // taylorBracket's margin, 1 mm + 1e-9 f0
	sz, cz     float64
	taylor     bool
	far        bool    // the far form of the Taylor bracket (see farHessian)
	farQ       bool    // far: narrow it by the range of f' (see measure)
	hA, hB     float64 // far: bounds on f'' within the anchor's stencil
	slat, slon float64
}

// chordSite is a candidate site of a super-tile for the chord bracket: its
// ECEF position and its chord from the super-tile's centre.
type chordSite struct {
	p  [3]float64
	cc float64
	gg float64 // (cc - rho - 1)^2 when cc - rho - 1 > 0, else -Inf
}

// sortChordSites orders sites by increasing chord cc, sites of equal
// chord in their order in the list (a stable sort: the order an insertion
// sort gives). The list holds every candidate of a super-tile: a few
// usually, sorted by insertion, but thousands near dense training points,
// where the insertion sort's n^2/4 swaps per super-tile made most of the
// pass; a longer list takes a stable sort's O(n log^2 n) steps.
func sortChordSites(s []chordSite) {
	if len(s) > 32 {
		slices.SortStableFunc(s, func(a, b chordSite) int { return cmp.Compare(a.cc, b.cc) })
		return
	}
	for i := 1; i < len(s); i++ {
		for j := i; j > 0 && s[j].cc < s[j-1].cc; j-- {
			s[j], s[j-1] = s[j-1], s[j]
		}
	}
}

// set sets the bracket of block cell i to [l, h] (negated when b.neg).
func (b *bracketer) set(i int, l, h float64) {
	if b.neg {
		l, h = 0-h, 0-l
	}
	b.lo[i], b.hi[i] = l, h
}

// needed reports whether global cell (c, r) is in the block and needed.
func (b *bracketer) needed(c, r int) (int, bool) {
	x, y := c-b.x0, r-b.y0
	if x < 0 || y < 0 || x >= b.w || y >= b.h {
		return 0, false
	}
	i := y*b.w + x
	return i, b.need == nil || b.need[i] != 0
}

// super brackets the cells of the block in super-tile (sr, scol).
func (b *bracketer) super(sr, scol int) {
	r0, c0 := sr*SuperTile, scol*SuperTile
	// The super-tile's cells in the block: rows [y1, y2), columns [x1, x2)
	// of the block.
	y1, y2 := max(r0, b.y0)-b.y0, min(r0+SuperTile, b.y0+b.h)-b.y0
	x1, x2 := max(c0, b.x0)-b.x0, min(c0+SuperTile, b.x0+b.w)-b.x0
	if b.need != nil && !b.anyNeeded(y1, y2, x1, x2) {
		return
	}
	ll, ix := b.ll, b.f.ix
	cr, cc := r0+SuperTile/2, c0+SuperTile/2
	clat, clon := ll.lat(cr), ll.lon(cc)
	// The stencil of the super-tile's row (the same for every super-tile
	// of the row) holds the geodesic from the centre to each of its cells:
	// rho bounds them all, with the slack of Distances' tiles.
	if b.big == nil || b.bigRow != sr {
		// The super-tiles are walked row by row: one lookup per row.
		b.big, b.bigRow = ll.stencil(SuperTile/2, sr), sr
	}
	big := b.big
	ok := big.ok
	rho := big.tmax*1.02 + 1
	if ok {
		fromMacro := b.macroCands(sr, scol)
		if !fromMacro {
			// An upper bound d1 on the centre's nearest distance, from
			// the index's chord stage (no geodesic), instead of the
			// distance. From the sites around the row when they are
			// shown to answer both queries (the same results), else
			// from the index.
			b.fillCover(sr, rho)
			sl, cl := math.Sincos(clon * math.Pi / 180)
			pt := b.rowPar.Point(clon, sl, cl) // NewPoint(clat, clon)'s bits
			_, d1, hit := b.cover.Bounds(&pt)
			if !hit {
				_, d1, _ = ix.BoundsAt(&pt, 0, -1) // NearestBounds(clat, clon, 0)
			}
			if b.cands, hit = b.cover.Within(&pt, d1+2*rho, b.cands[:0]); !hit {
				b.cands = ix.Within(clat, clon, d1+2*rho, b.cands[:0])
			}
		}
		switch {
		case fromMacro && len(b.cands) > 1:
			// The macro-tile's few sites, pruned again for this
			// super-tile's smaller radius.
			b.farPrune(clat, clon, big, false)
		case len(b.cands) > maxCandidates:
			// Dense training points: the few candidates that can be
			// nearest somewhere in the super-tile, taken as a sparse
			// one's; round their antipodes, where farPrune's bounds end,
			// from a geodesic to each.
			b.antiD = nil
			if !b.farPrune(clat, clon, big, false) {
				b.antipodePrune(clat, clon, big)
			}
		case len(b.cands) >= farPruneMin:
			// Thousands of kilometres from a few points close together,
			// the same spares the anchors a geodesic to each.
			b.farPrune(clat, clon, big, true)
		}
		ok = len(b.cands) > 0 && len(b.cands) <= maxCandidates
		if len(b.cands) > maxCandidates {
			// Too many sites to measure at the anchors (dense training
			// points): the chords, which take any number, bracket what
			// they can and the cells they leave (all when it skips them)
			// are computed exactly, from the candidates that can be
			// nearest to a cell of the super-tile (denseSites).
			skip := b.chords(y1, y2, x1, x2, clat, clon, rho)
			dense := b.denseSites(clat, clon, big, rho)
			if !dense && b.antiD != nil {
				// Round the antipodes: every candidate, measured at the
				// centre by antipodePrune, with the 1-Lipschitz bracket.
				dense = b.antipodeSites(clat, clon)
			}
			// j0 is the stencil entry of block cell (0, 0).
			j0 := (b.y0-cr+SuperTile/2)*SuperTile + b.x0 - cc + SuperTile/2
			if !skip {
				for _, p := range b.left {
					b.denseCell(p.i, dense, j0+int(p.y)*SuperTile+int(p.x))
				}
				return
			}
			for y := y1; y < y2; y++ {
				for x := x1; x < x2; x++ {
					if i := y*b.w + x; b.need == nil || b.need[i] != 0 {
						b.denseCell(i, dense, j0+y*SuperTile+x)
					}
				}
			}
			return
		}
	}
	if !ok {
		b.exactRange(r0, c0, SuperTile, SuperTile)
		return
	}
	// First the chord brackets: no geodesic.
	skip := b.chords(y1, y2, x1, x2, clat, clon, rho)
	if !skip && len(b.left) == 0 {
		return
	}
	// Then the super-tile's centre as the anchor of the cells left.
	b.centreD = b.centreD[:0]
	b.measured = b.measured[:0]
	best := math.Inf(1)
	for _, k := range b.cands {
		m := b.measure(k, clat, clon, big)
		b.centreD = append(b.centreD, m.f0)
		best = math.Min(best, m.f0)
		b.measured = append(b.measured, m)
	}
	{
		keep := b.measured[:0]
		for _, m := range b.measured {
			if m.f0 <= best+2*big.tmax+1e-3 {
				keep = append(keep, m)
			}
		}
		b.measured = keep
	}
	sortSites(b.measured)
	// j0 is the stencil entry of block cell (0, 0).
	j0 := (b.y0-cr+SuperTile/2)*SuperTile + b.x0 - cc + SuperTile/2
	pend := false
	if skip {
		pend = b.centreRows(y1, y2, x1, x2, big, j0)
	} else {
		for _, p := range b.left {
			pend = b.centreCell(p.i, big, j0+int(p.y)*SuperTile+int(p.x), p.lo, p.hi) || pend
		}
	}
	if !pend {
		return
	}
	for pr := 0; pr < superP; pr++ {
		for pc := 0; pc < superP; pc++ {
			b.patch(sr*superP+pr, scol*superP+pc, clat, clon)
		}
	}
}

// macroP is the side, in super-tiles, of a macro-tile: our choice. Far
// from a dense cluster every super-tile sees the whole cluster as its
// candidates and farPrune keeps one or two of them; a macro-tile does
// that once for macroP^2 super-tiles (macroCands).
const macroP = 3

// macroCands sets b.cands, for super-tile (sr, scol), to the candidates
// its macro-tile (the macroP x macroP super-tiles of the global lattice
// that hold it) kept, and reports true; false (b.cands untouched) when
// the macro-tile has no such list. A macro-tile gets one when the index
// lists more than maxCandidates sites within d1 + 2 rho_M of its centre
// cell c_M (d1 an upper bound on c_M's nearest distance, rho_M = 1.02
// T_M + 1 m) and farPrune, with T_M in its role of the longest geodesic
// from c_M to a cell, keeps at most maxCandidates of them: every cell's
// nearest site, by the triangle inequality and farPrune's bound, as for
// a super-tile. T_M = max_i s(c_M, c_i) + T_i over the centres c_i of its
// super-tiles (T_i their stencils' tmax) bounds the geodesic from c_M to
// each cell by the triangle inequality. farPrune is not tried where it
// must fail, which a chord shows without a geodesic: it needs the
// distance from c_M to the candidate s0 of shortest chord, at most d1 +
// 2 rho_M, above twice the geodesic from s0 to every other, at least
// their chord (points spread round the macro-tile, not a cluster far
// away). The lists depend only on the lattice, so every cut into blocks
// gives the same; each Bracket call keeps those of its block
// (scratch.macros).
func (b *bracketer) macroCands(sr, scol int) bool {
	key := [2]int{floorDiv(sr, macroP), floorDiv(scol, macroP)}
	m, seen := b.sc.macros[key]
	if !seen {
		m = b.macro(key[0], key[1])
		b.sc.macros[key] = m
	}
	if m == nil {
		return false
	}
	b.cands = append(b.cands[:0], m...)
	return true
}

// macro returns the list of macro-tile (mr, mc) described at macroCands,
// or nil.
func (b *bracketer) macro(mr, mc int) []int {
	ll, ix := b.ll, b.f.ix
	const side = macroP * SuperTile
	cr, cc := mr*side+side/2, mc*side+side/2
	clat, clon := ll.lat(cr), ll.lon(cc)
	tm, ok := b.sc.macroT[mr]
	if !ok {
		// The same along a row of macro-tiles; the super-tiles' centres
		// left and right of c_M lie at the same distance.
		for i := range macroP {
			st := ll.stencil(SuperTile/2, mr*macroP+i)
			if !st.ok {
				tm = math.NaN()
				break
			}
			r := mr*side + i*SuperTile + SuperTile/2
			for j := range macroP/2 + 1 {
				c := cc + (j-macroP/2)*SuperTile
				tm = max(tm, geodesy.Distance(clat, clon, ll.lat(r), ll.lon(c))+st.tmax)
			}
		}
		b.sc.macroT[mr] = tm
	}
	if tm != tm {
		return nil
	}
	rho := tm*1.02 + 1
	_, d1 := ix.NearestBounds(clat, clon, 0)
	b.cands = ix.Within(clat, clon, d1+2*rho, b.cands[:0])
	if len(b.cands) <= maxCandidates {
		return nil
	}
	first, _ := b.chordNearest(geodesy.ECEF(clat, clon))
	p0 := b.ll.sites[b.cands[first]]
	for _, k := range b.cands {
		if 2*dist3(p0, b.ll.sites[k]) >= d1+2*rho {
			return nil
		}
	}
	if !b.farPruneFrom(clat, clon, first, &stencil{ok: true, tmax: rho}, false) {
		return nil
	}
	return slices.Clone(b.cands)
}

// coverLimit is the most sites a row's cover may hold: our choice; a
// longer list costs more per super-tile than the index's queries.
const coverLimit = 48

// fillCover fills b.cover, once per row sr of super-tiles, with the sites
// around the centre P of the middle super-tile of the block's part of the
// row, within R = 1.01 (d1 + 2 s + 2 rho) + 1 km, d1 the upper bound on
// P's nearest distance and s the chord from P to the farthest super-tile
// centre of the row in the block: about what the super-tiles' queries
// reach (their d1 is within s of P's, and they ask for d1 + 2 rho). Only
// a choice of size: the cover itself shows, query by query, whether it
// holds what the index would give (geodesy.Cover).
func (b *bracketer) fillCover(sr int, rho float64) {
	if b.coverSet && b.coverRow == sr {
		return
	}
	b.coverSet, b.coverRow = true, sr
	s0, s1 := floorDiv(b.x0, SuperTile), floorDiv(b.x0+b.w-1, SuperTile)
	ll := b.ll
	cr := sr*SuperTile + SuperTile/2
	centre := func(scol int) float64 { return ll.lon(scol*SuperTile + SuperTile/2) }
	lat, lon := ll.lat(cr), centre((s0+s1)/2)
	p := geodesy.ECEF(lat, lon)
	span := max(dist3(p, geodesy.ECEF(lat, centre(s0))), dist3(p, geodesy.ECEF(lat, centre(s1))))
	_, d1 := b.f.ix.NearestBounds(lat, lon, 0)
	b.rowPar = geodesy.NewParallel(lat)
	sl, cl := math.Sincos(lon * math.Pi / 180)
	pt := b.rowPar.Point(lon, sl, cl)
	b.f.ix.CoverSites(&pt, 1.01*(d1+2*span+2*rho)+1e3, coverLimit, b.cover)
}

// anyNeeded reports whether a cell of block rows [y1, y2) and columns
// [x1, x2) is needed.
func (b *bracketer) anyNeeded(y1, y2, x1, x2 int) bool {
	for y := y1; y < y2; y++ {
		for _, v := range b.need[y*b.w+x1 : y*b.w+x2] {
			if v != 0 {
				return true
			}
		}
	}
	return false
}

// centreRows brackets every needed cell of block rows [y1, y2) and
// columns [x1, x2), a super-tile whose chords were skipped, from the sites
// measured at its centre (j0: the entry of st, its stencil, of block cell
// (0, 0)), as centreCell with the chord bracket (0, +Inf), which changes
// no anchor bracket (their lower ends are >= +0, never NaN). One measured
// site (the common case) has its loop of its own.
func (b *bracketer) centreRows(y1, y2, x1, x2 int, st *stencil, j0 int) bool {
	pend := false
	var one *anchorSite
	if len(b.measured) == 1 {
		one = &b.measured[0]
	}
	for y := y1; y < y2; y++ {
		row, jr := y*b.w, j0+y*SuperTile
		lo, hi := b.lo[row+x1:row+x2], b.hi[row+x1:row+x2]
		ts, sa, ca := st.t[jr+x1:jr+x2], st.sa[jr+x1:jr+x2], st.ca[jr+x1:jr+x2]
		var need []uint64
		if b.need != nil {
			need = b.need[row+x1 : row+x2]
		}
		if one != nil {
			// Every cell's taylorBracket first, needed or not: one loop
			// with no call. Its ends are finite (so are f0 and t), hence
			// those of anchorBracket of the one site.
			var ls, hs [SuperTile]float64
			taylorRow(one, ts, sa, ca, ls[:len(lo)], hs[:len(lo)])
			for fail := quickRow(&b.quickBins, b.neg, need, ls[:len(lo)], hs[:len(lo)], lo, hi); fail != 0; fail &= fail - 1 {
				x := bits.TrailingZeros32(fail)
				if l, h := ls[x], hs[x]; b.settled(l, h) {
					b.set(row+x1+x, l, h)
				} else {
					pend = b.centreFailed(row+x1+x, st, jr+x1+x, l, h, 0, math.Inf(1)) || pend
				}
			}
			continue
		}
		for x := range lo {
			if need != nil && need[x] == 0 {
				continue
			}
			l, h := b.anchorBracket(st, jr+x1+x)
			if b.quick(l, h) || b.settled(l, h) {
				b.set(row+x1+x, l, h)
				continue
			}
			pend = b.centreFailed(row+x1+x, st, jr+x1+x, l, h, 0, math.Inf(1)) || pend
		}
	}
	return pend
}

// centreCell brackets block cell i from the sites measured at the
// super-tile's centre (entry j of its stencil st) and its chord bracket
// [clo, chi]; when that fails it computes the cell exactly or leaves it to
// its patch (see centreFailed), and then reports true.
func (b *bracketer) centreCell(i int, st *stencil, j int, clo, chi float64) bool {
	lo, hi := b.anchorBracket(st, j)
	// Both brackets hold the distance: keep their intersection.
	lo, hi = max(lo, clo), min(hi, chi)
	if b.quick(lo, hi) || b.settled(lo, hi) {
		b.set(i, lo, hi)
		return false
	}
	return b.centreFailed(i, st, j, lo, hi, clo, chi)
}

// centreFailed takes block cell i (entry j of stencil st) whose bracket
// [lo, hi] from the super-tile's centre failed: it computes it exactly
// when the bracket is narrow, or leaves it to its patch (pending, with its
// chord bracket [clo, chi] kept) and then reports true.
func (b *bracketer) centreFailed(i int, st *stencil, j int, lo, hi, clo, chi float64) bool {
	if hi-lo <= exactWidth*b.binW {
		// A narrow bracket across a bin edge: a patch's anchor would cost
		// about the geodesics of measuring the cell.
		r, c := b.y0+i/b.w, b.x0+i%b.w
		b.exact(i, b.measured, st, j, b.ll.lat(r), b.ll.lon(c))
		return false
	}
	b.pending[i] = true
	b.clo[i], b.chi[i] = clo, chi
	return true
}

// leftCell is a cell that the chords leave to the anchors: its index in
// the block, its column and row in the block and its chord bracket.
type leftCell struct {
	i      int
	x, y   int32
	lo, hi float64
}

// chords brackets every needed cell of the block in rows [y1, y2) and
// columns [x1, x2) of the block, those of a super-tile (centre (clat,
// clon), every cell centre within rho of it), from its ECEF chords to the
// candidate sites (chordBracket; the minimum over the sites of both
// ends), sets lo and hi of the cells whose bracket is narrow enough and
// inside one bin, and lists the others in b.left with their bracket. It
// reports true when it skips the chords (see below): then every needed
// cell is left to the anchors, with the chord bracket (0, +Inf), and
// b.left is not filled.
func (b *bracketer) chords(y1, y2, x1, x2 int, clat, clon, rho float64) bool {
	b.left = b.left[:0]
	pc := geodesy.ECEF(clat, clon)
	b.csites = b.csites[:0]
	first := 0 // the first site of smallest chord: the sort's first
	for _, k := range b.cands {
		p := b.ll.sites[k]
		b.csites = append(b.csites, chordSite{p: p, cc: dist3(pc, p)})
		if cc := b.csites[len(b.csites)-1].cc; cc < b.csites[first].cc {
			first = len(b.csites) - 1
		}
	}
	// A site q is farther than the first site (P_0, the nearest to the
	// centre c) from every cell p of the super-tile when
	//
	//	|p - P_q|^2 - |p - P_0|^2 = L(c) - 2 (p - c).(P_q - P_0) >= L(c) - 2 rho |P_q - P_0| > 0,
	//
	// L(c) = cc_q^2 - cc_0^2 (the difference is linear in p; |p - c| <= rho):
	// it is never the shortest chord, so it is left out (with 1 m^2 and
	// 1e-12 cc_q^2 for rounding). The sites are left out before they are
	// sorted: P_0, the first of the sorted list (a stable sort), is the
	// first site of smallest chord in the list, and a stable sort of the
	// sites kept orders them as they are ordered in the sort of all (near
	// dense training points the list holds hundreds of sites and the sort
	// of all took a tenth of the pass).
	if len(b.csites) > 1 {
		p0, cc0 := b.csites[first].p, b.csites[first].cc
		keep := b.csites[:0]
		for q, st := range b.csites {
			if q != first && st.cc*st.cc-cc0*cc0-2*rho*dist3(st.p, p0) > 1+1e-12*st.cc*st.cc {
				continue
			}
			keep = append(keep, st)
		}
		b.csites = keep
	}
	sortChordSites(b.csites)
	// Every chord from a cell is at least dmin = cc_0 - rho (minus 1 m
	// for rounding), and the width of chordBracket grows with the chord:
	// when it is at least chordSkip floor bins there, few cells' chord
	// brackets would fall inside one bin (sameBins), so the cells go to
	// the anchors at once with no chord bracket (0, +Inf).
	if dmin := b.csites[0].cc - rho - 1; dmin > 0 {
		if lo, hi := chordBracket(dmin); hi-lo >= chordSkip*b.binW {
			return true
		}
	}
	// One site (the common case): its chord is the shortest, and the
	// square of its z difference is the row's.
	one, p0 := len(b.csites) == 1, b.csites[0].p
	for k := range b.csites {
		// The cut of the loop over the sites below: the chord from a cell
		// is at least cc - rho, and once that exceeds the shortest chord
		// so far (by 1 m for rounding), this site and the farther ones are
		// farther still; never when cc - rho - 1 <= 0.
		st := &b.csites[k]
		st.gg = math.Inf(-1)
		if g := st.cc - rho - 1; g > 0 {
			st.gg = g * g
		}
	}
	var ls, hs [SuperTile]float64
	for y := y1; y < y2; y++ {
		ar, zr := b.rowA[y], b.rowZ[y]
		row := y * b.w
		lo, hi := b.lo[row+x1:row+x2], b.hi[row+x1:row+x2]
		colC, colS := b.colC[x1:x2], b.colS[x1:x2]
		var need []uint64
		if b.need != nil {
			need = b.need[row+x1 : row+x2]
		}
		ls, hs := ls[:len(lo)], hs[:len(lo)]
		if one {
			dz2 := (zr - p0[2]) * (zr - p0[2])
			chordRowOne(ar, colC, colS, p0[0], p0[1], dz2, ls, hs)
		} else {
			chordRowSites(ar, zr, colC, colS, b.csites, ls, hs)
		}
		fail := quickRow(&b.quickBins, b.neg, need, ls, hs, lo, hi)
		for ; fail != 0; fail &= fail - 1 {
			x := bits.TrailingZeros32(fail)
			if l, h := ls[x], hs[x]; b.settled(l, h) {
				b.set(row+x1+x, l, h)
				continue
			}
			b.left = append(b.left, leftCell{i: row + x1 + x, x: int32(x1 + x), y: int32(y), lo: ls[x], hi: hs[x]})
		}
	}
	return false
}

// chordRowOne sets ls[x], hs[x] to chordBracket of the chord from each
// cell x of a row (ECEF (ar colC[x], ar colS[x], z)) to the one candidate
// site (px, py, pz), dz2 = (z - pz)^2, needed or not: a loop with no branch
// to mispredict, so that the square roots overlap.
func chordRowOne(ar float64, colC, colS []float64, px, py, dz2 float64, ls, hs []float64) {
	colC, colS, hs = colC[:len(ls)], colS[:len(ls)], hs[:len(ls)]
	for x := range ls {
		dx, dy := ar*colC[x]-px, ar*colS[x]-py
		ls[x], hs[x] = chordBracket(math.Sqrt(dx*dx + dy*dy + dz2))
	}
}

// chordRowSites is chordRowOne with several candidate sites (sites, by
// increasing chord from the super-tile's centre): the shortest chord, as
// both ends of chordBracket grow with the chord.
func chordRowSites(ar, z float64, colC, colS []float64, sites []chordSite, ls, hs []float64) {
	colC, colS, hs = colC[:len(ls)], colS[:len(ls)], hs[:len(ls)]
	for x := range ls {
		px, py := ar*colC[x], ar*colS[x]
		d2 := math.Inf(1)
		for k := range sites {
			st := &sites[k]
			if st.gg > d2 {
				break
			}
			dx, dy, dz := px-st.p[0], py-st.p[1], z-st.p[2]
			d2 = min(d2, dx*dx+dy*dy+dz*dz)
		}
		ls[x], hs[x] = chordBracket(math.Sqrt(d2))
	}
}

// quickRow sets lo[x], hi[x] = ls[x], hs[x] (0-hs[x], 0-ls[x] with neg)
// for the cells x of a row (at most 32) whose need[x] != 0 (need nil:
// every cell) and for which quick holds, and returns the others needed as
// the bits of fail. With need nil it sets every cell's: the caller then
// sets each failing cell's bracket again (every cell left to the anchors
// gets one there, or is computed exactly).
func quickRow(q *quickBins, neg bool, need []uint64, ls, hs, lo, hi []float64) (fail uint32) {
	hs, lo, hi = hs[:len(ls)], lo[:len(ls)], hi[:len(ls)]
	scale, nEdges, edges, tail := q.scale, q.nEdges, q.edges, q.tail
	if need == nil {
		// Every cell's bracket is stored, settled or not, and quick is
		// evaluated in full: a loop with no branch to mispredict.
		var tailBit uint32
		if tail {
			tailBit = 1
		}
		for x, l := range ls {
			h := hs[x]
			if neg {
				lo[x], hi[x] = 0-h, 0-l
			} else {
				lo[x], hi[x] = l, h
			}
			// quickIn without a branch.
			v := l * scale
			c := math.Ceil(v)
			ok := b2u(h-l <= 2*BracketTol*l) & b2u(v >= 0x1p-1000) & b2u(h*scale <= c)
			in := b2u(c < nEdges)
			k := 0
			if in != 0 {
				k = int(c)
			}
			e := math.Inf(1)
			if uint(k) < uint(len(edges)) {
				e = edges[k]
			}
			ok &= in&(b2u(0-l < e)|b2u(0-h > e)) | (in^1)&b2u(c >= nEdges)&tailBit
			fail |= (ok ^ 1) << x
		}
		return fail
	}
	for x, l := range ls {
		if need[x] == 0 {
			continue
		}
		if h := hs[x]; quickIn(l, h, scale, nEdges, edges, tail) {
			if neg {
				lo[x], hi[x] = 0-h, 0-l
			} else {
				lo[x], hi[x] = l, h
			}
			continue
		}
		fail |= 1 << x
	}
	return fail
}

// b2u returns 1 for true and 0 for false, without a branch.
func b2u(b bool) uint32 {
	var u uint32
	if b {
		u = 1
	}
	return u
}

// exactWidth is the width, in floor bins, of the widest bracket from a
// super-tile's centre that is not narrowed at a patch's anchor when it
// crosses a bin edge: the cell is measured at once.
const exactWidth = 0.125

// chordSkip is the width, in floor bins, of the narrowest chord bracket
// at which a super-tile's chords are not tried (see chords): our choice,
// measured on BenchmarkNullVsRaster's study, where a bracket from the
// centre's anchor costs less than a chord bracket that fails.
const chordSkip = 0.25

// dist3 returns the Euclidean distance between p and q.
func dist3(p, q [3]float64) float64 {
	dx, dy, dz := p[0]-q[0], p[1]-q[1], p[2]-q[2]
	return math.Sqrt(dx*dx + dy*dy + dz*dz)
}

// chordKappa is the largest normal curvature of the WGS84 ellipsoid (1/m):
// a/b^2, that of the meridian at the equator (radius of curvature b^2/a).
var chordKappa = geodesy.SemiMajor / (geodesy.SemiMinor * geodesy.SemiMinor)

// maxChord is the longest ECEF chord (m) to which chordBracket gives an
// upper bound.
const maxChord = 6e6

// chordBracket returns bounds on the geodesic distance s between two points
// whose ECEF chord is d (see Bracket):
//
//	d <= s <= (2/kappa) asin(kappa d/2) <= d (1 + u/6 + u^2/10),  u = (kappa d/2)^2,
//
// widened by the margin of taylorBracket, and no upper bound (+Inf) above
// maxChord. It is small enough to be inlined in the chord loop.
func chordBracket(d float64) (lo, hi float64) {
	margin := 1e-3 + 1e-9*d
	lo = max(d-margin, 0)
	if !(d <= maxChord) {
		return lo, math.Inf(1)
	}
	x := chordKappa * d / 2
	u := x * x
	// 0.1 rounds up from 1/10 and 1/6 is within 1e-16 of 1/6: the
	// margin's 1e-9 d covers the rounding.
	return lo, d*(1+u*(1.0/6+u*0.1)) + margin
}

// farQShare is our choice of the share of a floor bin below which the
// far form's second-order term is left unnarrowed (anchorSite.farQ): a
// bracket the narrowing would have kept inside a bin then crosses an edge
// for about that share of cells more, each then measured.
const farQShare = 1.0 / 64

// measure returns site k measured exactly at anchor (alat, alon), with the
// Hessian bounds for the anchor's stencil st.
func (b *bracketer) measure(k int, alat, alon float64, st *stencil) anchorSite {
	slat, slon := b.f.ix.Site(k)
	f0, az, _ := geodesy.Inverse(alat, alon, slat, slon)
	sz, cz := math.Sincos(az * math.Pi / 180)
	m := anchorSite{k: k, f0: f0, inv: 1 / f0, margin: 1e-3 + 1e-9*f0, sz: sz, cz: cz, slat: slat, slon: slon}
	if st.ok && f0 > 2*st.tmax {
		switch {
		case f0+st.tmax < maxTaylorDist:
			m.taylor = true
		case f0+st.tmax <= maxFarDist:
			m.hA, m.hB, m.far = farHessian(farCot(f0), f0, st.tmax)
			// The range of f' narrows the second-order term, at most
			// (B - A) tmax^2/2 wide; where that is below farQShare of a
			// floor bin it cannot much change which bins a bracket meets,
			// and the far form skips it (a third of its cost).
			m.farQ = (m.hB-m.hA)*st.tmax*st.tmax/2 > farQShare*b.binW
		}
	}
	return m
}

// cell brackets block cell i from the measured sites, at stencil entry j
// of st, and its chord bracket [clo[i], chi[i]], and reports whether the
// bracket is narrow enough and inside one bin (then lo[i] and hi[i] are
// set).
func (b *bracketer) cell(i int, st *stencil, j int) bool {
	lo, hi := b.anchorBracket(st, j)
	// Both brackets hold the distance: keep their intersection.
	lo, hi = max(lo, b.clo[i]), min(hi, b.chi[i])
	if b.quick(lo, hi) || b.settled(lo, hi) {
		b.set(i, lo, hi)
		return true
	}
	return false
}

// anchorBracket returns the bracket of the cell at stencil entry j of st
// from the measured sites: the minimum over them of both ends of
// taylorBracket.
func (b *bracketer) anchorBracket(st *stencil, j int) (lo, hi float64) {
	t, su, cu := st.t[j], st.sa[j], st.ca[j]
	lo, hi = math.Inf(1), math.Inf(1)
	for q := range b.measured {
		// Sites are in increasing order of f0: once f0 - t > hi, this site
		// and the farther ones have both ends above hi, and change
		// neither end of the minimum.
		if b.measured[q].f0-t > hi {
			break
		}
		l1, h1 := taylorBracket(&b.measured[q], t, su, cu)
		if l1 < lo {
			lo = l1
		}
		if h1 < hi {
			hi = h1
		}
	}
	return lo, hi
}

// exactRange computes the cells of the block in the global rectangle of
// h x w cells at (r0, c0) exactly with a nearest-site query each.
func (b *bracketer) exactRange(r0, c0, h, w int) {
	for r := r0; r < r0+h; r++ {
		for c := c0; c < c0+w; c++ {
			if i, ok := b.needed(c, r); ok {
				b.exactCell(i)
			}
		}
	}
}

// exactCell computes block cell i exactly with a nearest-site query, as
// Distances does; a cell beyond the poles gets NaN.
func (b *bracketer) exactCell(i int) {
	lat, lon := b.ll.lat(b.y0+i/b.w), b.ll.lon(b.x0+i%b.w)
	if !(math.Abs(lat) <= 90) {
		// NaN, as the block's rows beyond the poles have from the start.
		b.set(i, math.NaN(), math.NaN())
		return
	}
	_, d := b.f.ix.Nearest(lat, lon, 0)
	b.set(i, d, d)
}

// maxDense is the most sites denseSites measures at a super-tile's
// centre: our choice; a longer list costs more per cell than the index's
// query. Around a lattice of 4,000 training points one cell apart on
// 12.8 million cells (a list of hundreds far from it), 64, 128 and 256
// took 24, 17 and 16 s for the null's pass.
const maxDense = 256

// denseSites sets b.measured to the super-tile's candidates (b.cands;
// centre (clat, clon), stencil st, every cell's ECEF position within rho
// of the centre's) that may be nearest to one of its cells, measured at
// its centre (Taylor sites, by increasing distance), and reports false
// when it has no such list (then the cells take the index's query). With
// P_0 the candidate of shortest chord cc_0 from the centre c, every cell p
// has, by the identity of chords in chords (the difference of squares is
// linear in p),
//
//	|p - P_q|^2 >= |p - P_0|^2 + L_q - 2 rho |P_q - P_0|,  L_q = cc_q^2 - cc_0^2,
//
// and its distance to P_0 is at most H(|p - P_0|), H the upper end of
// chordBracket, whose excess H(D)^2 - D^2 grows with D <= Dmax = cc_0 +
// rho + 1 m. So when L_q - 2 rho |P_q - P_0| > H(Dmax)^2 - Dmax^2 (with
// the 1 m^2 and 1e-12 cc_q^2 of chords for rounding), P_q's chord, a lower
// bound on its geodesic, exceeds the distance to P_0 at every cell: it is
// never nearest, and it is left out. Far from a dense cluster the sites
// kept are those within about H(Dmax) - Dmax (a few metres at 300 km, 1 km
// at 1000 km) of the nearest along the line of sight: a few.
func (b *bracketer) denseSites(clat, clon float64, st *stencil, rho float64) bool {
	b.measured = b.measured[:0]
	pc := geodesy.ECEF(clat, clon)
	first, cc0 := b.chordNearest(pc)
	if first < 0 {
		return false
	}
	dmax := cc0 + rho + 1
	_, hmax := chordBracket(dmax)
	if math.IsInf(hmax, 1) {
		return false
	}
	slack := hmax*hmax - dmax*dmax
	p0 := b.ll.sites[b.cands[first]]
	b.kept = b.kept[:0]
	for q, k := range b.cands {
		p := b.ll.sites[k]
		cc := dist3(pc, p)
		if q != first && cc*cc-cc0*cc0-2*rho*dist3(p, p0) > slack+1+1e-12*cc*cc {
			continue
		}
		if b.kept = append(b.kept, k); len(b.kept) > maxDense {
			return false
		}
	}
	for _, k := range b.kept {
		m := b.measure(k, clat, clon, st)
		if !m.taylor {
			// A site near the centre: its 1-Lipschitz bracket would leave
			// most sites to be measured at each cell.
			b.measured = b.measured[:0]
			return false
		}
		b.measured = append(b.measured, m)
	}
	sortSites(b.measured)
	return true
}

// chordNearest returns the position in b.cands of the candidate of
// shortest chord from pc (the first such) and that chord; -1 and +Inf
// with no candidate.
func (b *bracketer) chordNearest(pc [3]float64) (first int, cc0 float64) {
	first, cc0 = -1, math.Inf(1)
	for q, k := range b.cands {
		if cc := dist3(pc, b.ll.sites[k]); cc < cc0 {
			first, cc0 = q, cc
		}
	}
	return first, cc0
}

// farPair is the geodesic from one site to another: its length d and the
// sine and cosine of its azimuth at the first.
type farPair struct {
	d, sz, cz float64
}

// fanLimit bounds the geodesics kept by siteFans (24 bytes each, a
// pointer of a fan's chunk list counted as one): our choice, 24 MiB per
// worker.
const fanLimit = 1 << 20

// fanChunk is the number of sites of one chunk of a fan (our choice): a
// fan holds only the chunks of the sites asked for, so that a reference
// site costs its list of chunk pointers and the few chunks of its
// super-tiles' candidates, not one entry per site of the Index (a fan
// of every site made and filled 240 KB per reference site with 10,000
// training points, most of the null's pass, and the cache was dropped
// every hundred fans).
const fanChunk = 32

// siteFans holds, by reference site, the geodesics from it to the other
// sites of one Index (made on first use, see pairAt): what farPrune and
// the projected path's prunable ask for, kept across Bracket calls on
// that Index (the scratch that holds it is pooled across Fields: another
// Index, or more than fanLimit entries, starts it afresh; a fan already
// handed out stays valid).
type siteFans struct {
	ix *geodesy.Index
	m  map[int]fanRow
	n  *int // entries held (chunk pointers and chunks' entries)
}

// fanRow is the fan of one reference site: the geodesics from it to the
// sites of the Index, in chunks of fanChunk sites made when one of them
// is first asked for (pairAt); at(k) reads one pairAt has made.
// Site k's entry is at position ix.Slot(k), the kd-tree's order, so that
// the candidates of one super-tile, sites near one another, share chunks
// (sites in the order given are in no order of place).
type fanRow struct {
	chunks []*[fanChunk]farPair
	n      *int
	ix     *geodesy.Index
}

// at returns the geodesic to site k, which pairAt must have made.
func (f fanRow) at(k int) farPair {
	i := f.ix.Slot(k)
	return f.chunks[i/fanChunk][i%fanChunk]
}

// fan returns the fan of site a of ix, made once.
func (fs *siteFans) fan(ix *geodesy.Index, a int) fanRow {
	if fs.ix == ix {
		if fan, ok := fs.m[a]; ok {
			return fan
		}
	}
	if fs.ix != ix || fs.m == nil || *fs.n > fanLimit {
		fs.ix, fs.m, fs.n = ix, map[int]fanRow{}, new(int)
	}
	fan := fanRow{chunks: make([]*[fanChunk]farPair, (ix.Len()+fanChunk-1)/fanChunk), n: fs.n, ix: ix}
	*fs.n += len(fan.chunks)
	fs.m[a] = fan
	return fan
}

// pairAt returns the geodesic from the site whose fan is fan, at (alat,
// alon), to site k of ix (geodesy.Inverse), computed once.
func pairAt(ix *geodesy.Index, fan fanRow, alat, alon float64, k int) farPair {
	i := ix.Slot(k)
	c := fan.chunks[i/fanChunk]
	if c == nil {
		c = new([fanChunk]farPair)
		for e := range c {
			c[e].d = math.NaN()
		}
		fan.chunks[i/fanChunk] = c
		*fan.n += fanChunk
	}
	if p := c[i%fanChunk]; p.d == p.d {
		return p
	}
	klat, klon := ix.Site(k)
	d, az, _ := geodesy.Inverse(alat, alon, klat, klon)
	p := farPair{d: d}
	p.sz, p.cz = math.Sincos(az * math.Pi / 180)
	c[i%fanChunk] = p
	return p
}

// farPruneMin is the fewest candidates of a sparse super-tile for which
// farPrune is tried where every candidate lies beyond maxTaylorDist: our
// choice (it costs a geodesic, and saves one per site left out at each
// anchor).
const farPruneMin = 4

// farPrune keeps, of a super-tile's candidates (more than maxCandidates:
// dense training points; with farOnly, at least farPruneMin, every one
// beyond maxTaylorDist from every cell), those that can be nearest to one
// of its cells,
// so that the super-tile is bracketed as a sparse one (chords, then
// anchors) instead of computed cell by cell from denseSites' list (whose
// chords end at 6000 km). It reports false, leaving b.cands as they were,
// when a bound below does not apply (a site within twice its distance
// from the others' reference, near the sites' antipodes) or when more than
// maxCandidates remain; true with b.cands the sites kept, in their order,
// which hold every cell's nearest site.
//
// Distances from the centre c without a geodesic each: with s0 the
// candidate of shortest chord, measured (F0 = s(c, s0) and the azimuth at
// s0 of the geodesic from c, along which the distance from c grows), the
// distance from c is a function of the site's position whose gradient at
// s0 is that direction and whose second derivative along the geodesic
// from s0 to a site k (length d, azimuth beta at s0) lies in farHessian's
// [A, B] (the comparison theorem, c in the site's role); so
//
//	s(c, k) in F0 + d cos(beta - az) + [A, B] d^2/2,
//
// widened by 1 mm + 1e-9 F0 and intersected with F0 -+ d, with A and B
// those of the longest d (both bounds loosen as d grows) when it is below
// F0/2 and F0 + d <= maxFarDist. One geodesic per candidate and s0,
// reused across super-tiles and calls (the same s0 serves many).
//
// Pruning: j is the candidate of smallest upper end; k is left out when
//
//	lo_k - hi_j > T G,  G = 2 sin(D/(2b)) / min(sin(r1/b), sin(r2/b)),
//
// with T the longest geodesic from c to a cell of the super-tile, D =
// s(s0, j) + s(s0, k) >= s(j, k) (and 2 sin(D/2b) taken as its upper
// bound D/b) and [r1, r2] the range of every
// candidate's bracket widened by T. Along the geodesic from c to a cell
// p (length t <= T) the gradient of s(., k) - s(., j) is the difference
// of two unit vectors at the angle theta the two sites make at that
// point, of length 2 sin(theta/2); so s(p, k) - s(p, j) >= lo_k - hi_j -
// T max 2 sin(theta/2) > 0 when that maximum is at most G, and k is never
// nearest. The bound on theta: in geodesic polar coordinates about the
// point, the metric is dr^2 + J^2 dtheta^2 with J >= b sin(r/b) (Rauch's
// comparison theorem with the largest curvature 1/b^2, for r < pi b;
// do Carmo, Riemannian Geometry, 1992, ch. 10), so the geodesic from j
// to k (within pi b of the point: Klingenberg's lemma, see maxFarDist,
// keeps the coordinates valid) is no shorter than the curve with the same
// coordinates on the sphere of radius b, whose ends are there at least
// as far apart as the law of cosines gives:
//
//	sin^2(theta/2) <= sin((D+dr)/2b) sin((D-dr)/2b) / (sin(r_j/b) sin(r_k/b)) <= sin^2(D/2b) / (sin(r_j/b) sin(r_k/b)),
//
// dr = r_j - r_k (|dr| <= D), the last step as sin x sin y <= sin^2((x+y)/2).
func (b *bracketer) farPrune(clat, clon float64, st *stencil, farOnly bool) bool {
	first, _ := b.chordNearest(geodesy.ECEF(clat, clon))
	return b.farPruneFrom(clat, clon, first, st, farOnly)
}

// farPruneFrom is farPrune with s0 = b.cands[first] found by the caller
// (chordNearest; first < 0, no candidate, reports false).
func (b *bracketer) farPruneFrom(clat, clon float64, first int, st *stencil, farOnly bool) bool {
	if !st.ok || first < 0 {
		return false
	}
	s0 := b.cands[first]
	slat, slon := b.f.ix.Site(s0)
	f0, _, az2 := geodesy.Inverse(clat, clon, slat, slon)
	lo, hi, fan, j, ok := siteBrackets(b.f.ix, &b.sc.fans, s0, f0, az2, b.cands, b.sc.farLo[:0], b.sc.farHi[:0])
	if !ok {
		return false
	}
	b.sc.farLo, b.sc.farHi = lo, hi
	r1, r2 := slices.Min(lo)-st.tmax, slices.Max(hi)+st.tmax
	if !(r1 > 0 && r2 <= maxFarDist) || farOnly && r1 < maxTaylorDist {
		return false
	}
	// T G with 2 sin(D/2b) <= D/b.
	tg := st.tmax * sqrtKmax / (min(math.Sin(r1*sqrtKmax), math.Sin(r2*sqrtKmax)) * (1 - 1e-12))
	dj := fan.at(b.cands[j]).d
	b.kept = b.kept[:0]
	for q, k := range b.cands {
		if q != j && lo[q]-hi[j]-tg*(dj+fan.at(k).d) > 1e-3 {
			continue
		}
		if b.kept = append(b.kept, k); len(b.kept) > maxCandidates {
			return false
		}
	}
	b.cands = append(b.cands[:0], b.kept...)
	return true
}

// antipodePrune is farPrune where its brackets end: round the antipodes
// of training points close together, where every candidate is more than
// maxFarDist away and the index's query measures most of them at every
// cell (100 to 200 geodesics a cell around 300 points). It measures the
// geodesic from the super-tile's centre c to each candidate (d_k, exact
// to Inverse's 15 nm; we allow 1 mm + 1e-9 d_k) and keeps, as farPrune
// does, the candidates that can be nearest to a cell: with j the
// candidate nearest to c, k is left out when
//
//	d_k - d_j > T 2 sin(D_jk/(2b)) / min(sin(r1/b), sin(r2/b)),
//
// T the longest geodesic from c to a cell, D_jk the geodesic from j to k
// and [r1, r2] = [min(d_j, d_k) - T, max(d_j, d_k) + T] the range of
// both distances along the geodesic from c to a cell: the bound on the
// angle the two sites make at a point derived at farPrune, which holds
// while every point of the geodesic from j to k is within pi b of that
// point (Klingenberg's lemma, see maxFarDist), ensured here by r2 + D_jk
// below pi b; a site for which the bound does not apply (r1 <= 0 or r2 +
// D_jk >= pi b: on or near a site's cut locus, within about 150 km of
// the antipodes) is kept. Away from the cut loci the distances to all the
// sites are nearly parallel functions (sin(r/b) is small, but so is D/b
// against the differences of d_k across a cluster), so a few remain.
//
// It is tried only when the candidate of shortest chord lies beyond
// maxTaylorDist from c (one geodesic; else it reports false at once). It
// reports false, leaving b.cands as they were, when more than
// maxCandidates remain, and then keeps the geodesics in b.antiD for
// antipodeSites. It costs a geodesic per candidate and super-tile, and
// one per pair of j and candidate (kept across super-tiles, siteFans).
func (b *bracketer) antipodePrune(clat, clon float64, st *stencil) bool {
	if !st.ok {
		return false
	}
	ix := b.f.ix
	first, _ := b.chordNearest(geodesy.ECEF(clat, clon))
	if first < 0 {
		return false
	}
	flat, flon := ix.Site(b.cands[first])
	if !(geodesy.Distance(clat, clon, flat, flon) > maxTaylorDist) {
		return false
	}
	d := b.sc.farLo[:0]
	j := -1
	for _, k := range b.cands {
		slat, slon := ix.Site(k)
		dk := geodesy.Distance(clat, clon, slat, slon)
		d = append(d, dk)
		q := len(d) - 1
		if j < 0 || dk < d[j] {
			j = q
		}
	}
	b.sc.farLo = d
	sj := b.cands[j]
	jlat, jlon := ix.Site(sj)
	fan := b.sc.fans.fan(ix, sj)
	t := st.tmax
	eps := func(v float64) float64 { return 1e-3 + 1e-9*v }
	b.kept = b.kept[:0]
	for q, k := range b.cands {
		if q != j {
			// An upper bound on D_jk, and the range of both distances.
			djk := pairAt(ix, fan, jlat, jlon, k).d
			djk += eps(djk)
			r1 := min(d[j]-eps(d[j]), d[q]-eps(d[q])) - t
			r2 := max(d[j]+eps(d[j]), d[q]+eps(d[q])) + t
			if r1 > 0 && r2+djk < math.Pi*geodesy.SemiMinor*(1-1e-9) {
				// 2 sin(D/2b) <= D/b; the divisor lowered for its
				// rounding.
				g := t * djk * sqrtKmax / (min(math.Sin(r1*sqrtKmax), math.Sin(r2*sqrtKmax)) * (1 - 1e-12))
				if (d[q]-eps(d[q]))-(d[j]+eps(d[j]))-g > 1e-3 {
					continue
				}
			}
		}
		b.kept = append(b.kept, k)
	}
	if len(b.kept) > maxCandidates {
		b.antiD = d
		return false
	}
	b.cands = append(b.cands[:0], b.kept...)
	return true
}

// antipodeSites sets b.measured to every candidate of the super-tile
// (centre (clat, clon)) at the distance antipodePrune measured, with the
// 1-Lipschitz bracket (neither Taylor form: their Hessian bounds end
// short of the antipodes), by increasing distance, and reports true: the
// list denseCell's exact computation takes, which measures at each cell
// only the sites whose bracket reaches the smallest upper end, those
// within twice the cell's distance from the centre of the nearest there
// (a few tens of the hundreds the index's query measures so near the
// antipodes, where its chord bounds say nothing).
func (b *bracketer) antipodeSites(clat, clon float64) bool {
	b.measured = b.measured[:0]
	for q, k := range b.cands {
		slat, slon := b.f.ix.Site(k)
		f0 := b.antiD[q]
		b.measured = append(b.measured, anchorSite{k: k, f0: f0, inv: 1 / f0, margin: 1e-3 + 1e-9*f0, slat: slat, slon: slon})
	}
	slices.SortStableFunc(b.measured, func(x, y anchorSite) int { return cmp.Compare(x.f0, y.f0) })
	return true
}

// siteBrackets appends to lo and hi, for each site ks[q] of ix, a bracket
// of its distance from a point c, from the site s0 measured at c (the
// geodesic from c to s0 has length f0 and azimuth az2 at s0), without a
// geodesic of its own (see farPrune): F0 + d cos(beta - az2) + [A, B]
// d^2/2, widened by 1 mm + 1e-9 F0 and intersected with F0 -+ d, A and B
// those of the longest d. It returns them, the fan of s0 (its geodesics to
// the sites) and the q of the smallest upper end (the first such); ok is
// false, and nothing else is set, when the bound does not apply (a site d
// >= F0/2 from s0, or F0 + d beyond maxFarDist).
func siteBrackets(ix *geodesy.Index, fans *siteFans, s0 int, f0, az2 float64, ks []int, lo, hi []float64) (los, his []float64, fan fanRow, j int, ok bool) {
	slat, slon := ix.Site(s0)
	sz, cz := math.Sincos(az2 * math.Pi / 180)
	fan = fans.fan(ix, s0)
	// The longest geodesic from s0 to a site, for one [A, B] that holds
	// for all (both bounds only loosen as d grows).
	dmax := 0.0
	for _, k := range ks {
		dmax = max(dmax, pairAt(ix, fan, slat, slon, k).d)
	}
	if !(f0 > 2*dmax && f0+dmax <= maxFarDist) {
		return lo, hi, fanRow{}, 0, false
	}
	a, bb, hok := farHessian(farCot(f0), f0, dmax)
	if !hok && dmax > 0 {
		return lo, hi, fanRow{}, 0, false
	}
	margin := 1e-3 + 1e-9*f0
	n := len(lo)
	for _, k := range ks {
		p := fan.at(k)
		l, h := f0-margin, f0+margin
		if p.d > 0 {
			base, half := f0+p.d*(p.cz*cz+p.sz*sz), p.d*p.d/2
			l = max(l-p.d, base+a*half-margin)
			h = min(h+p.d, base+bb*half+margin)
		}
		if lo, hi = append(lo, l), append(hi, h); h < hi[n+j] {
			j = len(hi) - 1 - n
		}
	}
	return lo, hi, fan, j, true
}

// denseCell computes block cell i (entry j of the super-tile's stencil) of
// a super-tile with many candidates exactly: from denseSites' sites
// (exact: the geodesics to the few whose Taylor brackets reach the
// smallest upper end), or with the index's query when ok is false; both
// are Index.Nearest's value bit for bit.
func (b *bracketer) denseCell(i int, ok bool, j int) {
	if !ok {
		b.exactCell(i)
		return
	}
	r, c := b.y0+i/b.w, b.x0+i%b.w
	b.exact(i, b.measured, b.big, j, b.ll.lat(r), b.ll.lon(c))
}

// hLoFast and hHiFast bound the Hessian comparison bounds at distance r
// (m), 0 < r <= b, without a tangent: with x = r/b <= 1,
//
//	cot(x)/b >= (1/x - x/3 - x^3/40)/b = 1/r - r/(3 b^2) - r^3/(40 b^4)
//
// (the series cot x = 1/x - x/3 - x^3/45 - 2x^5/945 - ... has its tail
// below x^3 (1/45 + 2/945 + ...) < x^3/40 for x <= 1), and
// (b/a^2) cot(b r/a^2) <= 1/r (y cot y <= 1).
func hLoFast(r float64) float64 {
	x := r * sqrtKmax
	return (1/x - x/3 - x*x*x/40) * sqrtKmax
}

func hHiFast(r float64) float64 { return 1 / r }

// farCot returns a lower bound on cot(f0/b) for a distance 0 < f0 < pi b:
// cos/sin, lowered by 1e-12 of its size and by 1e-12 for the rounding of
// both (the bracket it serves has a margin of 1 mm; this moves it by
// under 1e-9 m).
func farCot(f0 float64) float64 {
	s, c := math.Sincos(f0 * sqrtKmax)
	v := c / s
	return v - math.Abs(v)*1e-12 - 1e-12
}

// farHessian returns bounds A <= f” <= B along every geodesic of length
// at most t from an anchor at distance f0 from a site, for the far form
// of the Taylor bracket (f0 + t from maxTaylorDist to maxFarDist, f0 > 2
// t), given cx <= cot(f0/b) (farCot); ok is false when t is not in (0, b].
// Along such a geodesic the distance r to the site stays in [f0 - t, f0 +
// t] and f” = h(r) (1 - f'^2), with 1 - f'^2 in [0, 1] and h between the
// comparison bounds (see Bracket), both falling with r:
//
//	A = min(0, cot((f0+t)/b)/b),  B = 1/(f0 - t).
//
// The lower bound turns negative beyond pi b/2 (the geodesic circles about
// the site bend back towards it past a quarter of the way round) and
// falls towards -Inf at pi b, hence maxFarDist. cot((f0+t)/b) is taken
// from the addition formula (cx cd - 1)/(cx + cd), cd = cot(t/b), which
// grows with both cx and cd (its derivatives are (cd^2+1) and (cx^2+1)
// over (cx+cd)^2), with cd >= 1/x - x/3 - x^3/40, x = t/b <= 1 (see
// hLoFast): a lower bound with two divisions and no tangent, lowered like
// farCot for its rounding. The bracket is then
//
//	f(p) in f(a) + t f'(0) + [A, B] t^2/2,
//
// widened and intersected as the near form's; it is looser than the near
// form (no use of the range of f'), but at these distances B t^2/2 and
// |A| t^2/2 are a few hundred metres for the 50 km a super-tile's cell lies
// from its centre on a 2.5 arc-minute grid, far under the floor bins of a
// layout whose values reach thousands of kilometres.
func farHessian(cx, f0, t float64) (a, b float64, ok bool) {
	x := t * sqrtKmax
	if !(x > 0 && x <= 1) {
		return 0, 0, false
	}
	cd := 1/x - x/3 - x*x*x/40
	v := (cx*cd - 1) / (cx + cd)
	v -= math.Abs(v)*1e-12 + 1e-12
	return min(0, v*sqrtKmax), 1 / (f0 - t), true
}

// kLo1 and kLo3 are the coefficients of hLoFast: 1/(3 b^2) and 1/(40 b^4).
var (
	kLo1 = sqrtKmax * sqrtKmax / 3
	kLo3 = sqrtKmax * sqrtKmax * sqrtKmax * sqrtKmax / 40
)

// patch brackets the cells of the block in patch (pr, pc) that the
// super-tile's anchor left pending; (clat, clon) is the super-tile's
// centre.
func (b *bracketer) patch(pr, pc int, clat, clon float64) {
	r0, c0 := pr*patchP, pc*patchP
	any := false
	for r := r0; r < r0+patchP && !any; r++ {
		for c := c0; c < c0+patchP; c++ {
			if i, ok := b.needed(c, r); ok && b.pending[i] {
				any = true
				break
			}
		}
	}
	if !any {
		return
	}
	ll := b.ll
	st := ll.stencil(patchK, pr)
	if !st.ok {
		b.exactRange(r0, c0, patchP, patchP)
		return
	}
	ra, ca := r0+patchK, c0+patchK
	alat, alon := ll.lat(ra), ll.lon(ca)
	// Lower bounds at the anchor from the super-tile's centre.
	l := pathBound(clat, clon, alat, alon)
	best, bi := math.Inf(1), -1
	for j, d := range b.centreD {
		if lb := d - l; lb < best {
			best, bi = lb, j
		}
	}
	b.measured = append(b.measured[:0], b.measure(b.cands[bi], alat, alon, st))
	best = b.measured[0].f0
	for j, d := range b.centreD {
		if j == bi || d-l > best+2*st.tmax+1e-3 {
			continue
		}
		b.measured = append(b.measured, b.measure(b.cands[j], alat, alon, st))
		best = math.Min(best, b.measured[len(b.measured)-1].f0)
	}
	sortSites(b.measured)
	for dr := -patchK; dr <= patchK; dr++ {
		for dc := -patchK; dc <= patchK; dc++ {
			i, ok := b.needed(ca+dc, ra+dr)
			if !ok || !b.pending[i] {
				continue
			}
			j := (dr+patchK)*patchP + dc + patchK
			if b.cell(i, st, j) {
				continue
			}
			b.exact(i, b.measured, st, j, ll.lat(ra+dr), ll.lon(ca+dc))
		}
	}
}

// exact computes block cell i, at (lat, lon) and at entry j of the
// stencil st of the anchor where sites were measured (which hold its
// nearest site), exactly: the smallest geodesic to the sites whose bracket
// reaches the smallest upper end (the others are farther), Index.Nearest's
// value bit for bit.
func (b *bracketer) exact(i int, sites []anchorSite, st *stencil, j int, lat, lon float64) {
	t, su, cu := st.t[j], st.sa[j], st.ca[j]
	minHi := math.Inf(1)
	for q := range sites {
		if _, h := taylorBracket(&sites[q], t, su, cu); h < minHi {
			minHi = h
		}
	}
	d := math.Inf(1)
	for q := range sites {
		m := &sites[q]
		// A site whose lower end exceeds a distance already measured is
		// farther too (sites come by distance at the anchor, so the
		// nearest are measured first).
		if l, _ := taylorBracket(m, t, su, cu); l > minHi || l > d {
			continue
		}
		d = math.Min(d, geodesy.Distance(lat, lon, m.slat, m.slon))
	}
	b.set(i, d, d)
}

// sortSites sorts measured sites by distance at the anchor (insertion
// sort: the lists hold a few sites).
func sortSites(m []anchorSite) {
	for i := 1; i < len(m); i++ {
		for j := i; j > 0 && m[j].f0 < m[j-1].f0; j-- {
			m[j], m[j-1] = m[j-1], m[j]
		}
	}
}

// settled reports whether the bracket [lo, hi] of a distance is narrow
// enough (hi - lo <= 2 BracketTol lo) and has its values -hi and -lo in the
// same bins (sameBins). Callers write quick(lo, hi) || settled(lo, hi):
// quick is small enough to be inlined and decides most brackets alone.
func (b *bracketer) settled(lo, hi float64) bool {
	return hi-lo <= 2*BracketTol*lo && (b.subQuick(lo, hi) || b.sameBins(lo, hi))
}

// subQuick reports true only when sameBins does, without asking the
// Binner: when both ends of the bracket share a sub-bin of the floor grid
// (SubEdgeBinner; sub-bins nest in the floor bins) and, by the sub-bin's
// edge, an exact bin, as quick on the floor grid. With x = lo s' and
// s' = SubFloor s, the sub-bins of -hi and -lo are -ceil(hi s') and
// -ceil(x), equal iff hi s' <= ceil(x). A false says nothing.
func (b *bracketer) subQuick(lo, hi float64) bool {
	x := lo * b.subScale
	c := math.Ceil(x)
	return c < b.nSub && x >= 0x1p-1000 && hi*b.subScale <= c && (0-lo < b.sub[int(c)] || 0-hi > b.sub[int(c)])
}

// quickBins is what quick reads: a kernel copies it into its locals.
type quickBins struct {
	scale  float64   // 2^-e
	nEdges float64   // len(edges)
	edges  []float64 // EdgeBinner's FloorEdges, or nil
	tail   bool      // the floor bins beyond edges hold no edge
}

// quick reports true only when settled does, without a call: when the
// bracket is narrow enough and both ends share a floor bin and, by the
// floor bin's edge (EdgeBinner), an exact bin. With x = lo s and y = hi s
// (s = 2^-e: exact products for x >= 2^-1000), the floor bins of -hi and
// -lo are -ceil(y) and -ceil(x), equal iff y <= ceil(x) (y >= x). A false
// says nothing.
func (b *quickBins) quick(lo, hi float64) bool {
	return quickIn(lo, hi, b.scale, b.nEdges, b.edges, b.tail)
}

// quickIn is quick on the fields of quickBins, for loops that keep them
// in registers.
func quickIn(lo, hi, scale, nEdges float64, edges []float64, tail bool) bool {
	x := lo * scale
	c := math.Ceil(x)
	return hi-lo <= 2*BracketTol*lo && x >= 0x1p-1000 && hi*scale <= c &&
		(c < nEdges && (0-lo < edges[int(c)] || 0-hi > edges[int(c)]) || c >= nEdges && tail)
}

// sameBins reports whether the values -hi and -lo (lo <= hi) share their
// bins: the same floor bin, and -lo in the exact-bin cell of -hi (see
// Binner), which bins is asked for only when -hi is outside the last one.
func (b *bracketer) sameBins(lo, hi float64) bool {
	if hi-lo >= b.binW {
		return false // wider than a floor bin [k w, (k+1) w)
	}
	u1, u2 := 0-hi, 0-lo
	// The floor bin k of u1 (floorBin; u2 >= u1 is in a bin >= k): u2
	// shares it iff u2 s < k + 1, exact since s is a power of two. k is
	// floor(x) by truncation (exact: |x| < 2^63 for any distance), but
	// for the sign of a zero, which k + 1 does not see.
	x, y := u1*b.scale, u2*b.scale
	k := float64(int64(x))
	if k > x {
		k--
	}
	if x == 0 && u1 < 0 {
		k = -1 // underflow: bin -1
	}
	if y == 0 && u2 < 0 {
		y = -0.5 // underflow: bin -1
	}
	if !(y < k+1) {
		return false
	}
	if !((u1 > b.cellLo || b.cellClosed && u1 == b.cellLo) && u1 < b.cellHi) {
		b.cellLo, b.cellHi, b.cellClosed = b.bins.Cell(u1)
	}
	return u2 < b.cellHi
}

// taylorBracket returns bounds on the distance from the cell at geodesic
// length t and azimuth (sine su, cosine cu) from the anchor to site m (see
// Bracket).
func taylorBracket(m *anchorSite, t, su, cu float64) (lo, hi float64) {
	// The 1-Lipschitz bound, widened by the margin so that a bracket is
	// never a single value (only cells measured with Distance are).
	margin := m.margin
	lo, hi = max(0, m.f0-t-margin), m.f0+t+margin
	if !m.taylor && !m.far {
		return lo, hi
	}
	// f'(0): the gradient points away from the site, opposite the azimuth
	// towards it.
	c0 := -(cu*m.cz + su*m.sz)
	if c0 > 1 {
		c0 = 1
	} else if c0 < -1 {
		c0 = -1
	}
	if m.far {
		// Both bounds times the largest 1 - f'^2 over the range of f',
		// [c0 + t A q, c0 + t B q]: q first 1, then twice from the last
		// (when it can matter: farQ).
		q := 1.0
		if m.farQ {
			for range 2 {
				q = 1 - minSq(max(-1, c0+t*m.hA*q), min1(c0+t*m.hB*q))
			}
		}
		base, half := m.f0+t*c0, t*t/2
		if l := base + m.hA*q*half - margin; l > lo {
			lo = l
		}
		if h := base + m.hB*q*half + margin; h < hi {
			hi = h
		}
		return lo, hi
	}
	// Hessian bounds for this cell's t without a division: with x = t/f0
	// <= 1/2 (f0 > 2 t for a Taylor site), 1/(f0+t) >= (1-x)/f0 and
	// 1/(f0-t) = 1/(f0 (1-x)) <= (1 + x + 2x^2)/f0; the other terms of
	// hLoFast use the larger f0+t, which only lowers them further.
	x := t * m.inv
	ft := m.f0 + t
	h1 := (1-x)*m.inv - ft*kLo1 - ft*ft*ft*kLo3
	h2 := (1 + x + 2*x*x) * m.inv
	// f'' in [h1 q1, h2 q2], q the range of 1 - f'^2 with f' in [c0, p2];
	// twice, the second time with p2 from the first upper bound on f''
	// (the first time only q2 is needed).
	cc := c0 * c0
	p2 := min1(c0 + t*h2)
	q2 := 1.0
	if c0 > 0 {
		q2 = 1 - cc
	} else if p2 < 0 {
		q2 = 1 - p2*p2
	}
	p2 = min1(c0 + t*(h2*q2))
	q1 := 1 - cc
	if p2*p2 > cc {
		q1 = 1 - p2*p2
	}
	if q1 < 0 {
		q1 = 0
	}
	q2 = 1.0
	if c0 > 0 {
		q2 = 1 - cc
	} else if p2 < 0 {
		q2 = 1 - p2*p2
	}
	base := m.f0 + t*c0
	half := t * t / 2
	if l := base + h1*q1*half - margin; l > lo {
		lo = l
	}
	if h := base + h2*q2*half + margin; h < hi {
		hi = h
	}
	return lo, hi
}

// taylorRow sets lo[x], hi[x] = taylorBracket(m, ts[x], sa[x], ca[x]) for
// every x, bit for bit (the same operations in the same order; a loop
// without a call per cell).
func taylorRow(m *anchorSite, ts, sa, ca, lo, hi []float64) {
	ts, sa, ca, hi = ts[:len(lo)], sa[:len(lo)], ca[:len(lo)], hi[:len(lo)]
	margin, f0, inv, cz, sz := m.margin, m.f0, m.inv, m.cz, m.sz
	for x, t := range ts {
		l, h := max(0, f0-t-margin), f0+t+margin
		if !m.taylor && !m.far {
			lo[x], hi[x] = l, h
			continue
		}
		su, cu := sa[x], ca[x]
		c0 := -(cu*cz + su*sz)
		if c0 > 1 {
			c0 = 1
		} else if c0 < -1 {
			c0 = -1
		}
		if m.far {
			q := 1.0
			if m.farQ {
				for range 2 {
					q = 1 - minSq(max(-1, c0+t*m.hA*q), min1(c0+t*m.hB*q))
				}
			}
			base, half := f0+t*c0, t*t/2
			if v := base + m.hA*q*half - margin; v > l {
				l = v
			}
			if v := base + m.hB*q*half + margin; v < h {
				h = v
			}
			lo[x], hi[x] = l, h
			continue
		}
		x1 := t * inv
		ft := f0 + t
		h1 := (1-x1)*inv - ft*kLo1 - ft*ft*ft*kLo3
		h2 := (1 + x1 + 2*x1*x1) * inv
		cc := c0 * c0
		p2 := min1(c0 + t*h2)
		q2 := 1.0
		if c0 > 0 {
			q2 = 1 - cc
		} else if p2 < 0 {
			q2 = 1 - p2*p2
		}
		p2 = min1(c0 + t*(h2*q2))
		q1 := 1 - cc
		if p2*p2 > cc {
			q1 = 1 - p2*p2
		}
		if q1 < 0 {
			q1 = 0
		}
		q2 = 1.0
		if c0 > 0 {
			q2 = 1 - cc
		} else if p2 < 0 {
			q2 = 1 - p2*p2
		}
		base := f0 + t*c0
		half := t * t / 2
		if v := base + h1*q1*half - margin; v > l {
			l = v
		}
		if v := base + h2*q2*half + margin; v < h {
			h = v
		}
		lo[x], hi[x] = l, h
	}
}

// min1 returns p, or 1 when p > 1.
func min1(p float64) float64 {
	if p > 1 {
		return 1
	}
	return p
}

// Bounds is Bracket on the null model's values, the form a scoring pass
// takes: lo[i] <= value <= hi[i] with value = -distance (0 - d, as Fill),
// both ends in the same bins of bins, lo[i] == hi[i] (the exact value of
// Fill) where the cell was computed exactly, NaN where Fill gives NaN.
func (f *Field) Bounds(x0, y0, w, h int, need []uint64, bins interface {
	Cell(v float64) (lo, hi float64, closed bool)
	FloorScale() float64
}, lo, hi []float64) {
	if f.ll != nil {
		f.bracketLonLat(x0, y0, w, h, need, bins, lo, hi, true)
		return
	}
	f.Bracket(x0, y0, w, h, need, bins, lo, hi)
	for i := range lo[:w*h] {
		lo[i], hi[i] = 0-hi[i], 0-lo[i]
	}
}
