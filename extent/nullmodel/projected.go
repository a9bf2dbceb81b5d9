package nullmodel

import (
	"cmp"
	"math"
	"slices"
	"sync"

	"areasweep/extent/geodesy"
)

// chordNarrowMax is a chord (m) from which on no chord bracket is narrow
// enough to keep: for D >= chordNarrowMax, chordBracket(D) has hi >= D (1 +
// u/6) and lo <= D, so
//
//	(hi - lo)/lo >= u/6 = (kappa D/2)^2/6 >= (kappa 1.5e6/2)^2/6 = 2.34e-3 > 2 BracketTol,
//
// u growing with D (and no upper end at all beyond maxChord). Such a cell
// is computed exactly whatever its shortest chord, so the projected path
// only needs the shortest chord where it is below chordNarrowMax.
const chordNarrowMax = 1.5e6

// projSite is a candidate site of a tile of the projected path: its ECEF
// position, its chord from the tile's centre, and its coordinates.
type projSite struct {
	p        [3]float64
	cc       float64
	lat, lon float64
	k        int // its index in the Index
}

// projScratch holds one projected Bracket call's buffers.
type projScratch struct {
	lons, lats []float64 // centres from Centres (NaN: not fetched)
	ex, ey, ez []float64 // ECEF of the needed cells with a position (ex NaN: not bracketed)
	err        []float64 // bound on the distance of (ex, ey, ez) from the true centre (0: exact)
	cands      []int
	sites      []projSite // the candidates with their chords from a tile's centre or an anchor
	near       []projSite // those that can give a cell its shortest chord
	order      []projOrder
	clo, chi   []float64 // the chord bracket of the cells left to the anchors
	pend       []bool    // per block cell: left to the anchors
	anchor     []projAnchor
	asites     []projSite // the anchor's measured sites, for exact cells
	tileE      []float64  // per lattice tile of the block: its interpolation bound (NaN: exact centres)
	slotLat    []float64  // the block's lattice points (see positions)
	slotLon    []float64
	slotP      [][3]float64
	slotHave   []bool
	qc, qr, qs []int // a transform's cells (and slots)
	qlon, qlat []float64
	later      []projLater // cells to compute at their exact centres
	fans       siteFans    // prunable's geodesics between sites
	skip       []bool      // prunable's verdicts, in the order of its sites
	// prunable's candidates (in the order of its sites) and the brackets
	// of their distances from the anchor
	siteKs           []int
	pruneLo, pruneHi []float64
}

// projLater is a cell queued for flushExact.
type projLater struct {
	i       int
	nearest bool
}

// chordSitesAsListed sets sc.sites to the sites of sc.cands with their
// ECEF positions and chords from p, in sc.cands' order, and returns them
// with the position of the first site of shortest chord (-1 when there is
// none): the first of them sorted by chord with sortProjSites. Callers
// sort only the sites they keep (anchorSites, nearSites): near dense
// training points most of hundreds are left out.
func (sc *projScratch) chordSitesAsListed(f *Field, p [3]float64) (sites []projSite, first int) {
	ix, pts := f.ix, f.sitePoints()
	sc.sites = sc.sites[:0]
	first = -1
	for _, k := range sc.cands {
		lat, lon := ix.Site(k)
		q := pts[k]
		sc.sites = append(sc.sites, projSite{p: q, cc: dist3(p, q), lat: lat, lon: lon, k: k})
		if n := len(sc.sites) - 1; first < 0 || sc.sites[n].cc < sc.sites[first].cc {
			first = n
		}
	}
	return sc.sites, first
}

// sortProjSites sorts sites by chord, stably (insertion sort's order).
func sortProjSites(sites []projSite) {
	if len(sites) > 32 {
		slices.SortStableFunc(sites, func(a, b projSite) int { return cmp.Compare(a.cc, b.cc) })
		return
	}
	for i := 1; i < len(sites); i++ {
		for j := i; j > 0 && sites[j].cc < sites[j-1].cc; j-- {
			sites[j], sites[j-1] = sites[j-1], sites[j]
		}
	}
}

// sitePoints returns the projECEF position of every site, computed once.
func (f *Field) sitePoints() [][3]float64 {
	f.projOnce.Do(func() {
		f.projPts = make([][3]float64, f.ix.Len())
		for k := range f.projPts {
			f.projPts[k] = projECEF(f.ix.Site(k))
		}
	})
	return f.projPts
}

// projAnchor is a site measured at a tile's anchor: its exact distance
// and the sine and cosine of the azimuth towards it there.
type projAnchor struct {
	f0, sz, cz float64
	site       projSite
	// cx: farCot(f0) when f0 + the tile's largest th reaches
	// maxTaylorDist (the far form of the bracket may be used), else NaN.
	cx float64
}

// projOrder is a candidate site of a cell computed exactly, with its
// chord from the cell.
type projOrder struct {
	d float64
	q int
}

var projPool = sync.Pool{New: func() any { return new(projScratch) }}

// projBracketer is the state of one Bracket call on a Field made by New or NewPoints.
type projBracketer struct {
	f          *Field
	x0, y0     int
	w, h       int
	need       []uint64
	lons, lats []float64
	ex, ey, ez []float64
	err        []float64
	lo, hi     []float64
	sc         *projScratch
	bins       bracketer // only its bins: sameBins
	// The block's lattice tiles: (tr0, tc0) the first, nTR x nTC of them;
	// their lattice points by slot (see positions).
	tr0, tc0, nTR, nTC int
	slotLat, slotLon   []float64
	slotP              [][3]float64
	slotHave           []bool
}

// validLonLat reports whether Index.Nearest measures a point at (lat,
// lon): it gives NaN for a latitude outside [-90, 90] or a non-finite
// longitude.
func validLonLat(lat, lon float64) bool {
	return math.Abs(lat) <= 90 && !math.IsInf(lon, 0) && !math.IsNaN(lon)
}

