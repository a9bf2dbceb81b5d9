package nullmodel

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sync/atomic"
	"testing"

	"areasweep/extent/geodesy"
)

// sphereR is the radius (m) of the spherical projections of the tests.
const sphereR = 6371000.0

// laeaGrid returns Centres for a grid of square cells of side cell metres
// with top-left corner (x0, y0) in a spherical Lambert azimuthal
// equal-area projection centred at (lat1, lon0) (Snyder, Map projections:
// a working manual, USGS PP 1395, 1987, eqs. 20-14, 20-15, 24-16, 24-17;
// the inverse): a cell farther than 2R from the centre has no position
// (NaN).
func laeaGrid(x0, y0, cell, lat1, lon0 float64) Centres {
	return laeaMap(x0, y0, cell, lat1, lon0, nil)
}

// laeaMap is laeaGrid with the grid's x moved by fx (nil: not moved)
// before the projection's inverse.
func laeaMap(x0, y0, cell, lat1, lon0 float64, fx func(float64) float64) Centres {
	const rad = math.Pi / 180
	s1, c1 := math.Sincos(lat1 * rad)
	return func(row, ca, cb int, lons, lats []float64) {
		y := y0 - (float64(row)+0.5)*cell
		for c := ca; c < cb; c++ {
			x := x0 + (float64(c)+0.5)*cell
			if fx != nil {
				x = fx(x)
			}
			rho := math.Hypot(x, y)
			if rho == 0 {
				lons[c-ca], lats[c-ca] = lon0, lat1
				continue
			}
			cc := 2 * math.Asin(rho/(2*sphereR)) // NaN beyond 2R
			sc, ccos := math.Sincos(cc)
			lats[c-ca] = math.Asin(ccos*s1+y*sc*c1/rho) / rad
			lons[c-ca] = lon0 + math.Atan2(x*sc, rho*c1*ccos-y*s1*sc)/rad
		}
	}
}

// polarGrid returns Centres for a grid of square cells of side cell metres
// with top-left corner (x0, y0) in a spherical north polar stereographic
// projection with central meridian lon0 (Snyder 1987, eqs. 21-5 to 21-7,
// 20-14 and 20-16).
func polarGrid(x0, y0, cell, lon0 float64) Centres {
	return func(row, ca, cb int, lons, lats []float64) {
		y := y0 - (float64(row)+0.5)*cell
		for c := ca; c < cb; c++ {
			x := x0 + (float64(c)+0.5)*cell
			rho := math.Hypot(x, y)
			lats[c-ca] = 90 - 2*math.Atan(rho/(2*sphereR))*180/math.Pi
			lons[c-ca] = lon0 + math.Atan2(x, -y)*180/math.Pi
		}
	}
}

