package nullmodel

import (
	"math"
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
}

// projScratch holds one projected Bracket call's buffers.
type projScratch struct {
	lons, lats []float64
	ex, ey, ez []float64 // ECEF of the needed cells with a position (ex NaN: not bracketed)
	cands      []int
	sites      []projSite // the tile's candidates by chord from its centre
	near       []projSite // those that can give a cell its shortest chord
	order      []projOrder
}

// projOrder is a candidate site of a cell computed exactly, with its
// chord from the cell.
type projOrder struct {
	d float64
	q int
}

var projPool = sync.Pool{New: func() any { return new(projScratch) }}

// projBracketer is the state of one Bracket call on a Field made by New.
type projBracketer struct {
	f          *Field
	w          int
	lons, lats []float64
	ex, ey, ez []float64
	lo, hi     []float64
	sc         *projScratch
	bins       bracketer // only its bins: sameBins
}

// validLonLat reports whether Index.Nearest measures a point at (lat,
// lon): it gives NaN for a latitude outside [-90, 90] or a non-finite
// longitude.
func validLonLat(lat, lon float64) bool {
	return math.Abs(lat) <= 90 && !math.IsInf(lon, 0) && !math.IsNaN(lon)
}

// bracketProjected is Bracket on a Field made by New: the cell centres
// come from its Centres (any grid), each cell is bracketed from its
// shortest ECEF chord to a training site, and computed exactly where that
// bracket is too wide or crosses a bin.
//
// The bracket of cell p is chordBracket(D*), D* = min_k |P_p - P_k| over
// every site k (P the ECEF positions, ecef); it is kept when hi - lo <= 2
// BracketTol lo and -hi, -lo share their bins (sameBins), otherwise p gets
// the exact distance, Index.Nearest's value bit for bit: the smallest
// geodesy.Distance(lat_p, lon_p, site) (Nearest's argument order) over the
// candidates below, taken in increasing order of chord until the chord's
// lower bound (chordBracket) exceeds the smallest distance so far (such a
// site and the later ones are farther).
//
// Candidates, as in Distances: the block is walked in tiles of 16 x 16
// cells, split in four while a tile has no usable centre or more than
// maxCandidates candidates, down to single cells (any number). For a tile
// with centre c, rho the largest chordBracket upper end of the chords from
// c to the tile's needed cells (so rho >= s(c, p), the geodesic, for each
// of them; Schur's bound, see Bracket) and d1 >= s(c, s_1) the upper end
// of Index.NearestBounds at c (no geodesic), the sites the index lists
// within
//
//	R = rho + max(d1 + rho, H),  H = chordBracket(min(d1 + rho, chordNarrowMax)) upper end,
//
// of c (Index.Within) hold, for every needed cell p of the tile:
//
//   - its geodesic nearest site s*: s(c, s*) <= s(c, p) + s(p, s_1) <=
//     2 rho + d1 (triangle inequality, as in Distances), so the exact value
//     is Nearest's;
//   - when D* <= chordNarrowMax, a site q* with the shortest chord D*:
//     D* <= |P_p - P_s*| <= s(p, s*) <= s(p, s_1) <= rho + d1 (a chord is
//     never longer than the geodesic), and chordBracket's upper end grows
//     with the chord, so s(p, q*) <= H and s(c, q*) <= rho + H.
//
// So the shortest chord over the candidates is D* itself (the minimum of
// the same numbers, bit for bit) whenever D* <= chordNarrowMax, and above
// it both D* and the candidates' minimum give a bracket that is not
// narrow (see chordNarrowMax): the cell is computed exactly. A cell's
// bracket therefore depends on its own centre and the sites alone, not on
// the block or the tile it is computed in. The chords from a cell are
// taken in increasing order of the site's chord cc from c, stopping once
// cc - rho (a lower bound on the cell's chord, |P_p - P_c| <= rho) exceeds
// the shortest so far by 1 m; sites that cannot give any cell of the tile
// its shortest chord are left out first, as in the latitude-longitude
// path's chords.
//
// On BenchmarkNullVsRaster's study on an EPSG:3035 grid (6000 x 4000 km,
// 4 and 27 million cells) the chord brackets settle the cells within about
// 700 km of a training point; the cells farther out cost one geodesic or a
// few each (see README, Performance).
func (f *Field) bracketProjected(x0, y0, w, h int, need []uint64, bins Binner, lo, hi []float64) {
	n := w * h
	sc := projPool.Get().(*projScratch)
	defer projPool.Put(sc)
	if cap(sc.lons) < n {
		sc.lons, sc.lats = make([]float64, n), make([]float64, n)
		sc.ex, sc.ey, sc.ez = make([]float64, n), make([]float64, n), make([]float64, n)
	}
	lons, lats := sc.lons[:n], sc.lats[:n]
	for y := range h {
		f.centres(y0+y, x0, x0+w, lons[y*w:(y+1)*w], lats[y*w:(y+1)*w])
	}
	ex, ey, ez := sc.ex[:n], sc.ey[:n], sc.ez[:n]
	for i := range n {
		lo[i], hi[i] = math.NaN(), math.NaN()
		ex[i] = math.NaN()
		if (need == nil || need[i] != 0) && validLonLat(lats[i], lons[i]) {
			p := ecef(lats[i], lons[i])
			ex[i], ey[i], ez[i] = p[0], p[1], p[2]
		}
	}
	b := projBracketer{f: f, w: w, lons: lons, lats: lats, ex: ex, ey: ey, ez: ez, lo: lo, hi: hi, sc: sc,
		bins: bracketer{bins: bins, cellLo: math.NaN(), cellHi: math.NaN(), scale: bins.FloorScale(), binW: 1 / bins.FloorScale()}}
	for r0 := 0; r0 < h; r0 += tileSide {
		for c0 := 0; c0 < w; c0 += tileSide {
			b.tile(r0, min(r0+tileSide, h), c0, min(c0+tileSide, w))
		}
	}
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
	ci := (r0+r1)/2*b.w + (c0+c1)/2
	clat, clon := b.lats[ci], b.lons[ci]
	if validLonLat(clat, clon) {
		pc := ecef(clat, clon)
		rho := 0.0
		for r := r0; r < r1; r++ {
			for c := c0; c < c1; c++ {
				i := r*b.w + c
				if math.IsNaN(b.ex[i]) {
					continue
				}
				dx, dy, dz := b.ex[i]-pc[0], b.ey[i]-pc[1], b.ez[i]-pc[2]
				_, hs := chordBracket(math.Sqrt(dx*dx + dy*dy + dz*dz))
				rho = math.Max(rho, hs)
			}
		}
		if !math.IsInf(rho, 1) {
			ix := b.f.ix
			_, d1 := ix.NearestBounds(clat, clon, 0)
			reach := d1 + rho
			_, hc := chordBracket(math.Min(reach, chordNarrowMax))
			b.sc.cands = ix.Within(clat, clon, rho+math.Max(reach, hc), b.sc.cands[:0])
			if k := len(b.sc.cands); single || k > 0 && k <= maxCandidates {
				b.cells(r0, r1, c0, c1, pc, rho)
				return
			}
		}
	}
	if single {
		// A needed cell is its own centre, with a position: not reached.
		return
	}
	rm, cm := (r0+r1+1)/2, (c0+c1+1)/2
	if rm == r1 {
		rm = r0
	}
	if cm == c1 {
		cm = c0
	}
	for _, q := range [4][4]int{{r0, rm, c0, cm}, {r0, rm, cm, c1}, {rm, r1, c0, cm}, {rm, r1, cm, c1}} {
		if q[0] < q[1] && q[2] < q[3] {
			b.tile(q[0], q[1], q[2], q[3])
		}
	}
}