// bracketProjected is Bracket on a Field made by New or NewPoints: each
// needed cell gets a position P'_p in ECEF, interpolated from a lattice of
// centres that Centres (PROJ) gives, with a bound e_p >= |P'_p - P_p| on
// its distance from the true centre P_p (or P_p itself from Centres, e_p
// = 0, where the lattice's check fails); it is bracketed from its
// shortest ECEF chord to a training site, then, where that bracket is too
// wide, from an exact geodesic measured at the anchor of its tile, and
// computed exactly, at its true centre, where both fail. Every step
// depends on the cell, the sites and the tiles of a global lattice, never
// on the block: a cell's bracket is the same however the grid is cut.
//
// Centres. The grid is cut into the tiles of the global lattice of 16 x
// 16 cells (rows and columns 16 i to 16 i + 15). A tile's nodes are the
// cells at rows 16 i + {0, 8, 16} and columns 16 j + {0, 8, 16} (beyond
// the tile and the grid where need be: Centres gives them), its checks
// the cells (0, 4), (16, 4), (4, 0), (4, 16), (4, 4) and (12, 12) from its
// corner; shared points are transformed once per block, all in one call
// (Points), about 8 per 256 cells. A cell at (16 u, 16 v) from the corner
// gets the quadratic (Lagrange, tensor product) interpolation P' of the
// nodes' ECEF positions. For a map F with constant third derivatives
// over the tile the error is exactly
//
//	P'(u, v) - F(u, v) = -(F_uuu w(u) + F_vvv w(v))/6,  w(u) = u (u - 1/2) (u - 1)
//
// (the terms u^2 v, u v^2 and below are interpolated exactly), so its
// errors E_t, E_b at the top and bottom checks (u = 1/4, where |w| = 3/64)
// and E_l, E_r at the left and right ones give
//
//	|P' - F| <= 1.0264 (max(|E_t|, |E_b|) + max(|E_l|, |E_r|)) =: B
//
// (max |w| = sqrt(3)/36 = 1.0264 * 3/64), even with third derivatives
// that vary linearly across the tile. The inside checks test that model:
// it predicts the error (3 E_t + E_b)/4 + (3 E_l + E_r)/4 at (4, 4) and,
// as w(3/4) = -w(1/4), -(E_t + 3 E_b)/4 - (E_l + 3 E_r)/4 at (12, 12); if
// either is off by more than B/4 + 1 mm, or a node or check has no
// position, or e below exceeds 1/16 of a floor bin (lerpCap: brackets
// that wide would cross bin edges often enough that the exact cells cost
// more than PROJ), every cell of the tile takes its centre from Centres
// (the tile is decided from its lattice points and the bins alone).
// Otherwise e_p = 2 B + 1 mm for each cell of the tile: 2 is our own
// safety factor. The bound is exact for maps whose third derivatives are
// constant (or linear) over a tile, and checked per tile at two points it
// did not use; for an arbitrary PROJ operation (a grid shift with kinks,
// say) it is a practical bound, not a proven one, hence the factor and
// the fallback. Cells are also assumed to have a position where all of
// their tile's lattice points do: true when the projection's domain is
// convex in grid coordinates (the disk of an azimuthal projection, say).
// On the EPSG:3035 grid of BenchmarkNullVsRaster (2.45 km cells, 39 km
// tiles) B is at most 2 cm and the true error at most 0.74 B (pyproj);
// cells of 25 km or more (tiles of 400 km) mostly fail lerpCap. Every
// bracket below is that of the true centre: with |P'_p - P_p| <= e_p, a
// chord D' from P'_p to any point is within e_p of the true chord, so a
// chord bracket is chordBracket(D' - e_p)'s lower end to chordBracket(D'
// + e_p)'s upper end, and a Taylor bracket (below) takes t in that range
// and tc within e_p more.
//
// Chords. The bracket of cell p is that of D* = min_k |P'_p - P_k| over
// every site k (P the ECEF positions, projECEF), widened by e_p as said;
// it is kept when hi - lo <= 2 BracketTol lo and -hi, -lo share their bins
// (sameBins). The candidates are found as in Distances: the block is
// walked in tiles of 16 x 16 cells, split in four while a tile has no
// usable centre or more than maxCandidates candidates, down to single
// cells (any number). For a tile with centre c (from Centres or the
// lattice), e the largest e_p of its needed cells, rho the chordBracket
// upper end of the longest chord from c to a needed cell's P'_p plus e (so
// rho >= s(c, p), the geodesic to the true centre, for each of them;
// Schur's bound, see Bracket) and d1 >= s(c, s_1) the upper end of
// Index.NearestBounds at c (no geodesic), the sites the index lists within
//
//	R = rho + max(d1 + rho, H),  H = chordBracket(min(d1 + rho, chordNarrowMax) + 2 e) upper end,
//
// of c (Index.Within) hold, for every needed cell p of the tile:
//
//   - its geodesic nearest site s*: s(c, s*) <= s(c, p) + s(p, s_1) <=
//     2 rho + d1 (triangle inequality, as in Distances);
//   - when the true shortest chord D is at most chordNarrowMax, a site q*
//     with the shortest chord D* from P'_p: |P_p - P_q*| <= D* + e_p <=
//     D + 2 e_p, D <= |P_p - P_s*| <= s(p, s*) <= s(p, s_1) <= rho + d1
//     (a chord is never longer than the geodesic), and chordBracket's
//     upper end grows with the chord, so s(p, q*) <= H and s(c, q*) <=
//     rho + H.
//
// So the shortest chord over the candidates is D* itself (the minimum of
// the same numbers, bit for bit) whenever D <= chordNarrowMax, and above
// it both D* and the candidates' minimum give a bracket that is not
// narrow (see chordNarrowMax); both hold the distance, as the candidates
// hold s*. The chords from a cell are taken in increasing order of the
// site's chord cc from c, stopping once cc - rho (a lower bound on the
// cell's chord, |P'_p - P_c| <= rho) exceeds the shortest so far by 1 m;
// sites that cannot give any cell of the tile its shortest chord are left
// out first, as in the latitude-longitude path's chords. A bracket
// narrower than exactWidth floor bins that crosses a bin edge is not
// narrowed further: the cell is computed exactly.
//
// Anchors. The other cells whose chord bracket fails go to the anchor a of
// their tile on the global lattice of 16 x 16 cells (a is its cell (16 i
// + 8, 16 j + 8), a node, whose centre Centres gives even outside the
// block). With t the geodesic from a to the cell p (in [tl, th], the
// chord bracket of |P'_p - P_a| widened by e_p) and u its unit initial
// direction, the geodesic gamma(s) has its acceleration g(s) normal to
// the ellipsoid with |g| <= kappa (its normal curvature), and the unit
// normal N turns at most at rate kappa along it (the shape operator's
// norm is the largest principal curvature), so with Pi the projection
// onto the tangent plane at a, |Pi g(s)| <= kappa |N(gamma(s)) - N(a)| <=
// kappa^2 s, and
//
//	|Pi (P_p - P_a) - t u| = |int_0^t (t - s) Pi g(s) ds| <= kappa^2 t^3 / 6
//
// (4 mm at t = 10 km); e1 is that plus e_p. For a site k with distance f
// = f_k(a) and azimuth az at a (geodesy.Inverse), the gradient of f_k at a
// is -v, v = cos(az) north + sin(az) east (the geodetic east and north at
// a), so t f'(0) = <t u, -v> lies within e1 of tc = <Pi (P'_p - P_a), -v>,
// computed from the ECEF offset alone (a unit vector: P'_p moves tc by at
// most e_p). Along gamma, the second derivative of f is h (1 - f'^2), h
// between the Hessian comparison bounds (see Bracket), so it lies in [A,
// B] = [h_lo(f + th) q1, q2 / (f - th)], q1 and q2 the extremes of 1 -
// f'^2 for f' in [cl, ch + th B] ([cl, ch] the range of tc +- e1 over t in
// [tl, th]; f' only grows since A >= 0), B first with q2 = 1, then twice
// from the previous B; so
//
//	f_k(p) in [f + tc - e1 + A tl^2/2, f + tc + e1 + B th^2/2],
//
// widened by 1 mm + 1e-9 f (PROJ's 15 nm and the rounding of the
// coordinates and azimuths) and intersected with the 1-Lipschitz bracket
// [f - th, f + th] widened the same; a site with f <= 2 th gets only the
// latter, and one with f + th >= 6000 km (see maxTaylorDist) the far form
// of the bracket (farHessian at the cell's th, when f + th <= maxFarDist,
// else only the 1-Lipschitz bracket):
//
//	f_k(p) in [f + tc - e1 + A th^2/2, f + tc + e1 + B th^2/2],  A <= 0 <= B. The cell's bracket is
//
// the minimum over the sites of both ends, intersected with its chord
// bracket, kept under the same two conditions. Sites: those the index
// lists within d1(a) + S of a, S = 2 T + 2 (1 mm + 1e-9 d1(a)) + 1 m, T the
// largest th of the block's pending cells of the tile, measured in
// increasing order of chord while the chord's lower bound is within S of
// the smallest distance so far, and kept within S of it. A site k left out
// has f_k(a) > d(a) + 2 th + its margins, d(a) the anchor's nearest
// distance, so its lower end f_k(a) - th - margin lies above the upper end
// d(a) + th + margin of the anchor's nearest site: it changes neither end
// of the minimum, which is therefore the minimum over every site, however
// large T (that is, the block) makes the list. The same sites hold every
// pending cell's nearest site (f_{s*}(a) <= s(a, p) + s(p, s_1) <= d(a) +
// 2 t).
//
// Exact cells get Index.Nearest's value bit for bit, at their true centre
// (from Centres: Points for the interpolated ones, one call per chord
// tile or anchor): the smallest geodesy.Distance(lat_p, lon_p, site)
// (Nearest's argument order) over the tile's candidates or the anchor's
// sites (both hold the nearest), taken in increasing order of chord until
// the chord's lower bound (chordBracket) exceeds the smallest distance so
// far (such a site and the later ones are farther).
//
// Interpolated centres and the outputs. A bracket's midpoint, not only
// its bins, reaches the outputs: the sorting-bias tally adds it to the
// millimetre and the preview copies it (see pass.Virtual). So brackets
// from interpolated centres (and the few more exact cells they bring)
// move the sorting-bias means and the preview's values against brackets
// from PROJ's centres: by 1e-9 to 1e-6 of their value on most of 80
// randomized projected studies, 4e-5 at most (a CONUS Albers grid), all
// within the 0.1% those means are computed to (BracketTol). The owner
// accepted it: the means are descriptive, already computed from
// midpoints;
// every score is unchanged, since a bracket shares its value's bins and
// the cells whose exact values the pass needs are computed with Fill, and
// the outputs stay the same on any worker count and shard split, since a
// cell's bracket depends on the cell and the global lattice alone.
// (Field.exactCentres, for tests, takes every centre from Centres.)
//
// On BenchmarkNullVsRaster's study on an EPSG:3035 grid (6000 x 4000 km,
// 4 million cells of 2.45 km) the chords settle 48% of the cells and the
// anchors all but 1.33% (1.31% with PROJ's centres), computed exactly;
// the bounds cost about 125 CPU ns per cell against 440 to 460 with a
// PROJ transform per cell, and 1500 to 1700 when every cell was computed
// (BenchmarkNullBoundsProjected in cmd/internal/pass; see README,
// Performance). PROJ's proj_trans_generic on the operation GDAL uses
// takes about 80% of GDAL's time for the same points, so a cheaper exact
// transform would not have done it.
func (f *Field) bracketProjected(x0, y0, w, h int, need []uint64, bins Binner, lo, hi []float64) {
	n := w * h
	sc := projPool.Get().(*projScratch)
	defer projPool.Put(sc)
	if cap(sc.lons) < n {
		sc.lons, sc.lats = make([]float64, n), make([]float64, n)
		sc.ex, sc.ey, sc.ez = make([]float64, n), make([]float64, n), make([]float64, n)
		sc.err = make([]float64, n)
	}
	if cap(sc.pend) < n {
		sc.pend, sc.clo, sc.chi = make([]bool, n), make([]float64, n), make([]float64, n)
	}
	pend := sc.pend[:n]
	clear(pend)
	b := projBracketer{f: f, x0: x0, y0: y0, w: w, h: h, need: need, lons: sc.lons[:n], lats: sc.lats[:n],
		ex: sc.ex[:n], ey: sc.ey[:n], ez: sc.ez[:n], err: sc.err[:n], lo: lo, hi: hi, sc: sc,
		bins: bracketer{bins: bins, cellLo: math.NaN(), cellHi: math.NaN(), quickBins: quickBins{scale: bins.FloorScale()}, binW: 1 / bins.FloorScale()}}
	b.bins.setEdges()
	for i := range n {
		lo[i], hi[i] = math.NaN(), math.NaN()
		b.ex[i], b.lats[i], b.err[i] = math.NaN(), math.NaN(), 0
	}
	b.positions()
	for r0 := 0; r0 < h; r0 += tileSide {
		for c0 := 0; c0 < w; c0 += tileSide {
			b.tile(r0, min(r0+tileSide, h), c0, min(c0+tileSide, w))
		}
	}
	for tr := floorDiv(y0, tileSide); tr*tileSide < y0+h; tr++ {
		for tc := floorDiv(x0, tileSide); tc*tileSide < x0+w; tc++ {
			b.anchored(tr, tc)
		}
	}
}