// TestBracketProjected checks Bracket on Fields made by New (the projected
// path) against Distances and Index.Nearest on grids whose tiles are not
// latitude-longitude rectangles: Lambert azimuthal equal-area with 2 km and
// 50 km cells, one across the antimeridian, one whose corner lies beyond
// the projection's domain (cells with no position), one whose domain ends
// inside it (a half-plane), one with a kink in a tile, and polar
// stereographic grids around the pole, with 2 km, 25 km and 1000 km cells
// (tiles wider than maxChord). Every bracket holds the exact distance,
// shares its bins at both ends and is within 2 BracketTol; a degenerate
// bracket equals Nearest at the cell centre bit for bit; cells with no
// position and cells not needed are NaN; and the brackets are the same
// however the grid is cut into blocks (so however it is cut into tiles),
// with and without a need mask. Most cells near the sites must be
// bracketed (not exact), or the path is not tested; and on the grids of 2
// km cells most centres must be interpolated (Centres asked for at most
// maxAsked of the cells, in blocks of 240), or interpolation is not
// tested. minBracketed and maxAsked are our own cut-offs, set with room
// from the design's about 8 lattice points in 256 cells so that they fail
// when the cells are computed exactly or their centres come from PROJ.
// The same holds with every centre from Centres (exactCentres).
func TestBracketProjected(t *testing.T) {
	cases := []struct {
		name           string
		cen            Centres
		w, h           int
		sw, ss, se, sn float64 // box of the sites
		sites          int
		minBracketed   float64 // share of cells
		maxAsked       float64 // share of cells
	}{
		{"laea-2km", laeaGrid(-150e3, 160e3, 2000, 52, 10), 150, 160, 8, 51, 12, 53, 30, 0.9, 0.1},
		{"laea-50km", laeaGrid(-3000e3, 2200e3, 50000, 52, 10), 120, 90, 0, 45, 20, 58, 40, 0.1, 2},
		{"laea-edge", laeaGrid(11.5e6, 3.0e6, 40000, 52, 10), 80, 150, 150, -70, 175, -40, 10, 0, 2},
		{"laea-antimeridian-2km", laeaGrid(-150e3, 160e3, 2000, 60, 180), 150, 160, 177, 59, 183, 61, 30, 0.9, 0.1},
		// A domain that ends at x = 61 km (cells beyond it have no
		// position), inside a tile: that tile column takes its centres
		// from Centres.
		{"laea-halfplane-2km", halfPlane(laeaGrid(-150e3, 160e3, 2000, 52, 10), -150e3, 2000, 61e3), 150, 160, 8, 51, 12, 53, 30, 0.6, 0.5},
		// A kink 7 cm per km steeper beyond x = 25 km (column 87.5), in
		// the second half of a tile: the checks must send that tile
		// column to Centres, or the bound would be too small.
		{"laea-kink-2km", kinked(-150e3, 160e3, 2000, 52, 10, 25e3, 7e-5), 150, 160, 8, 51, 12, 53, 30, 0.9, 0.25},
		{"polar-2km", polarGrid(-160e3, 150e3, 2000, -45), 150, 160, -180, 87, 180, 89.5, 30, 0.9, 0.1},
		// Dense sites: tiles split down to single cells, whose centres
		// (the chord tiles') come from the interpolated positions.
		{"laea-dense-2km", laeaGrid(-150e3, 160e3, 2000, 52, 10), 150, 160, 9, 51.5, 11, 52.5, 3000, 0.5, 0.1},
		{"polar-25km", polarGrid(-2.0e6, 2.0e6, 25000, -45), 160, 160, -180, 78, 180, 88, 15, 0.3, 2},
		// Grids far from their sites (about 7,000 and 17,000 km): the far
		// form of the Taylor bracket (farHessian).
		{"laea-far-asia-2km", laeaGrid(-150e3, 160e3, 2000, 20, 100), 150, 160, 8, 44, 12, 46, 10, 0.8, 0.1},
		{"laea-far-pacific-2km", laeaGrid(-150e3, 160e3, 2000, -20, -170), 150, 160, 8, 44, 12, 46, 10, 0.8, 0.2},
		// Cells of 1000 km on a map of nearly the whole sphere: tiles
		// wider than maxChord.
		{"polar-1000km", polarGrid(-12e6, 12e6, 1000e3, 0), 24, 24, -180, -60, 180, 80, 20, 0, 2},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			lats, lons := clusteredSites(tc.sites, tc.sw, tc.ss, tc.se, tc.sn, 13)
			ix, err := geodesy.NewIndex(lats, lons)
			if err != nil {
				t.Fatal(err)
			}
			var asked atomic.Int64
			cen := func(row, c0, c1 int, lons, lats []float64) {
				asked.Add(int64(c1 - c0))
				tc.cen(row, c0, c1, lons, lats)
			}
			for _, exactCentres := range []bool{false, true} {
				f := New(ix, cen)
				f.exactCentres = exactCentres
				t.Run(fmt.Sprintf("exactCentres=%v", exactCentres), func(t *testing.T) { bracketProjectedCase(t, f, tc.cen, tc.w, tc.h, tc.name, tc.minBracketed) })
				if !exactCentres {
					n := tc.w * tc.h
					lo, hi := make([]float64, 240*240), make([]float64, 240*240)
					want := make([]float64, n)
					f.Distances(0, 0, tc.w, tc.h, nil, want)
					layout := testLayout(t, want, f.FarthestBound(tc.w, tc.h, 16))
					asked.Store(0)
					bracketBlocks(f, tc.w, tc.h, layout, lo, hi)
					t.Logf("Centres asked for %d of %d cells", asked.Load(), n)
					if got := float64(asked.Load()) / float64(n); got > tc.maxAsked {
						t.Errorf("Centres asked for %.1f%% of the cells, want at most %.0f%%", 100*got, 100*tc.maxAsked)
					}
				}
			}
		})
	}
}