// cells brackets the needed cells of the tile from the candidates in
// sc.cands; pc is the ECEF position of the tile's centre and rho bounds
// the chord from it to every needed cell.
func (b *projBracketer) cells(r0, r1, c0, c1 int, pc [3]float64, rho float64) {
	sc := b.sc
	sc.sites = sc.sites[:0]
	for _, k := range sc.cands {
		lat, lon := b.f.ix.Site(k)
		p := ecef(lat, lon)
		sc.sites = append(sc.sites, projSite{p: p, cc: dist3(pc, p), lat: lat, lon: lon})
	}
	sites := sc.sites
	for i := 1; i < len(sites); i++ {
		for j := i; j > 0 && sites[j].cc < sites[j-1].cc; j-- {
			sites[j], sites[j-1] = sites[j-1], sites[j]
		}
	}
	// A site q is farther by chord than the first (P_0) from every cell p
	// of the tile when
	//
	//	|p - P_q|^2 - |p - P_0|^2 = cc_q^2 - cc_0^2 - 2 (p - c).(P_q - P_0) >= cc_q^2 - cc_0^2 - 2 rho |P_q - P_0| > 0
	//
	// (the difference is linear in p; |p - c| <= rho): it is never the
	// shortest chord, and is left out of the chords (with 1 m^2 and 1e-12
	// cc_q^2 for rounding), though not out of an exact cell's sites.
	near := append(sc.near[:0], sites...)
	if len(near) > 1 {
		p0, cc0 := near[0].p, near[0].cc
		keep := near[:1]
		for _, st := range near[1:] {
			if st.cc*st.cc-cc0*cc0-2*rho*dist3(st.p, p0) > 1+1e-12*st.cc*st.cc {
				continue
			}
			keep = append(keep, st)
		}
		near = keep
	}
	sc.near = near
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
			lo, hi := chordBracket(math.Sqrt(d2))
			if hi-lo <= 2*BracketTol*lo && b.bins.sameBins(lo, hi) {
				b.lo[i], b.hi[i] = lo, hi
				continue
			}
			d := b.exact(i, sites)
			b.lo[i], b.hi[i] = d, d
		}
	}
}

// exact returns the distance of block cell i to its nearest site among
// sites, which hold it: the smallest geodesy.Distance from the cell's
// centre, measuring the sites in increasing order of chord until a
// chord's lower bound exceeds the smallest distance so far.
func (b *projBracketer) exact(i int, sites []projSite) float64 {
	px, py, pz := b.ex[i], b.ey[i], b.ez[i]
	ord := b.sc.order[:0]
	for q := range sites {
		dx, dy, dz := px-sites[q].p[0], py-sites[q].p[1], pz-sites[q].p[2]
		ord = append(ord, projOrder{d: math.Sqrt(dx*dx + dy*dy + dz*dz), q: q})
	}
	for k := 1; k < len(ord); k++ {
		for j := k; j > 0 && ord[j].d < ord[j-1].d; j-- {
			ord[j], ord[j-1] = ord[j-1], ord[j]
		}
	}
	b.sc.order = ord
	lat, lon := b.lats[i], b.lons[i]
	best := math.Inf(1)
	for _, o := range ord {
		if l, _ := chordBracket(o.d); l > best {
			break
		}
		s := &sites[o.q]
		best = math.Min(best, geodesy.Distance(lat, lon, s.lat, s.lon))
	}
	return best
}