// needed reports whether block cell i is needed.
func (b *projBracketer) needed(i int) bool { return b.need == nil || b.need[i] != 0 }

// lerpOff are the offsets, in cells from a lattice tile's first row (or
// column), of the lattice points' rows (columns) held per tile (its
// slots): corners (0), quarter points (4 and 12) and midpoints (8); slot
// 4, offset 16, is the next tile's first.
var lerpOff = [4]int{0, 4, 8, 12}

// lerpW holds the weights of quadratic interpolation at k/16, k = 0 to
// 16, on the nodes 0, 1/2 and 1 (Lagrange: (k-8)(k-16)/128, k(16-k)/64,
// k(k-8)/128, all exact in binary).
var lerpW = func() (w [tileSide + 1][3]float64) {
	for k := range w {
		x := float64(k)
		w[k] = [3]float64{(x - 8) * (x - 16) / 128, x * (16 - x) / 64, x * (x - 8) / 128}
	}
	return w
}()

// lerpNodeSlot is the lattice slot (see lerpOff) of node 0, 1/2 and 1 of
// quadratic interpolation.
var lerpNodeSlot = [3]int{0, 2, 4}

// lerpChecks are the lattice slots (row, column; see lerpOff) of a tile's
// checks: top (0, 4), bottom (16, 4), left (4, 0), right (4, 16), and
// inside (4, 4) and (12, 12).
var lerpChecks = [6][2]int{{0, 1}, {4, 1}, {1, 0}, {1, 4}, {1, 1}, {3, 3}}

// lerpOmega is the ratio of the largest |w(u)| over [0, 1], w(u) = u (u -
// 1/2) (u - 1) (sqrt(3)/36 at u = 1/2 +- sqrt(3)/6), to |w(1/4)| = 3/64:
// 64 sqrt(3)/108, rounded up.
const lerpOmega = 1.02641

// lerpSafety is our factor on the interpolation error a tile's lattice
// points predict (see bracketProjected).
const lerpSafety = 2

// lerpCap is the largest interpolation bound, in floor bins, of a tile
// whose centres are interpolated (our choice): wider brackets would cross
// bin edges often enough that computing those cells exactly costs more
// than transforming the tile's centres.
const lerpCap = 1.0 / 16

// positions sets the ECEF position (ex, ey, ez) and its error bound err
// of every needed cell of the block: per tile of the global 16 x 16
// lattice, interpolated from the tile's lattice points when the tile's
// check passes (see bracketProjected), otherwise from Centres (latitude
// and longitude in lats and lons, err 0). A cell with no position keeps
// ex NaN.
func (b *projBracketer) positions() {
	sc := b.sc
	tr0, tc0 := floorDiv(b.y0, tileSide), floorDiv(b.x0, tileSide)
	nTR, nTC := floorDiv(b.y0+b.h-1, tileSide)-tr0+1, floorDiv(b.x0+b.w-1, tileSide)-tc0+1
	b.tr0, b.tc0, b.nTR, b.nTC = tr0, tc0, nTR, nTC
	// Which tiles hold a needed cell.
	nt := nTR * nTC
	if cap(sc.tileE) < nt {
		sc.tileE = make([]float64, nt)
	}
	tileE := sc.tileE[:nt]
	for t := range tileE {
		tileE[t] = math.Inf(1) // no needed cell
	}
	for y := range b.h {
		ti := floorDiv(b.y0+y, tileSide) - tr0
		for x := range b.w {
			if b.needed(y*b.w + x) {
				tileE[ti*nTC+floorDiv(b.x0+x, tileSide)-tc0] = math.NaN()
			}
		}
	}
	// The lattice points of those tiles, transformed in one call.
	sr, scn := 4*nTR+1, 4*nTC+1
	ns := sr * scn
	if cap(sc.slotLat) < ns {
		sc.slotLat, sc.slotLon, sc.slotP = make([]float64, ns), make([]float64, ns), make([][3]float64, ns)
		sc.slotHave = make([]bool, ns)
	}
	b.slotLat, b.slotLon, b.slotP, b.slotHave = sc.slotLat[:ns], sc.slotLon[:ns], sc.slotP[:ns], sc.slotHave[:ns]
	clear(b.slotHave)
	sc.qc, sc.qr, sc.qs = sc.qc[:0], sc.qr[:0], sc.qs[:0]
	ask := func(s int) {
		if !b.slotHave[s] {
			b.slotHave[s] = true
			r, c := s/scn, s%scn
			sc.qr = append(sc.qr, (tr0+r/4)*tileSide+lerpOff[r%4])
			sc.qc = append(sc.qc, (tc0+c/4)*tileSide+lerpOff[c%4])
			sc.qs = append(sc.qs, s)
		}
	}
	for ti := range nTR {
		for tj := range nTC {
			if !math.IsNaN(tileE[ti*nTC+tj]) {
				continue
			}
			for _, a := range lerpNodeSlot {
				for _, c := range lerpNodeSlot {
					ask(b.slot(ti, tj, a, c))
				}
			}
			for _, q := range lerpChecks {
				ask(b.slot(ti, tj, q[0], q[1]))
			}
		}
	}
	if k := len(sc.qs); k > 0 {
		if cap(sc.qlon) < k {
			sc.qlon, sc.qlat = make([]float64, k), make([]float64, k)
		}
		lons, lats := sc.qlon[:k], sc.qlat[:k]
		b.f.at(sc.qc, sc.qr, lons, lats)
		for j, s := range sc.qs {
			b.slotLat[s], b.slotLon[s] = lats[j], lons[j]
			if validLonLat(lats[j], lons[j]) {
				b.slotP[s] = projECEF(lats[j], lons[j])
			} else {
				b.slotP[s] = [3]float64{math.NaN(), math.NaN(), math.NaN()}
			}
		}
	}
	// Each tile's mode, then its cells.
	capE := lerpCap * b.bins.binW
	for ti := range nTR {
		for tj := range nTC {
			t := ti*nTC + tj
			if !math.IsNaN(tileE[t]) {
				continue
			}
			var nodes [3][3][3]float64
			e := math.NaN()
			if !b.f.exactCentres {
				e = b.lerpBound(ti, tj, &nodes)
			}
			if !(e <= capE) {
				e = math.NaN()
			}
			tileE[t] = e
			if !math.IsNaN(e) {
				b.lerpCells(ti, tj, &nodes, e)
			}
		}
	}
	b.fetchExact(tileE)
}