// halfPlane returns cen with no position (NaN) for the cells whose centre
// lies beyond x = xmax, on a grid whose columns start at x0 with cells of
// side cell.
func halfPlane(cen Centres, x0, cell, xmax float64) Centres {
	return func(row, ca, cb int, lons, lats []float64) {
		cen(row, ca, cb, lons, lats)
		for c := ca; c < cb; c++ {
			if x0+(float64(c)+0.5)*cell > xmax {
				lons[c-ca], lats[c-ca] = math.NaN(), math.NaN()
			}
		}
	}
}

// kinked returns laeaGrid(x0, y0, cell, lat1, lon0) with every x beyond
// xk moved by s (x - xk): a map whose derivative jumps at xk.
func kinked(x0, y0, cell, lat1, lon0, xk, s float64) Centres {
	return laeaMap(x0, y0, cell, lat1, lon0, func(x float64) float64 {
		if x > xk {
			x += s * (x - xk)
		}
		return x
	})
}

// bracketProjectedCase runs TestBracketProjected's checks of f, whose
// Centres is cen, on a w x h grid.
func bracketProjectedCase(t *testing.T, f *Field, cen Centres, w, h int, name string, minBracketed float64) {
	tc := struct {
		name         string
		cen          Centres
		w, h         int
		minBracketed float64
	}{name, cen, w, h, minBracketed}
	ix := f.ix
	n := tc.w * tc.h
	want := make([]float64, n)
	f.Distances(0, 0, tc.w, tc.h, nil, want)
	// Nearest at each centre, independently of Distances.
	clon, clat := make([]float64, tc.w), make([]float64, tc.w)
	nan := 0
	for r := range tc.h {
		tc.cen(r, 0, tc.w, clon, clat)
		for c := range tc.w {
			_, d := ix.Nearest(clat[c], clon[c], 0)
			if v := want[r*tc.w+c]; v != d && !(math.IsNaN(v) && math.IsNaN(d)) {
				t.Fatalf("cell %d,%d: Distances %v, Nearest %v", c, r, v, d)
			}
			if math.IsNaN(d) {
				nan++
			}
		}
	}
	if tc.name == "laea-edge" && (nan == 0 || nan == n) {
		t.Fatalf("%d of %d cells with no position: the case must have some, not all", nan, n)
	}
	layout := testLayout(t, want, f.FarthestBound(tc.w, tc.h, 16))
	// Two need masks: 1 cell in 11 left out, and a sparse one
	// (rows 3 to 5 of every 6 and a column in 4 left out), whose
	// rows and tiles start and end at cells not needed.
	dense, sparse := make([]uint64, n), make([]uint64, n)
	for i := range dense {
		if i%11 != 3 {
			dense[i] = 1
		}
		if r, c := i/tc.w, i%tc.w; (r/3)%2 == 0 && c%4 != 1 {
			sparse[i] = 1
		}
	}
	var ref []float64
	for _, bs := range [][2]int{{tc.w, tc.h}, {64, 48}, {45, 30}, {17, 23}, {1, 1}} {
		for m, need := range [][]uint64{nil, dense, sparse} {
			masked := need != nil
			lo, hi := make([]float64, n), make([]float64, n)
			walkTiles(tc.w, tc.h, bs[0], bs[1], need, [][]float64{lo, hi}, func(x0, y0, w, h int, nd []uint64, bufs [][]float64) {
				f.Bracket(x0, y0, w, h, nd, layout, bufs[0], bufs[1])
			})
			exact := checkBrackets(t, fmt.Sprintf("blocks %v mask %d", bs, m), want, lo, hi, need, layout)
			valid := n - nan
			if !masked {
				t.Logf("blocks %v: %d of %d cells exact (%.1f%%)", bs, exact, valid, 100*float64(exact)/float64(valid))
				if got := float64(valid-exact) / float64(valid); got < tc.minBracketed {
					t.Fatalf("blocks %v: %.1f%% of the cells bracketed, want at least %.0f%%", bs, 100*got, 100*tc.minBracketed)
				}
			}
			key := append(append([]float64{}, lo...), hi...)
			if ref == nil {
				ref = key
				continue
			}
			for i := range key {
				j := i % n
				if masked && need[j] == 0 {
					continue
				}
				if key[i] != ref[i] && !(math.IsNaN(key[i]) && math.IsNaN(ref[i])) {
					t.Fatalf("blocks %v mask %d: bracket of cell %d differs from the one-block cut", bs, m, j)
				}
			}
		}
	}
}