// slot returns the lattice slot of tile (ti, tj) of the block (relative to
// tr0, tc0) at slot row a and slot column c (0 to 4, see lerpOff).
func (b *projBracketer) slot(ti, tj, a, c int) int {
	return (4*ti+a)*(4*b.nTC+1) + 4*tj + c
}

// lerpBound sets nodes to the ECEF positions of the nine nodes of tile
// (ti, tj) and returns the bound e on the distance from an interpolated
// centre to the true one (see bracketProjected), or NaN when a lattice
// point has no position or the check fails.
func (b *projBracketer) lerpBound(ti, tj int, nodes *[3][3][3]float64) float64 {
	for a, sa := range lerpNodeSlot {
		for c, scol := range lerpNodeSlot {
			s := b.slot(ti, tj, sa, scol)
			if !validLonLat(b.slotLat[s], b.slotLon[s]) {
				return math.NaN()
			}
			nodes[a][c] = b.slotP[s]
		}
	}
	// The errors of interpolation at the checks (lerpChecks).
	var errs [6][3]float64
	for k, q := range lerpChecks {
		s := b.slot(ti, tj, q[0], q[1])
		if !validLonLat(b.slotLat[s], b.slotLon[s]) {
			return math.NaN()
		}
		p := lerpAt(nodes, 4*q[0], 4*q[1])
		for j := range 3 {
			errs[k][j] = p[j] - b.slotP[s][j]
		}
	}
	norm := func(v [3]float64) float64 { return math.Sqrt(v[0]*v[0] + v[1]*v[1] + v[2]*v[2]) }
	et, eb, el, er := errs[0], errs[1], errs[2], errs[3]
	bound := lerpOmega * (max(norm(et), norm(eb)) + max(norm(el), norm(er)))
	// The errors inside as the model predicts them: at (4, 4) and, with
	// w(3/4) = -w(1/4), at (12, 12).
	var missA, missB [3]float64
	for j := range 3 {
		missA[j] = errs[4][j] - ((3*et[j]+eb[j])/4 + (3*el[j]+er[j])/4)
		missB[j] = errs[5][j] + ((et[j]+3*eb[j])/4 + (el[j]+3*er[j])/4)
	}
	if !(norm(missA) <= bound/4+1e-3 && norm(missB) <= bound/4+1e-3) {
		return math.NaN()
	}
	return lerpSafety*bound + 1e-3
}

// lerpAt returns the quadratic interpolation of nodes at row kr and column
// kc (0 to 16) of the tile, with the same operations as lerpCells.
func lerpAt(nodes *[3][3][3]float64, kr, kc int) [3]float64 {
	wv, wu := &lerpW[kr], &lerpW[kc]
	var p [3]float64
	for j := range 3 {
		c0 := wv[0]*nodes[0][0][j] + wv[1]*nodes[1][0][j] + wv[2]*nodes[2][0][j]
		c1 := wv[0]*nodes[0][1][j] + wv[1]*nodes[1][1][j] + wv[2]*nodes[2][1][j]
		c2 := wv[0]*nodes[0][2][j] + wv[1]*nodes[1][2][j] + wv[2]*nodes[2][2][j]
		p[j] = wu[0]*c0 + wu[1]*c1 + wu[2]*c2
	}
	return p
}

// lerpCells sets the interpolated positions, and err e, of the needed
// cells of the block in tile (ti, tj).
func (b *projBracketer) lerpCells(ti, tj int, nodes *[3][3][3]float64, e float64) {
	gr0, gc0 := (b.tr0+ti)*tileSide, (b.tc0+tj)*tileSide
	r0, r1 := max(gr0-b.y0, 0), min(gr0+tileSide-b.y0, b.h)
	c0, c1 := max(gc0-b.x0, 0), min(gc0+tileSide-b.x0, b.w)
	for r := r0; r < r1; r++ {
		wv := &lerpW[b.y0+r-gr0]
		var col [3][3]float64 // per node column: the row's interpolation
		for k := range 3 {
			for j := range 3 {
				col[k][j] = wv[0]*nodes[0][k][j] + wv[1]*nodes[1][k][j] + wv[2]*nodes[2][k][j]
			}
		}
		for c := c0; c < c1; c++ {
			i := r*b.w + c
			if !b.needed(i) {
				continue
			}
			wu := &lerpW[b.x0+c-gc0]
			b.ex[i] = wu[0]*col[0][0] + wu[1]*col[1][0] + wu[2]*col[2][0]
			b.ey[i] = wu[0]*col[0][1] + wu[1]*col[1][1] + wu[2]*col[2][1]
			b.ez[i] = wu[0]*col[0][2] + wu[1]*col[1][2] + wu[2]*col[2][2]
			b.err[i] = e
		}
	}
}

// fetchExact sets, from Centres, the position of the needed cells of the
// block in tiles whose centres are not interpolated (tileE NaN): per block
// row, one call per run of such tiles, from its first to its last needed
// cell.
func (b *projBracketer) fetchExact(tileE []float64) {
	for y := range b.h {
		ti := floorDiv(b.y0+y, tileSide) - b.tr0
		x := 0
		for x < b.w {
			tj := floorDiv(b.x0+x, tileSide) - b.tc0
			if !math.IsNaN(tileE[ti*b.nTC+tj]) {
				x = (b.tc0+tj+1)*tileSide - b.x0
				continue
			}
			// The run of exact tiles from x.
			z := x
			for z < b.w && math.IsNaN(tileE[ti*b.nTC+floorDiv(b.x0+z, tileSide)-b.tc0]) {
				z = min((floorDiv(b.x0+z, tileSide)+1)*tileSide-b.x0, b.w)
			}
			a, e := x, z
			for a < e && !b.needed(y*b.w+a) {
				a++
			}
			for e > a && !b.needed(y*b.w+e-1) {
				e--
			}
			if a < e {
				b.f.centres(b.y0+y, b.x0+a, b.x0+e, b.lons[y*b.w+a:y*b.w+e], b.lats[y*b.w+a:y*b.w+e])
				for c := a; c < e; c++ {
					if i := y*b.w + c; b.needed(i) && validLonLat(b.lats[i], b.lons[i]) {
						p := projECEF(b.lats[i], b.lons[i])
						b.ex[i], b.ey[i], b.ez[i] = p[0], p[1], p[2]
					}
				}
			}
			x = z
		}
	}
}

// exactLater queues block cell i, whose centre is interpolated, to be
// computed at its exact centre by flushExact: from the sites given there,
// or with a nearest-site query (nearest).
func (b *projBracketer) exactLater(i int, nearest bool) {
	b.sc.later = append(b.sc.later, projLater{i: i, nearest: nearest})
}

// flushExact transforms the centres of the queued cells (one call) and
// computes each exactly, as Distances does: from sites, which hold its
// nearest site, or with a nearest-site query; a cell with no position gets
// NaN.
func (b *projBracketer) flushExact(sites []projSite) {
	sc := b.sc
	k := len(sc.later)
	if k == 0 {
		return
	}
	sc.qc, sc.qr = sc.qc[:0], sc.qr[:0]
	for _, l := range sc.later {
		sc.qr = append(sc.qr, b.y0+l.i/b.w)
		sc.qc = append(sc.qc, b.x0+l.i%b.w)
	}
	if cap(sc.qlon) < k {
		sc.qlon, sc.qlat = make([]float64, k), make([]float64, k)
	}
	lons, lats := sc.qlon[:k], sc.qlat[:k]
	b.f.at(sc.qc, sc.qr, lons, lats)
	for j, l := range sc.later {
		i := l.i
		b.lats[i], b.lons[i], b.err[i] = lats[j], lons[j], 0
		if !validLonLat(lats[j], lons[j]) {
			b.lo[i], b.hi[i] = math.NaN(), math.NaN()
			continue
		}
		p := projECEF(lats[j], lons[j])
		b.ex[i], b.ey[i], b.ez[i] = p[0], p[1], p[2]
		var d float64
		if l.nearest {
			_, d = b.f.ix.Nearest(lats[j], lons[j], 0)
		} else {
			d = b.exact(i, sites)
		}
		b.lo[i], b.hi[i] = d, d
	}
	sc.later = sc.later[:0]
}

// centre returns the latitude and longitude of the centre of cell (r, c)
// of the block (block rows and columns; it may lie outside the block):
// those fetched for the block or of its lattice points, or else from
// Centres for that cell alone (the same numbers: see Centres).
func (b *projBracketer) centre(r, c int) (lat, lon float64) {
	if r >= 0 && r < b.h && c >= 0 && c < b.w {
		if i := r*b.w + c; !math.IsNaN(b.lats[i]) {
			return b.lats[i], b.lons[i]
		}
	}
	if s, ok := b.latticeSlot(b.y0+r, b.x0+c); ok && b.slotHave[s] {
		return b.slotLat[s], b.slotLon[s]
	}
	var lo, la [1]float64
	b.f.centres(b.y0+r, b.x0+c, b.x0+c+1, lo[:], la[:])
	return la[0], lo[0]
}

// tileCentre returns the latitude and longitude of a point near the
// centre of block cell (r, c), the centre of a chord tile: centre's, or,
// for a needed cell whose centre is interpolated and not a lattice point,
// those of its interpolated position (ecefLatLon; any point serves, the
// tile's rho being measured from it), so that split tiles ask nothing of
// Centres.
func (b *projBracketer) tileCentre(r, c int) (lat, lon float64) {
	i := r*b.w + c
	if b.err[i] > 0 {
		if s, ok := b.latticeSlot(b.y0+r, b.x0+c); !ok || !b.slotHave[s] {
			return ecefLatLon([3]float64{b.ex[i], b.ey[i], b.ez[i]})
		}
	}
	return b.centre(r, c)
}

// ecefLatLon returns the geodetic latitude and longitude (degrees) of the
// point of the ellipsoid nearest ECEF point p (m), for p near the
// ellipsoid: to well under a micrometre for p within 1 km of it (three
// fixed-point steps from the parametric guess).
func ecefLatLon(p [3]float64) (lat, lon float64) {
	const deg = 180 / math.Pi
	e2 := geodesy.Flattening * (2 - geodesy.Flattening)
	r := math.Hypot(p[0], p[1])
	phi := math.Atan2(p[2], r*(1-e2))
	for range 3 {
		s := math.Sin(phi)
		n := geodesy.SemiMajor / math.Sqrt(1-e2*s*s)
		phi = math.Atan2(p[2]+e2*n*s, r)
	}
	return phi * deg, math.Atan2(p[1], p[0]) * deg
}

// latticeSlot returns the block's lattice slot of grid cell (gr, gc), and
// false when the cell is not a lattice point of the block's tiles.
func (b *projBracketer) latticeSlot(gr, gc int) (int, bool) {
	idx := func(g, t0, nt int) (int, bool) {
		rel := g - t0*tileSide
		if rel < 0 || rel > nt*tileSide {
			return 0, false
		}
		for k, off := range lerpOff {
			if rel%tileSide == off {
				return 4*(rel/tileSide) + k, true
			}
		}
		return 0, false
	}
	a, ok1 := idx(gr, b.tr0, b.nTR)
	c, ok2 := idx(gc, b.tc0, b.nTC)
	return a*(4*b.nTC+1) + c, ok1 && ok2
}

// tile brackets the needed cells of rows [r0,r1) and columns [c0,c1) of
// the block (see bracketProjected).
func (b *projBracketer) tile(r0, r1, c0, c1 int) {
	any := false
	for r := r0; r < r1 && !any; r++ {
		for c := c0; c < c1; c++ {
			if !math.IsNaN(b.ex[r*b.w+c]) {
				any = true
				break
			}
		}
	}
	if !any {
		return
	}
	single := r1-r0 == 1 && c1-c0 == 1
	clat, clon := b.tileCentre((r0+r1)/2, (c0+c1)/2)
	if validLonLat(clat, clon) {
		pc := projECEF(clat, clon)
		// chordBracket's upper end grows with the chord: that of the
		// longest chord, plus the largest error of a cell's position,
		// bounds every cell's geodesic from c.
		d2, emax := 0.0, 0.0
		for r := r0; r < r1; r++ {
			for c := c0; c < c1; c++ {
				i := r*b.w + c
				if math.IsNaN(b.ex[i]) {
					continue
				}
				dx, dy, dz := b.ex[i]-pc[0], b.ey[i]-pc[1], b.ez[i]-pc[2]
				d2 = max(d2, dx*dx+dy*dy+dz*dz)
				emax = max(emax, b.err[i])
			}
		}
		_, rho := chordBracket(math.Sqrt(d2) + emax)
		if !math.IsInf(rho, 1) {
			ix := b.f.ix
			_, d1 := ix.NearestBounds(clat, clon, 0)
			reach := d1 + rho
			_, hc := chordBracket(min(reach, chordNarrowMax) + 2*emax)
			b.sc.cands = ix.Within(clat, clon, rho+max(reach, hc), b.sc.cands[:0])
			if k := len(b.sc.cands); single || k > 0 && k <= maxCandidates {
				b.cells(r0, r1, c0, c1, pc, rho)
				return
			}
			// Many candidates (dense training points): when few of them can
			// give a cell of the tile its shortest chord, as far from a
			// cluster, the tile need not be split.
			if sites, near := b.nearSites(pc, rho); len(near) <= maxCandidates {
				b.cellsWith(r0, r1, c0, c1, rho, sites, near)
				return
			}
		}
	}
	if single {
		// A needed cell is its own centre, with a position: not reached.
		return
	}
	quarters(r0, r1, c0, c1, b.tile)
}

// cells brackets the needed cells of the tile from the candidates in
// sc.cands; pc is the ECEF position of the tile's centre and rho bounds
// the chord from it to every needed cell.
func (b *projBracketer) cells(r0, r1, c0, c1 int, pc [3]float64, rho float64) {
	sites, near := b.nearSites(pc, rho)
	b.cellsWith(r0, r1, c0, c1, rho, sites, near)
}

// nearSites returns the candidates in sc.cands with their chords from the
// tile's centre pc, in sc.cands' order (exact, which measures from them,
// takes them in any order), and, of them, those that can give a cell
// within rho of pc its shortest chord (see below), by increasing chord
// (cellsWith's loop stops at the first too far): sorted after they are
// picked, in the order a stable sort of all the candidates gives them,
// since near dense training points only a few of hundreds are kept.
func (b *projBracketer) nearSites(pc [3]float64, rho float64) (sites, near []projSite) {
	sc := b.sc
	sites, first := sc.chordSitesAsListed(b.f, pc)
	// A site q is farther by chord than the first of shortest chord (P_0)
	// from every cell p of the tile when
	//
	//	|p - P_q|^2 - |p - P_0|^2 = cc_q^2 - cc_0^2 - 2 (p - c).(P_q - P_0) >= cc_q^2 - cc_0^2 - 2 rho |P_q - P_0| > 0
	//
	// (the difference is linear in p; |p - c| <= rho): it is never the
	// shortest chord, and is left out of the chords (with 1 m^2 and 1e-12
	// cc_q^2 for rounding), though not out of an exact cell's sites.
	near = sc.near[:0]
	if first >= 0 {
		p0, cc0 := sites[first].p, sites[first].cc
		for q, st := range sites {
			if q != first && st.cc*st.cc-cc0*cc0-2*rho*dist3(st.p, p0) > 1+1e-12*st.cc*st.cc {
				continue
			}
			near = append(near, st)
		}
		sortProjSites(near)
	}
	sc.near = near
	return sites, near
}