// TestChordNarrowMax checks chordNarrowMax: from it to past maxChord no
// chord bracket is narrow (hi - lo <= 2 BracketTol lo), so the projected
// path may leave the shortest chord unknown there; and just below it some
// are (it is not far above the narrow range, or cells would be computed
// that a bracket could settle).
func TestChordNarrowMax(t *testing.T) {
	for d := chordNarrowMax; d < 2*maxChord; d *= 1.0001 {
		if lo, hi := chordBracket(d); hi-lo <= 2*BracketTol*lo {
			t.Fatalf("chord %.0f m: bracket [%v, %v] is narrow", d, lo, hi)
		}
	}
	if lo, hi := chordBracket(0.9 * chordNarrowMax); !(hi-lo <= 2*BracketTol*lo) {
		t.Fatalf("chord %.0f m: bracket [%v, %v] is not narrow", 0.9*chordNarrowMax, lo, hi)
	}
}

// TestProjECEF checks projECEF against ecef (math.Hypot) at random points,
// poles included: within 1e-8 m, far inside the chord bracket's 1 mm
// margin.
func TestProjECEF(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	for i := range 100000 {
		lat, lon := 180*r.Float64()-90, 720*r.Float64()-360
		if i%100 == 0 {
			lat = math.Copysign(90, lat)
		}
		p, q := projECEF(lat, lon), geodesy.ECEF(lat, lon)
		if d := dist3(p, q); !(d <= 1e-8) {
			t.Fatalf("(%v, %v): projECEF %v, ecef %v, %v m apart", lat, lon, p, q, d)
		}
	}
}

// BenchmarkFieldBracketProjected measures the projected path of Bracket
// without the cost of a real projection: a spherical Lambert azimuthal
// equal-area grid (laeaGrid, a few sines per cell instead of PROJ) shaped
// like BenchmarkNullVsRaster's EPSG:3035 study (6000 x 4000 km in 2449 x
// 1633 cells), 500 sites in clusters around 10 E, 50 N, the layout of
// testLayout, in blocks of 240 x 240 cells: CPU ns per cell (the
// projection included, about 60 ns) and the share of cells computed
// exactly.
func BenchmarkFieldBracketProjected(b *testing.B) {
	const w, h = 2449, 1633
	lats, lons := clusteredSites(500, -2, 42, 22, 58, 21)
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		b.Fatal(err)
	}
	f := New(ix, laeaGrid(-3e6, 2e6, 6e6/w, 52, 10))
	want := make([]float64, w*h/64)
	f.Distances(0, 0, w, h/64, nil, want)
	layout := testLayout(b, want, f.FarthestBound(w, h, 64))
	b.ReportAllocs()
	benchBracket(b, f, w, h, layout)
}

// TestECEFLatLon checks ecefLatLon against projECEF at random points of
// the ellipsoid, poles included, and 1 km above and below: the point it
// returns is within 1e-6 m of the nearest point of the ellipsoid (for the
// points on it, the point itself).
func TestECEFLatLon(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	for i := range 100000 {
		lat, lon := 180*r.Float64()-90, 360*r.Float64()-180
		if i%100 == 0 {
			lat = math.Copysign(90, lat)
		}
		p := projECEF(lat, lon)
		h := 0.0
		if i%3 != 0 {
			h = 2000*r.Float64() - 1000
		}
		// Move along the normal (geodetic up) by h.
		sp, cp := math.Sincos(lat * math.Pi / 180)
		sl, cl := math.Sincos(lon * math.Pi / 180)
		q := [3]float64{p[0] + h*cp*cl, p[1] + h*cp*sl, p[2] + h*sp}
		la, lo := ecefLatLon(q)
		if d := dist3(projECEF(la, lo), p); !(d <= 1e-6) {
			t.Fatalf("(%v, %v) at %v m: ecefLatLon gives (%v, %v), %v m away", lat, lon, h, la, lo, d)
		}
	}
}