// cellsWith is cells with the tile's candidates by chord (sites) and
// those of them that can give a cell its shortest chord (near).
func (b *projBracketer) cellsWith(r0, r1, c0, c1 int, rho float64, sites, near []projSite) {
	sc := b.sc
	for r := r0; r < r1; r++ {
		for c := c0; c < c1; c++ {
			i := r*b.w + c
			px := b.ex[i]
			if math.IsNaN(px) {
				continue
			}
			py, pz := b.ey[i], b.ez[i]
			d2 := math.Inf(1)
			for q := range near {
				st := &near[q]
				// The chord from the cell is at least cc - rho: once that
				// exceeds the shortest chord so far (by 1 m for rounding),
				// this site and the farther ones are farther still.
				if g := st.cc - rho - 1; g > 0 && g*g > d2 {
					break
				}
				dx, dy, dz := px-st.p[0], py-st.p[1], pz-st.p[2]
				d2 = min(d2, dx*dx+dy*dy+dz*dz)
			}
			d := math.Sqrt(d2)
			lo, hi := chordBracket(d)
			if e := b.err[i]; e > 0 {
				// The true centre's shortest chord is within e of d.
				lo, _ = chordBracket(d - e)
				_, hi = chordBracket(d + e)
			}
			if b.bins.quick(lo, hi) || b.bins.settled(lo, hi) {
				b.lo[i], b.hi[i] = lo, hi
				continue
			}
			if hi-lo > exactWidth*b.bins.binW {
				// Too wide: left to the anchor of the cell's tile.
				sc.pend[i], sc.clo[i], sc.chi[i] = true, lo, hi
				continue
			}
			if b.err[i] > 0 {
				b.exactLater(i, false)
				continue
			}
			d = b.exact(i, sites)
			b.lo[i], b.hi[i] = d, d
		}
	}
	b.flushExact(sites)
}

// exact returns the distance of block cell i to its nearest site among
// sites, which hold it: the smallest geodesy.Distance from the cell's
// centre. It measures the site of the shortest chord first, then only the
// sites that can be nearer, in increasing order of their ballLower, until
// a bound exceeds the smallest distance so far. A site is left out at
// once when its chord, or b times its angle from the cell at the centre
// (compared as cosines: no inverse cosine per site), exceeds that first
// distance: on a global grid's far cells all but a few of hundreds of
// clustered sites.
func (b *projBracketer) exact(i int, sites []projSite) float64 {
	if len(sites) == 0 {
		return math.Inf(1)
	}
	pc := [3]float64{b.ex[i], b.ey[i], b.ez[i]}
	ord := b.sc.order[:0]
	first := 0
	for q := range sites {
		ord = append(ord, projOrder{d: dist3(pc, sites[q].p), q: q})
		if ord[q].d < ord[first].d {
			first = q
		}
	}
	b.sc.order = ord
	lat, lon := b.lats[i], b.lons[i]
	f := &sites[first]
	best := geodesy.Distance(lat, lon, f.lat, f.lon)
	// b theta <= best, theta the angle at the centre, holds only where
	// cos theta >= cos(best / b), less 1e-12 for the cosine's rounding.
	cosMin := -2.0
	if t := best / geodesy.SemiMinor; t < math.Pi {
		cosMin = math.Cos(t) - 1e-12
	}
	np := math.Sqrt(pc[0]*pc[0] + pc[1]*pc[1] + pc[2]*pc[2])
	keep := ord[:0]
	for k, o := range ord {
		if k == first {
			continue
		}
		if lo, _ := chordBracket(o.d); lo > best {
			continue
		}
		q := sites[o.q].p
		if (pc[0]*q[0]+pc[1]*q[1]+pc[2]*q[2])/(np*math.Sqrt(q[0]*q[0]+q[1]*q[1]+q[2]*q[2])) < cosMin {
			continue
		}
		keep = append(keep, projOrder{d: ballLower(pc, q), q: o.q})
	}
	for k := 1; k < len(keep); k++ {
		for j := k; j > 0 && keep[j].d < keep[j-1].d; j-- {
			keep[j], keep[j-1] = keep[j-1], keep[j]
		}
	}
	for _, o := range keep {
		if o.d > best {
			break
		}
		s := &sites[o.q]
		best = min(best, geodesy.Distance(lat, lon, s.lat, s.lon))
	}
	return best
}

// ballLower returns a lower bound on the geodesic distance between ECEF
// points p and q of the ellipsoid, for exact's cut: the larger of their
// chord and b theta, theta the angle between them at the centre and b the
// semi-minor axis. Every point of the ellipsoid lies outside the open ball
// of radius b round its centre, and the radial projection onto that ball's
// sphere shortens no path outside it less than to the great-circle arc, of
// length b theta. The chord alone (chordBracket's lower end) is about 11%
// short at 10,000 km, where all the sites within that band of a global
// grid's far cells (300 training points clustered within 10 degrees) were
// measured: a Mollweide grid of 50 km cells took 27 s in the null's pass,
// against 0.33 s on the latitude-longitude grid of the same cells.
// Widened by chordBracket's margin.
func ballLower(p, q [3]float64) float64 {
	d := dist3(p, q)
	cx, cy, cz := p[1]*q[2]-p[2]*q[1], p[2]*q[0]-p[0]*q[2], p[0]*q[1]-p[1]*q[0]
	arc := geodesy.SemiMinor * math.Atan2(math.Sqrt(cx*cx+cy*cy+cz*cz), p[0]*q[0]+p[1]*q[1]+p[2]*q[2])
	l := max(d, arc)
	return max(l-(1e-3+1e-9*l), 0)
}

// anchored brackets the cells of the block in global tile (tr, tc) (rows
// tr*16 to tr*16+15 and columns tc*16 to tc*16+15 of the grid) that their
// chord left too wide, from the tile's anchor, its centre cell (tr*16+8,
// tc*16+8), whatever the block: see bracketProjected; a cell whose
// bracket is then wider than exactWidth floor bins from the centre cell of
// its sub-tile of 4 x 4 cells, (tr*16 + 4i + 2, tc*16 + 4j + 2). A cell
// whose bracket is still too wide or across a bin is computed exactly.
func (b *projBracketer) anchored(tr, tc int) {
	r0, r1 := max(tr*tileSide-b.y0, 0), min((tr+1)*tileSide-b.y0, b.h)
	c0, c1 := max(tc*tileSide-b.x0, 0), min((tc+1)*tileSide-b.x0, b.w)
	if !b.anchorAt(r0, r1, c0, c1, tr*tileSide+tileSide/2, tc*tileSide+tileSide/2, false) {
		return
	}
	// The cells left too wide: from the centre cells of their sub-tiles.
	for sr := range tileSide / subTile {
		gr := tr*tileSide + sr*subTile
		y0, y1 := max(gr-b.y0, r0), min(gr+subTile-b.y0, r1)
		for scol := range tileSide / subTile {
			gc := tc*tileSide + scol*subTile
			x0, x1 := max(gc-b.x0, c0), min(gc+subTile-b.x0, c1)
			if y0 < y1 && x0 < x1 {
				b.anchorAt(y0, y1, x0, x1, gr+subTile/2, gc+subTile/2, true)
			}
		}
	}
}

// subTile is the side, in cells, of the sub-tiles (4 x 4 to a tile) whose
// centre cells anchor the cells that a tile's anchor leaves with a
// bracket wider than exactWidth floor bins: our choice. Their geodesics
// from the anchor are about a quarter of the tile's, their Taylor
// brackets about a sixteenth as wide; on coarse world maps (cells of 10 km
// and more, tiles of 160 km) most cells near the training points were
// computed exactly without them.
const subTile = 4

// anchorAt brackets the pending cells of block rows [r0, r1) and columns
// [c0, c1) from the anchor at global cell (ar, ac), whatever the block
// (see bracketProjected). A cell whose bracket is still too wide or
// across a bin is computed exactly when final is true; otherwise one
// whose bracket is wider than exactWidth floor bins stays pending, and
// anchorAt reports whether any did.
func (b *projBracketer) anchorAt(r0, r1, c0, c1, ar, ac int, final bool) bool {
	sc := b.sc
	any := false
	for r := r0; r < r1 && !any; r++ {
		for c := c0; c < c1; c++ {
			if sc.pend[r*b.w+c] {
				any = true
				break
			}
		}
	}
	if !any {
		return false
	}
	alat, alon := b.centre(ar-b.y0, ac-b.x0)
	if !validLonLat(alat, alon) {
		b.anchorSites(r0, r1, c0, c1, math.NaN(), 0, [3]float64{}, 0, 0)
		return false
	}
	pa := projECEF(alat, alon)
	// The largest upper bound on a pending cell's geodesic from the anchor.
	// (Cells beyond maxChord, with no upper end, are computed exactly.)
	dmax, epmax := 0.0, 0.0
	for r := r0; r < r1; r++ {
		for c := c0; c < c1; c++ {
			i := r*b.w + c
			if !sc.pend[i] {
				continue
			}
			dx, dy, dz := b.ex[i]-pa[0], b.ey[i]-pa[1], b.ez[i]-pa[2]
			if d := math.Sqrt(dx*dx+dy*dy+dz*dz) + b.err[i]; d <= maxChord {
				dmax, epmax = max(dmax, d), max(epmax, b.err[i])
			}
		}
	}
	_, tmax := chordBracket(dmax)
	b.anchorSites(r0, r1, c0, c1, alat, alon, pa, tmax, epmax)
	return b.taylorCells(r0, r1, c0, c1, alat, alon, pa, final)
}

// anchorSites measures at the anchor (alat, alon) (ECEF pa) every site
// that can be nearest to a pending cell within tmax of it or give it the
// smallest bracket, into sc.anchor (by distance) and sc.asites, but those
// prunable shows to matter to none (epmax bounds the error of the pending
// cells' interpolated positions); with no anchor (alat NaN) it computes
// the pending cells exactly instead.
func (b *projBracketer) anchorSites(r0, r1, c0, c1 int, alat, alon float64, pa [3]float64, tmax, epmax float64) {
	sc := b.sc
	ix := b.f.ix
	if math.IsNaN(alat) {
		for r := r0; r < r1; r++ {
			for c := c0; c < c1; c++ {
				if i := r*b.w + c; sc.pend[i] {
					sc.pend[i] = false
					if b.err[i] > 0 {
						b.exactLater(i, true)
						continue
					}
					_, d := ix.Nearest(b.lats[i], b.lons[i], 0)
					b.lo[i], b.hi[i] = d, d
				}
			}
		}
		b.flushExact(nil)
		return
	}
	_, d1 := ix.NearestBounds(alat, alon, 0)
	slack := 2*tmax + 2*(1e-3+1e-9*d1) + 1
	sc.cands = ix.Within(alat, alon, d1+slack, sc.cands[:0])
	// Pruned first, then sorted: only the sites kept are sorted by chord,
	// in the order a sort of all of them gives them (a stable sort keeps
	// sc.cands' order among equal chords), so the loop below measures the
	// same sites; sorting them all, hundreds near dense training points,
	// was a third of the null's pass on a world map.
	sites, first := sc.chordSitesAsListed(b.f, pa)
	if skip := b.prunable(sites, first, alat, alon, tmax, epmax); skip != nil {
		kept := sites[:0]
		for q, st := range sites {
			if !skip[q] {
				kept = append(kept, st)
			}
		}
		sites = kept
	}
	sortProjSites(sites)
	best := math.Inf(1)
	an := sc.anchor[:0]
	for _, st := range sites {
		if l, _ := chordBracket(st.cc); l > best+slack {
			break // this site and the later ones are farther still
		}
		f0, az, _ := geodesy.Inverse(alat, alon, st.lat, st.lon)
		sz, cz := math.Sincos(az * math.Pi / 180)
		an = append(an, projAnchor{f0: f0, sz: sz, cz: cz, site: st})
		best = min(best, f0)
	}
	keep := an[:0]
	for _, m := range an {
		if m.f0 <= best+slack {
			keep = append(keep, m)
		}
	}
	an = keep
	for i := 1; i < len(an); i++ {
		for j := i; j > 0 && an[j].f0 < an[j-1].f0; j-- {
			an[j], an[j-1] = an[j-1], an[j]
		}
	}
	for q := range an {
		// Whether a cell takes the far form depends on its th alone (<=
		// tmax), not on which cells are pending.
		if m := &an[q]; m.f0+tmax >= maxTaylorDist {
			m.cx = farCot(m.f0)
		} else {
			m.cx = math.NaN()
		}
	}
	sc.anchor = an
	sc.asites = sc.asites[:0]
	for _, m := range an {
		sc.asites = append(sc.asites, m.site)
	}
}

// prunable reports, for an anchor (alat, alon) with many candidate sites
// (dense training points; nil with at most maxCandidates), which of them,
// by their order in sites (any order; first is the position of the first
// site of shortest chord, s0 below), cannot change either end of any
// pending cell's bracket nor be its nearest site, so that anchorSites
// need not measure them: the brackets and exact
// distances are then the same, bit for bit, as with every site measured.
// tmax bounds the cells' th (their geodesic from the anchor) and their
// chord, epmax the error of their interpolated positions.
//
// Each candidate's distance f_k(a) from the anchor is bracketed without a
// geodesic of its own, from the chord-nearest site s0 measured there, as
// in farPrune: [lo_k, hi_k]. With j the candidate of smallest hi_j, at a
// cell p (th <= T = tmax) where both sites take a Taylor bracket (near or
// far form: f > 2 th and f + th <= maxFarDist), k's lower end is at least
// f_k(a) + tc_k - e1 - |A| th^2/2 - m (A >= farHessian's A at f0 = r2,
// the largest upper end below, and t = T: A falls as f0 and t grow; the
// near form's is >= 0) and j's upper end at most
// f_j(a) + tc_j + e1 + th^2/(2 (f_j(a) - th)) + m, with m the margin
// and e1 <= kappa^2 T^3/6 + 1e-6 + epmax (see bracketProjected). tc_k -
// tc_j = -<w, v_k - v_j>, |w| <= T the offset in the anchor's tangent
// plane, and |v_k - v_j| = 2 sin(theta/2) <= D/(b smin) for the angle
// theta the two sites make at the anchor (Rauch's comparison, see
// farPrune; D = s(s0, j) + s(s0, k), smin the smallest sine of r/b over
// the brackets). So k's lower end lies above j's upper end, and above the
// cell's (the minimum), at every such cell when
//
//	lo_k - hi_j > T D/(b smin) + 2 e1 + (|A(r2, T)| + 1/(lo_j - T)) T^2/2 + 2 m + 1 mm:
//
// k then changes neither end of any bracket (the minima over the sites)
// and, its distance above the cell's upper end, is never a cell's nearest
// site. The anchor's own nearest site is never left out (f_k(a) > f_j(a)),
// so the sites anchorSites keeps (within its slack of it) are the same
// less those left out.
func (b *projBracketer) prunable(sites []projSite, first int, alat, alon, tmax, epmax float64) []bool {
	if len(sites) <= maxCandidates || !(tmax > 0 && tmax <= geodesy.SemiMinor) || b.f.measureAll {
		return nil
	}
	sc := b.sc
	ix := b.f.ix
	s0 := &sites[first]
	f0, _, az2 := geodesy.Inverse(alat, alon, s0.lat, s0.lon)
	ks := sc.siteKs[:0]
	for q := range sites {
		ks = append(ks, sites[q].k)
	}
	sc.siteKs = ks
	lo, hi, fan, j, ok := siteBrackets(ix, &sc.fans, s0.k, f0, az2, ks, sc.pruneLo[:0], sc.pruneHi[:0])
	if !ok {
		return nil
	}
	sc.pruneLo, sc.pruneHi = lo, hi
	r1, r2 := slices.Min(lo), slices.Max(hi)
	if !(r1 > 2*tmax && r2+tmax <= maxFarDist) {
		return nil // a site without a Taylor bracket at some cell
	}
	smin := min(math.Sin(r1*sqrtKmax), math.Sin(r2*sqrtKmax)) * (1 - 1e-12)
	e1 := chordKappa*chordKappa/6*tmax*tmax*tmax + 1e-6 + epmax
	m := 1e-3 + 1e-9*maxFarDist
	aMin, _, _ := farHessian(farCot(r2), r2, tmax)
	slack := 2*e1 + (-aMin+1/(lo[j]-tmax))*tmax*tmax/2 + 2*m + 1e-3
	tg := tmax * sqrtKmax / smin
	dj := fan.at(sites[j].k).d
	skip := sc.skip[:0]
	for q := range sites {
		skip = append(skip, q != j && lo[q]-hi[j]-tg*(dj+fan.at(sites[q].k).d)-slack > 0)
	}
	sc.skip = skip
	return skip
}