// TestPrunableSameBrackets checks prunable, which spares the projected
// path's anchors the geodesics to candidate sites that can change no
// bracket: on grids near and far from a dense cluster of sites (square and
// elongated), Bracket gives the same brackets bit for bit with it and with
// every candidate measured (Field.measureAll), for two cuts into blocks,
// and it leaves sites out on the grids far from the cluster (it is at
// work; near it, within twice the cluster's size, it steps aside).
func TestPrunableSameBrackets(t *testing.T) {
	for _, tc := range []struct {
		name           string
		cen            Centres
		w, h           int
		sw, ss, se, sn float64
		pruned         bool // sites must be left out (far enough from the cluster)
	}{
		{"near-2km", laeaGrid(-150e3, 160e3, 2000, 45, 10), 150, 160, 9.5, 44.5, 10.5, 45.5, false},
		{"1500km-5km", laeaGrid(-300e3, 300e3, 5000, 40, 25), 120, 120, 9, 44, 9.5, 44.5, true},
		{"10000km-2km", laeaGrid(-150e3, 160e3, 2000, -4, 100), 150, 160, 9, 44, 9.5, 44.5, true},
		{"17000km-long-2km", laeaGrid(-150e3, 160e3, 2000, -20, -160), 150, 160, 9, 44, 11, 44.1, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			lats, lons := clusteredSites(300, tc.sw, tc.ss, tc.se, tc.sn, 5)
			ix, err := geodesy.NewIndex(lats, lons)
			if err != nil {
				t.Fatal(err)
			}
			n := tc.w * tc.h
			want := make([]float64, n)
			New(ix, tc.cen).Distances(0, 0, tc.w, tc.h, nil, want)
			all := New(ix, tc.cen)
			all.measureAll = true
			layout := testLayout(t, want, all.FarthestBound(tc.w, tc.h, 16))
			for _, bs := range [][2]int{{tc.w, tc.h}, {45, 30}} {
				var ref []float64
				for _, f := range []*Field{all, New(ix, tc.cen)} {
					lo, hi := make([]float64, n), make([]float64, n)
					walkTiles(tc.w, tc.h, bs[0], bs[1], nil, [][]float64{lo, hi}, func(x0, y0, w, h int, nd []uint64, bufs [][]float64) {
						f.Bracket(x0, y0, w, h, nd, layout, bufs[0], bufs[1])
					})
					checkBrackets(t, fmt.Sprintf("blocks %v measureAll %v", bs, f.measureAll), want, lo, hi, nil, layout)
					key := append(lo, hi...)
					if ref == nil {
						ref = key
						continue
					}
					for i := range key {
						if math.Float64bits(key[i]) != math.Float64bits(ref[i]) {
							t.Fatalf("blocks %v: cell %d: [%v, %v] with prunable, [%v, %v] with every site measured", bs, i%n, lo[i%n], hi[i%n], ref[i%n], ref[n+i%n])
						}
					}
				}
			}
			// It is at work: the anchors of one block leave sites out.
			b := &projBracketer{f: New(ix, tc.cen), sc: new(projScratch)}
			left := 0
			for r := 8; r < tc.h; r += 16 {
				for c := 8; c < tc.w; c += 16 {
					lon, lat := make([]float64, 1), make([]float64, 1)
					tc.cen(r, c, c+1, lon, lat)
					_, d1 := ix.NearestBounds(lat[0], lon[0], 0)
					b.sc.cands = ix.Within(lat[0], lon[0], d1+2*30e3, b.sc.cands[:0])
					sites, first := b.sc.chordSitesAsListed(b.f, projECEF(lat[0], lon[0]))
					for _, s := range b.prunable(sites, first, lat[0], lon[0], 30e3, 0) {
						if s {
							left++
						}
					}
				}
			}
			t.Logf("%d sites left out at the anchors", left)
			if tc.pruned && left == 0 {
				t.Fatal("prunable left no site out")
			}
		})
	}
}