// taylorCells brackets each pending cell of the tile from the sites
// measured at the anchor (alat, alon), ECEF pa (see bracketProjected),
// keeps the intersection with its chord bracket when it is narrow and
// inside one bin, and computes the cell exactly otherwise.
func (b *projBracketer) taylorCells(r0, r1, c0, c1 int, alat, alon float64, pa [3]float64, final bool) (left bool) {
	sc := b.sc
	const rad = math.Pi / 180
	sp, cp := math.Sincos(alat * rad)
	sl, cl := math.Sincos(alon * rad)
	east := [3]float64{-sl, cl, 0}
	north := [3]float64{-sp * cl, -sp * sl, cp}
	k2 := chordKappa * chordKappa / 6
	for r := r0; r < r1; r++ {
		for c := c0; c < c1; c++ {
			i := r*b.w + c
			if !sc.pend[i] {
				continue
			}
			sc.pend[i] = false
			dx, dy, dz := b.ex[i]-pa[0], b.ey[i]-pa[1], b.ez[i]-pa[2]
			dc := math.Sqrt(dx*dx + dy*dy + dz*dz)
			tl, th := chordBracket(dc)
			ep := b.err[i]
			if ep > 0 {
				// The true centre's chord is within ep of dc.
				tl, _ = chordBracket(dc - ep)
				_, th = chordBracket(dc + ep)
			}
			if math.IsInf(th, 1) {
				// Beyond maxChord from the anchor (huge cells): not within
				// T of it, so the anchor's sites need not hold its nearest.
				if ep > 0 {
					b.exactLater(i, true)
					continue
				}
				_, d := b.f.ix.Nearest(b.lats[i], b.lons[i], 0)
				b.lo[i], b.hi[i] = d, d
				continue
			}
			wn := dx*north[0] + dy*north[1] + dz*north[2]
			we := dx*east[0] + dy*east[1] + dz*east[2]
			// tc below is within ep of the true centre's (a projection on
			// a unit vector).
			e1 := k2*th*th*th + 1e-6 + ep
			lo, hi := math.Inf(1), math.Inf(1)
			for q := range sc.anchor {
				m := &sc.anchor[q]
				margin := 1e-3 + 1e-9*m.f0
				if m.f0-th-margin > hi {
					break // this site and the farther ones change neither end
				}
				tc := -(m.cz*wn + m.sz*we)
				if m.f0+tc-e1-margin > hi && m.f0 > 2*th && m.f0+th < maxTaylorDist {
					// Both ends of this site's bracket lie above hi (the
					// Taylor lower end is at least f0 + t f'(0)).
					continue
				}
				l1, h1 := projTaylor(m, tl, th, tc, e1, margin)
				lo, hi = min(lo, l1), min(hi, h1)
			}
			lo, hi = max(lo, sc.clo[i]), min(hi, sc.chi[i])
			if b.bins.quick(lo, hi) || b.bins.settled(lo, hi) {
				b.lo[i], b.hi[i] = lo, hi
				continue
			}
			if !final && hi-lo > exactWidth*b.bins.binW {
				sc.pend[i], left = true, true
				continue
			}
			if ep > 0 {
				b.exactLater(i, false)
				continue
			}
			d := b.exact(i, sc.asites)
			b.lo[i], b.hi[i] = d, d
		}
	}
	b.flushExact(sc.asites)
	return left
}

// projTaylor returns bounds on the distance to site m from a cell at
// geodesic length t in [tl, th] from the anchor, where tc = <w, -v> for
// w the projection of the cell's ECEF offset onto the anchor's tangent
// plane and v the unit vector towards the site (so |tc - t f'(0)| <= e1,
// see bracketProjected), widened by margin.
func projTaylor(m *projAnchor, tl, th, tc, e1, margin float64) (lo, hi float64) {
	lo, hi = max(0, m.f0-th-margin), m.f0+th+margin
	if !(m.f0 > 2*th && m.f0+th < maxTaylorDist) {
		if m.f0 > 2*th && m.f0+th <= maxFarDist {
			// The far form (see farHessian): t f'(0) in [tc - e1, tc +
			// e1], f'' in [A, B] with A <= 0 <= B, t <= th.
			if a, b, ok := farHessian(m.cx, m.f0, th); ok {
				// f'' = h (1 - f'^2): both bounds times the largest 1 -
				// f'^2 over the range f' can take, [cl + th A q, ch + th B
				// q] (f'(0) in [cl, ch]), q first 1, then twice from the
				// previous q.
				cl, ch := -1.0, 1.0
				if tl > 0 {
					a1, a2 := tc-e1, tc+e1
					cl = max(-1, min(a1/tl, a1/th))
					ch = min(1, max(a2/tl, a2/th))
				}
				q := 1.0
				for range 2 {
					q = 1 - minSq(max(-1, cl+th*a*q), min(1, ch+th*b*q))
				}
				half := th * th / 2
				lo = max(lo, m.f0+(tc-e1)+a*q*half-margin)
				hi = min(hi, m.f0+(tc+e1)+b*q*half+margin)
			}
		}
		return lo, hi
	}
	a1, a2 := tc-e1, tc+e1
	// f'(0) = t f'(0) / t in [cl, ch].
	cl, ch := -1.0, 1.0
	if tl > 0 {
		cl = max(-1, min(a1/tl, a1/th))
		ch = min(1, max(a2/tl, a2/th))
	}
	h2 := 1 / (m.f0 - th)
	h1 := hLoFast(m.f0 + th)
	// f' runs over [cl, ch + t B] (f'' in [A, B], A >= 0): 1 - f'^2 over
	// that range bounds f''/h; B first from q2 <= 1, then once more.
	b := h2
	for range 2 {
		b = h2 * (1 - minSq(cl, min(1, ch+th*b)))
	}
	x2 := min(1, ch+th*b)
	q1 := max(0, 1-max(cl*cl, x2*x2))
	if l := m.f0 + a1 + h1*q1*tl*tl/2 - margin; l > lo {
		lo = l
	}
	if h := m.f0 + a2 + b*th*th/2 + margin; h < hi {
		hi = h
	}
	return lo, hi
}

// minSq returns the smallest x^2 for x in [x1, x2].
func minSq(x1, x2 float64) float64 {
	if x1 <= 0 && x2 >= 0 {
		return 0
	}
	return min(x1*x1, x2*x2)
}

// projECEF returns the ECEF position (m) of geodetic (lat, lon) in
// degrees, as geodesy.ECEF does, with the parametric latitude's norm taken by a
// square root rather than math.Hypot (its terms lie in [-1, 1]).
func projECEF(lat, lon float64) [3]float64 {
	const rad = math.Pi / 180
	sp, cp := math.Sincos(lat * rad)
	sp *= 1 - geodesy.Flattening
	r := 1 / math.Sqrt(sp*sp+cp*cp)
	sl, cl := math.Sincos(lon * rad)
	ar := geodesy.SemiMajor * cp * r
	return [3]float64{ar * cl, ar * sl, geodesy.SemiMinor * sp * r}
}
