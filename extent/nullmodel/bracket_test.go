package nullmodel

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"areasweep/extent/geodesy"
	"areasweep/metrics"
)

// floorBins is the Binner of a pass on a floored layout (the pass's own
// adapter lives in cmd/internal/pass, tested there against Locate and
// FloorBin): Locate gives the exact bin and floor-grid bin of a value, Cell
// the interval of values sharing both.
type floorBins struct {
	l *metrics.Layout
}

func newFloorBins(l *metrics.Layout) floorBins { return floorBins{l} }

func (b floorBins) Locate(v float64) (bin, hist int) { return b.l.Locate(v), int(b.l.FloorBin(v)) }

// Cell returns the exact bin: the value d_j, or the open interval between
// two values.
func (b floorBins) Cell(v float64) (lo, hi float64, closed bool) { return b.l.Cell(v) }

func (b floorBins) FloorScale() float64 {
	e, _ := b.l.HistFloor()
	return math.Ldexp(1, -e)
}

// testLayout returns the bins of a layout like a pass's for the null: the
// values at every 37th cell (as presence values would be) and 4096
// fine-histogram bins floored at the power of two at or below far/4096.
func testLayout(t testing.TB, dist []float64, far float64) floorBins {
	t.Helper()
	var vals []float64
	for i := 0; i < len(dist); i += 37 {
		if !math.IsNaN(dist[i]) {
			vals = append(vals, 0-dist[i])
		}
	}
	l, err := metrics.NewLayout(vals, 4096, metrics.WithHistFloor(metrics.FloorExp(far/4096)))
	if err != nil {
		t.Fatal(err)
	}
	return newFloorBins(l)
}

// TestBracketContainsDistance checks Bracket against Distances on
// latitude-longitude grids (mid latitudes with 1 km cells, a coarse grid
// near the pole, one across the antimeridian, one reaching the south pole):
// every bracket holds the exact distance, a degenerate bracket is the
// exact distance bit for bit, both ends share their bins, the width is
// within 2 BracketTol of the distance, and the brackets are the same for
// several ways of cutting the grid into blocks and with a need mask.
func TestBracketContainsDistance(t *testing.T) {
	cases := []struct {
		name             string
		west, north, deg float64
		w, h             int
		sw, ss, se, sn   float64
		sites            int
		// minFar: the least share of the cells from maxTaylorDist to
		// maxFarDist from the nearest site that must be bracketed, not
		// computed exactly (the far form at work).
		minFar float64
	}{
		{"europe-1km", -5, 55, 0.01, 400, 300, -5, 52, -1, 55, 40, 0},
		{"arctic-coarse", -60, 89.5, 0.5, 240, 60, -60, 70, 60, 89, 12, 0},
		{"antimeridian", 175, -30, 0.05, 200, 120, 176, -36, 184, -31, 25, 0},
		{"south-pole", -180, -80, 0.1, 180, 100, -180, -89, -100, -81, 8, 0},
		// Dense training points: many super-tiles have more candidates
		// than the anchors measure (maxCandidates).
		{"dense-1km", -5, 55, 0.01, 300, 200, -4.6, 53.3, -2.4, 54.9, 4000, 0},
		// A small range on a whole-world grid: most cells lie beyond
		// maxTaylorDist, up to the sites' antipodes.
		{"world-small-range", -180, 90, 0.5, 720, 360, 10, 45, 10.2, 45.15, 10, 0.5},
		// Dense training points about 10,000 km away (farPrune), and a
		// window round their antipode, where it must step aside.
		{"far-dense", 100, -4, 0.05, 200, 120, 10, 45, 10.5, 45.5, 300, 0.5},
		{"antipode-dense", -172, -42, 0.05, 100, 60, 10, 45, 10.5, 45.5, 300, 0},
		// 30 arc-second cells right round the antipodes of a dense
		// cluster, on their cut loci and up to 130 km away: antipodePrune
		// and antipodeSites.
		{"antipode-dense-30s", -170.9, -43.9, 1.0 / 120, 160, 160, 10, 45, 10.5, 45.5, 300, 0},
		{"antipode-dense-30s-edge", -171.5, -44.5, 1.0 / 120, 120, 90, 10, 45, 10.5, 45.5, 300, 0},
		{"far-dense-long", -160, -20, 0.05, 200, 120, 10, 45, 12, 45.1, 300, 0.5},
		{"mid-dense", 75, 12, 0.05, 200, 120, 10, 45, 10.5, 45.5, 300, 0.5},
		// Dense points round a pole on a whole-world grid, and across the
		// antimeridian: farPrune's bounds near the pole and at every
		// distance up to the antipode.
		{"world-pole-dense", -180, 90, 1, 360, 180, -180, 89.2, 180, 89.9, 100, 0},
		{"world-antimeridian-dense", -180, 90, 1, 360, 180, 179.6, -30.4, 180.4, -30, 100, 0},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			lats, lons := clusteredSites(tc.sites, tc.sw, tc.ss, tc.se, tc.sn, 11)
			ix, err := geodesy.NewIndex(lats, lons)
			if err != nil {
				t.Fatal(err)
			}
			f := NewLonLat(ix, tc.west, tc.deg, tc.north, -tc.deg)
			want := make([]float64, tc.w*tc.h)
			New(ix, lonLatGrid(tc.west, tc.north, tc.deg)).Distances(0, 0, tc.w, tc.h, nil, want)
			far := f.FarthestBound(tc.w, tc.h, 16)
			layout := testLayout(t, want, far)
			need := make([]uint64, tc.w*tc.h)
			for i := range need {
				if i%11 != 3 {
					need[i] = 1
				}
			}
			var ref []float64
			for _, bs := range [][2]int{{tc.w, tc.h}, {64, 48}, {45, 30}, {17, 23}} {
				for _, masked := range []bool{false, true} {
					lo, hi := make([]float64, tc.w*tc.h), make([]float64, tc.w*tc.h)
					var mask []uint64
					if masked {
						mask = need
					}
					walkTiles(tc.w, tc.h, bs[0], bs[1], mask, [][]float64{lo, hi}, func(x0, y0, w, h int, n []uint64, bufs [][]float64) {
						f.Bracket(x0, y0, w, h, n, layout, bufs[0], bufs[1])
					})
					exact := checkBrackets(t, fmt.Sprintf("blocks %v masked %v", bs, masked), want, lo, hi, mask, layout)
					if !masked {
						t.Logf("blocks %v: %d of %d cells exact (%.1f%%)", bs, exact, len(want), 100*float64(exact)/float64(len(want)))
						far, farOpen := 0, 0
						for i, d := range want {
							if d >= 6e6 && d <= 19e6 { // maxTaylorDist, maxFarDist
								far++
								if lo[i] < hi[i] {
									farOpen++
								}
							}
						}
						t.Logf("%d of %d cells beyond maxTaylorDist bracketed", farOpen, far)
						if far > 0 && float64(farOpen) < tc.minFar*float64(far) {
							t.Fatalf("blocks %v: %d of %d cells beyond maxTaylorDist bracketed, want at least %.0f%%", bs, farOpen, far, 100*tc.minFar)
						}
						key := append(append([]float64{}, lo...), hi...)
						if ref == nil {
							ref = key
						} else {
							for i := range key {
								if key[i] != ref[i] {
									t.Fatalf("blocks %v: bracket of cell %d differs from the one-block cut", bs, i%len(lo))
								}
							}
						}
					}
				}
			}
			// A Binner that lists its floor bins' edges (as the pass's
			// does) gives the same brackets.
			eb := edgeBins{layout, FloorEdges(layout.l.Values(), layout.FloorScale())}
			lo, hi := make([]float64, tc.w*tc.h), make([]float64, tc.w*tc.h)
			f.Bracket(0, 0, tc.w, tc.h, nil, eb, lo, hi)
			checkBrackets(t, "floor edges", want, lo, hi, nil, layout)
			for i, l := range append(append([]float64{}, lo...), hi...) {
				if math.Float64bits(l) != math.Float64bits(ref[i]) {
					t.Fatalf("floor edges: bracket of cell %d differs", i%len(lo))
				}
			}
			// And one that lists its sub-bins' edges too.
			sb := subEdgeBins{eb, FloorEdges(layout.l.Values(), layout.FloorScale()*SubFloor)}
			f.Bracket(0, 0, tc.w, tc.h, nil, sb, lo, hi)
			checkBrackets(t, "sub-bin edges", want, lo, hi, nil, layout)
			for i, l := range append(append([]float64{}, lo...), hi...) {
				if math.Float64bits(l) != math.Float64bits(ref[i]) {
					t.Fatalf("sub-bin edges: bracket of cell %d differs", i%len(lo))
				}
			}
		})
	}
}

// edgeBins is floorBins with its floor bins' edges (EdgeBinner).
type edgeBins struct {
	floorBins
	edges []float64
}

func (b edgeBins) FloorEdges() []float64 { return b.edges }

// subEdgeBins is edgeBins with the sub-bins' edges (SubEdgeBinner).
type subEdgeBins struct {
	edgeBins
	sub []float64
}

func (b subEdgeBins) SubFloorEdges() []float64 { return b.sub }

// TestSubQuick checks subQuick, which places a bracket by the sub-bins'
// edges (SubEdgeBinner) without asking the Binner, against Locate and
// FloorBin: whenever it says yes, both ends of the values [-hi, -lo]
// share their exact bin and floor bin. Layouts of clustered values (many
// floor bins with several edges), brackets of every width around them;
// it must say yes often where the floor bin holds several edges.
func TestSubQuick(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	yesAll, severalAll := 0, 0
	for trial := range 20 {
		var vals []float64
		for range 1 + r.IntN(40) {
			c := -math.Exp(r.Float64() * 14)
			for range 1 + r.IntN(30) {
				vals = append(vals, c*(1+0.01*r.NormFloat64()))
			}
		}
		l, err := metrics.NewLayout(vals, 1024, metrics.WithHistFloor(metrics.FloorExp(2e6/1024)))
		if err != nil {
			t.Fatal(err)
		}
		fb := newFloorBins(l)
		s := fb.FloorScale()
		eb := subEdgeBins{edgeBins{fb, FloorEdges(l.Values(), s)}, FloorEdges(l.Values(), s*SubFloor)}
		b := bracketer{bins: eb, cellLo: math.NaN(), cellHi: math.NaN(), quickBins: quickBins{scale: s}, binW: 1 / s}
		b.setEdges()
		if b.sub == nil {
			t.Fatal("no sub-bins")
		}
		yes, several := 0, 0
		for range 20000 {
			d := -vals[r.IntN(len(vals))] * (1 + 0.05*r.NormFloat64())
			if d < 0 {
				continue
			}
			lo := d * (1 - math.Exp(-3-10*r.Float64()))
			hi := d * (1 + math.Exp(-3-10*r.Float64()))
			// Ends on an edge: the edge's own bin.
			switch v := -vals[r.IntN(len(vals))]; r.IntN(4) {
			case 0:
				lo, hi = v, v*(1+math.Exp(-3-10*r.Float64()))
			case 1:
				lo, hi = v*(1-math.Exp(-3-10*r.Float64())), v
			}
			if !b.subQuick(lo, hi) {
				continue
			}
			yes++
			if c := int(math.Ceil(lo * s)); c < len(b.edges) && math.IsNaN(b.edges[c]) {
				several++
			}
			if l.Locate(0-hi) != l.Locate(0-lo) || l.FloorBin(0-hi) != l.FloorBin(0-lo) {
				t.Fatalf("trial %d: subQuick places [%v, %v], whose values have bins %d and %d, floor bins %d and %d",
					trial, lo, hi, l.Locate(0-hi), l.Locate(0-lo), l.FloorBin(0-hi), l.FloorBin(0-lo))
			}
		}
		yesAll, severalAll = yesAll+yes, severalAll+several
	}
	if yesAll < 1000 || severalAll < 1000 {
		t.Errorf("subQuick placed %d brackets, %d in floor bins of several edges: the test tests little", yesAll, severalAll)
	}
	t.Logf("subQuick placed %d brackets, %d in floor bins of several edges", yesAll, severalAll)
}

// TestFloorEdges checks FloorEdges against the layout's own bins: in each
// floor bin -c of the slice, +Inf means the bin lies inside one open exact
// bin, a value v means v is the bin's only edge (both parts beside it lie
// inside one open exact bin each), NaN means two edges or more; every
// layout value's floor bin is listed with it or NaN, and no floor bin
// beyond the slice holds a value.
func TestFloorEdges(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	counts := map[string]int{}
	for trial := range 50 {
		n := 1 + r.IntN(400)
		vals := make([]float64, n)
		for i := range vals {
			vals[i] = -r.Float64() * 1e5
			if i%7 == 0 && i > 0 {
				vals[i] = vals[i-1] // ties
			}
			if i%11 == 0 && i > 0 {
				vals[i] = vals[i-1] - 1 // two edges in one floor bin
			}
		}
		l, err := metrics.NewLayout(vals, 4096, metrics.WithHistFloor(metrics.FloorExp(1e5/4096)))
		if err != nil {
			t.Fatal(err)
		}
		fb := newFloorBins(l)
		s := fb.FloorScale()
		edges := FloorEdges(l.Values(), s)
		// inside reports whether [a, z] lies in one open exact bin.
		inside := func(a, z float64) bool {
			lo, hi, closed := fb.Cell(a)
			return !closed && lo < a && z < hi
		}
		for c := 1; c < len(edges); c++ {
			a, z := -float64(c)/s, math.Nextafter(-float64(c-1)/s, math.Inf(-1))
			if l.FloorBin(a) != int64(-c) || l.FloorBin(z) != int64(-c) {
				t.Fatalf("trial %d: bin %d: ends %v %v not in floor bin %d", trial, c, a, z, -c)
			}
			switch v := edges[c]; {
			case math.IsInf(v, 1):
				counts["none"]++
				if !inside(a, z) {
					t.Fatalf("trial %d: bin %d [%v, %v] said to hold no edge", trial, c, a, z)
				}
			case math.IsNaN(v):
				counts["several"]++
			default:
				counts["one"]++
				if l.FloorBin(v) != int64(-c) {
					t.Fatalf("trial %d: bin %d: edge %v outside it", trial, c, v)
				}
				if lo, hi, closed := fb.Cell(v); !closed || lo != v || hi != v {
					t.Fatalf("trial %d: bin %d: %v is not an edge", trial, c, v)
				}
				if v > a && !inside(a, math.Nextafter(v, math.Inf(-1))) || v < z && !inside(math.Nextafter(v, math.Inf(1)), z) {
					t.Fatalf("trial %d: bin %d [%v, %v] has another edge than %v", trial, c, a, z, v)
				}
			}
		}
		for _, v := range l.Values() {
			c := -l.FloorBin(v)
			if c >= int64(len(edges)) {
				t.Fatalf("trial %d: value %v beyond the slice", trial, v)
			}
			if c >= 1 && edges[c] != v && !math.IsNaN(edges[c]) {
				t.Fatalf("trial %d: value %v: floor bin %d lists %v", trial, v, c, edges[c])
			}
		}
	}
	for _, k := range []string{"none", "one", "several"} {
		if counts[k] == 0 {
			t.Fatalf("no floor bin with %s edge: %v", k, counts)
		}
	}
}

// BenchmarkFieldBracket measures the bounded path of the distance field
// (what a pass computes per block) on the same grids as BenchmarkDistances,
// in blocks of 240 x 240 cells: ns per cell, and the share of cells
// computed exactly.
func BenchmarkFieldBracket(b *testing.B) {
	for _, sites := range []int{100, 1000} {
		for _, side := range []int{1024, 2048} {
			lats, lons, ix := benchIndex(b, sites, side)
			north := 40 + 0.01*float64(side)
			f := NewLonLat(ix, 0, 0.01, north, -0.01)
			far := f.FarthestBound(side, side, 64)
			// presence-like layout values: distances at the sites' cells
			var vals []float64
			for i := range lats {
				_, d := ix.Nearest(north-(math.Floor((north-lats[i])/0.01)+0.5)*0.01, (math.Floor(lons[i]/0.01)+0.5)*0.01, 0)
				vals = append(vals, -d)
			}
			l, err := metrics.NewLayout(vals, 4096, metrics.WithHistFloor(metrics.FloorExp(far/4096)))
			if err != nil {
				b.Fatal(err)
			}
			layout := newFloorBins(l)
			lo, hi := make([]float64, 240*240), make([]float64, 240*240)
			b.Run(fmt.Sprintf("sites=%d/cells=%d", sites, side*side), func(b *testing.B) {
				b.ReportAllocs()
				exact := 0
				c0 := cpuNanos(b)
				for b.Loop() {
					exact = bracketBlocks(f, side, side, layout, lo, hi)
				}
				b.ReportMetric(float64(cpuNanos(b)-c0)/float64(b.N)/float64(side*side), "cpu-ns/cell")
				b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N)/float64(side*side), "ns/cell")
				b.ReportMetric(float64(exact)/float64(side*side), "exact-share")
			})
		}
	}
}

// BenchmarkFieldBracketWorld measures the bounded path on a whole-world
// latitude-longitude grid of 0.1 degrees (6.5 million cells, blocks of 240
// x 240), where most cells lie thousands of kilometres from the training
// points (the far form and farPrune): a small range (10 sites within 20
// km) and a dense cluster (300 sites within 50 km). CPU ns per cell and
// the share of cells computed exactly; before the far form, 72% of such
// cells were exact and the pass cost about 30 times a model's.
func BenchmarkFieldBracketWorld(b *testing.B) {
	for _, tc := range []struct {
		name  string
		sites int
		deg   float64
	}{{"small-range", 10, 0.2}, {"dense", 300, 0.45}} {
		lats, lons := clusteredSites(tc.sites, 20, 10, 20+tc.deg, 10+tc.deg, 11)
		ix, err := geodesy.NewIndex(lats, lons)
		if err != nil {
			b.Fatal(err)
		}
		const step = 0.1
		w, h := int(math.Round(360/step)), int(math.Round(180/step))
		f := NewLonLat(ix, -180, step, 90, -step)
		var vals []float64
		for i := range lats {
			_, d := ix.Nearest(lats[i], lons[i]+0.3, 0)
			vals = append(vals, -d)
		}
		l, err := metrics.NewLayout(vals, 4096, metrics.WithHistFloor(metrics.FloorExp(f.FarthestBound(w, h, 16)/4096)))
		if err != nil {
			b.Fatal(err)
		}
		layout := newFloorBins(l)
		b.Run(tc.name, func(b *testing.B) { benchBracket(b, f, w, h, layout) })
	}
}

// benchBracket times bracketBlocks on the w x h grid of f: CPU ns per cell
// and the share of cells computed exactly.
func benchBracket(b *testing.B, f *Field, w, h int, layout Binner) {
	lo, hi := make([]float64, 240*240), make([]float64, 240*240)
	exact := 0
	c0 := cpuNanos(b)
	for b.Loop() {
		exact = bracketBlocks(f, w, h, layout, lo, hi)
	}
	b.ReportMetric(float64(cpuNanos(b)-c0)/float64(b.N)/float64(w*h), "cpu-ns/cell")
	b.ReportMetric(float64(exact)/float64(w*h), "exact-share")
}

// TestHessianBounds checks the cheap forms of the Hessian comparison
// bounds against the bounds themselves (cot from math.Tan) from 1 m to
// 6000 km: hLoFast below cot(r/b)/b, hHiFast above (b/a^2) cot(b r/a^2),
// and the division-free forms of taylorBracket beyond them; to 1e-12
// relative (our tolerance for the rounding of both sides, far inside the
// bracket's margin).
func TestHessianBounds(t *testing.T) {
	const eps = 1e-12
	// The far form's bounds, to maxFarDist: farCot below cot(f0/b) and
	// farHessian's A below cot((f0+t)/b)/b and 0, both close to them up
	// to 19,000 km (the tolerances below; the addition formula loosens A
	// towards pi b), A falling as f0 and t grow (the projected path's
	// prunable takes the A of the largest of both as a bound on all), and
	// B = 1/(f0 - t).
	for f0 := 1e5; f0 <= maxFarDist; f0 += 1e4 {
		cot := 1 / math.Tan(sqrtKmax*f0)
		if c := farCot(f0); c > cot || c < cot-1e-9*math.Abs(cot)-1e-9 {
			t.Fatalf("f0 = %v m: farCot %v, cot(f0/b) %v", f0, c, cot)
		}
		for _, step := range []float64{1, 1e3, 3e4, 2e5, 2e6} {
			if f0+step > maxFarDist || f0 <= 2*step {
				continue
			}
			want := sqrtKmax / math.Tan(sqrtKmax*(f0+step))
			a, b, ok := farHessian(farCot(f0), f0, step)
			// Our tolerance for the series of cot(t/b) (its bound is lower by
			// about (t/b)^3/360, less after the addition formula).
			x := step * sqrtKmax
			close := f0+step > 19e6 || a >= min(0, want)-(1e-9+x*x*x/100)*(math.Abs(want)+sqrtKmax)
			a2, _, ok2 := farHessian(farCot(f0+1e4), f0+1e4, step)
			a3, _, ok3 := farHessian(farCot(f0), f0, step*1.3)
			falls := (!ok2 || f0+1e4+step > maxFarDist || a2 <= a) && (!ok3 || f0+1.3*step > maxFarDist || a3 <= a)
			if !ok || a > 0 || a > want || !close || !falls || b != 1/(f0-step) {
				t.Fatalf("f0 = %v m, t = %v m: farHessian %v %v %v, cot((f0+t)/b)/b %v", f0, step, a, b, ok, want)
			}
		}
	}
	if _, _, ok := farHessian(0, 1e7, 0); ok {
		t.Fatal("farHessian took t = 0")
	}
	if _, _, ok := farHessian(0, 1.8e7, 1.01/sqrtKmax); ok {
		t.Fatal("farHessian took t > b")
	}
	for r := 1.0; r < 6e6; r *= 1.01 {
		lo := sqrtKmax / math.Tan(sqrtKmax*r)
		hi := sqrtKmin / math.Tan(sqrtKmin*r)
		if !(hLoFast(r) <= lo*(1+eps) && lo <= hi*(1+eps) && hi <= hHiFast(r)*(1+eps)) {
			t.Fatalf("r = %v m: hLoFast %v, lower bound %v, upper bound %v, hHiFast %v", r, hLoFast(r), lo, hi, hHiFast(r))
		}

		for _, x := range []float64{0, 0.1, 0.3, 0.5} {
			f0, step := r, x*r
			if f0+step >= 6e6 {
				continue
			}
			h1 := (1-x)/f0 - (f0+step)*kLo1 - (f0+step)*(f0+step)*(f0+step)*kLo3
			h2 := (1 + x + 2*x*x) / f0
			if h1 > hLoFast(f0+step)*(1+eps) || h2*(1+eps) < hHiFast(f0-step) {
				t.Fatalf("f0 = %v m, t = %v m: division-free bounds %v, %v against %v, %v", f0, step, h1, h2, hLoFast(f0+step), hHiFast(f0-step))
			}
		}
	}
}

// TestFarTaylorBracket checks the far form of the Taylor bracket
// (farHessian) against PROJ's geodesics (Karney 2013, through
// geodesy.Inverse and geodesy.Distance): for random anchors and sites
// from maxTaylorDist to maxFarDist apart (anywhere on the ellipsoid,
// across the poles and the antimeridian) and random cells up to 150 km
// from the anchor, the bracket from the anchor's measurement holds the
// cell's distance to the site, with and without the range of f' (farQ),
// and with it, within 60 km of the anchor, it is under 1.5 km wide up to
// 19,000 km (the far form is of use; our bound, from (B - A) t^2/2). Half the sites are drawn within 1,100 km of the anchor's
// antipode, so that at least 2,000 pairs lie beyond 19,000 km, where A
// falls fast.
func TestFarTaylorBracket(t *testing.T) {
	r := rand.New(rand.NewPCG(17, 18))
	tested, beyond := 0, 0
	for tested < 20000 {
		alat, alon := 180*r.Float64()-90, 360*r.Float64()-180
		slat, slon := 180*r.Float64()-90, 360*r.Float64()-180
		if r.IntN(2) == 0 {
			slat, slon = geodesy.Direct(-alat, alon+180, 360*r.Float64(), 1.1e6*r.Float64())
		}
		f0, az, _ := geodesy.Inverse(alat, alon, slat, slon)
		tmax := 1e3 + r.Float64()*149e3
		if !(f0 > 2*tmax && f0+tmax >= maxTaylorDist && f0+tmax <= maxFarDist) {
			continue
		}
		tested++
		m := anchorSite{f0: f0, inv: 1 / f0, margin: 1e-3 + 1e-9*f0, far: true, farQ: tested%2 == 0}
		m.sz, m.cz = math.Sincos(az * math.Pi / 180)
		m.hA, m.hB, _ = farHessian(farCot(f0), f0, tmax)
		// A cell within tmax of the anchor, and the geodesic to it.
		plat := math.Max(-90, math.Min(90, alat+(2*r.Float64()-1)*tmax/111e3))
		plon := alon + (2*r.Float64()-1)*tmax/111e3/math.Max(0.05, math.Cos(alat*math.Pi/180))
		tc, azc, _ := geodesy.Inverse(alat, alon, plat, plon)
		if tc > tmax {
			continue
		}
		su, cu := math.Sincos(azc * math.Pi / 180)
		lo, hi := taylorBracket(&m, tc, su, cu)
		d := geodesy.Distance(plat, plon, slat, slon)
		if !(lo <= d && d <= hi) {
			t.Fatalf("anchor (%v, %v), site (%v, %v) at %.3f km, cell (%v, %v) %.3f km away: distance %.6f outside [%.6f, %.6f]", alat, alon, slat, slon, f0/1e3, plat, plon, tc/1e3, d, lo, hi)
		}
		if f0+tmax > 19e6 {
			beyond++
		} else if m.farQ && tmax <= 60e3 && hi-lo > 1500 {
			t.Fatalf("site at %.3f km, cell %.3f km away (t <= %.0f m): bracket %.1f m wide", f0/1e3, tc/1e3, tmax, hi-lo)
		}
	}
	if beyond < 2000 {
		t.Fatalf("%d of %d pairs beyond 19,000 km", beyond, tested)
	}
}

// TestChordBracket checks chordBracket against PROJ's geodesic distance
// (geodesy.Distance) for random pairs of points whose chord runs from 1 m
// to past maxChord, at every latitude and across the antimeridian and the
// poles: the bracket holds the distance, its width is within 1.1 times
// that of Schur's bound itself, (2/kappa) asin(kappa D/2) - D (about
// kappa^2 D^3/24), plus the margins, and beyond maxChord there is no
// upper bound.
func TestChordBracket(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	for i := range 20000 {
		lat1, lon1 := 180*r.Float64()-90, 360*r.Float64()-180
		if i%50 == 0 {
			lat1 = math.Copysign(90-r.Float64()*1e-3, lat1)
		}
		// scale of the second point's offset: 1e-5 to 60 degrees
		deg := math.Pow(10, -5+math.Log10(6e6)*r.Float64())
		lat2 := math.Max(-90, math.Min(90, lat1+deg*(2*r.Float64()-1)))
		lon2 := lon1 + deg*(2*r.Float64()-1)*3
		d := dist3(geodesy.ECEF(lat1, lon1), geodesy.ECEF(lat2, lon2))
		s := geodesy.Distance(lat1, lon1, lat2, lon2)
		lo, hi := chordBracket(d)
		if !(lo <= s && s <= hi) {
			t.Fatalf("(%v, %v) to (%v, %v): chord %.9f m, distance %.9f m outside [%.9f, %.9f]", lat1, lon1, lat2, lon2, d, s, lo, hi)
		}
		if d > maxChord {
			if !math.IsInf(hi, 1) {
				t.Fatalf("chord %v beyond maxChord: upper end %v, want +Inf", d, hi)
			}
			continue
		}
		schur := 2/chordKappa*math.Asin(chordKappa*d/2) - d
		if w := hi - lo; w > 1.1*schur+2e-3+3e-9*d {
			t.Fatalf("chord %.3f m: bracket %.6f m wide", d, w)
		}
	}
}

// checkBrackets checks Bracket's output lo, hi against the exact distances
// want: a cell not needed (need non-nil and its word 0) or with no
// distance (NaN) has a NaN bracket; any other holds its distance, is no
// wider than 2 BracketTol of its lower end and has both ends (negated, as
// the pass scores them) in one bin of layout, or is exact (lo == hi ==
// distance). It returns the number of exact cells; label names the case.
func checkBrackets(t *testing.T, label string, want, lo, hi []float64, need []uint64, layout floorBins) int {
	t.Helper()
	exact, bad := 0, 0
	for i, d := range want {
		if need != nil && need[i] == 0 || math.IsNaN(d) {
			if !math.IsNaN(lo[i]) || !math.IsNaN(hi[i]) {
				t.Fatalf("%s cell %d (distance %v): bracket [%v, %v], want NaN", label, i, d, lo[i], hi[i])
			}
			continue
		}
		b1, h1 := layout.Locate(0 - hi[i])
		b2, h2 := layout.Locate(0 - lo[i])
		ok := lo[i] <= d && d <= hi[i] && b1 == b2 && h1 == h2 && hi[i]-lo[i] <= 2*BracketTol*lo[i]
		if lo[i] == hi[i] {
			ok = lo[i] == d
			exact++
		}
		if !ok {
			if bad < 5 {
				t.Errorf("%s cell %d: bracket [%.9f, %.9f], distance %.9f", label, i, lo[i], hi[i], d)
			}
			bad++
		}
	}
	if bad > 0 {
		t.Fatalf("%s: %d bad brackets", label, bad)
	}
	return exact
}

// bracketBlocks brackets every cell of a w x h grid in blocks of 240 x 240
// cells (lo and hi hold one block) and returns the number of cells
// computed exactly (lo == hi): the work of the bracket benchmarks.
func bracketBlocks(f *Field, w, h int, layout Binner, lo, hi []float64) int {
	exact := 0
	for y0 := 0; y0 < h; y0 += 240 {
		for x0 := 0; x0 < w; x0 += 240 {
			bw, bh := min(240, w-x0), min(240, h-y0)
			f.Bracket(x0, y0, bw, bh, nil, layout, lo, hi)
			for i := range bw * bh {
				if lo[i] == hi[i] {
					exact++
				}
			}
		}
	}
	return exact
}

// TestTaylorRow checks that taylorRow, the loop form of taylorBracket used
// on a super-tile's rows, gives taylorBracket's brackets bit for bit, on
// random sites and cells, Taylor (near and far forms) and 1-Lipschitz alike, with the stencil
// lengths and azimuths of a real row.
func TestTaylorRow(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	for trial := range 2000 {
		f0 := math.Exp(r.Float64()*math.Log(6e6/10)) * 10
		az := (r.Float64()*2 - 1) * math.Pi
		m := anchorSite{f0: f0, inv: 1 / f0, margin: 1e-3 + 1e-9*f0, taylor: trial%5 != 0}
		if trial%5 == 1 {
			// The far form.
			m.f0 = maxTaylorDist + r.Float64()*(maxFarDist-maxTaylorDist)
			m.taylor, m.far, m.farQ = false, true, trial%10 == 1
			m.hA, m.hB, _ = farHessian(farCot(m.f0), m.f0, 1e5)
		}
		f0 = m.f0
		m.sz, m.cz = math.Sincos(az)
		n := 1 + r.IntN(SuperTile)
		ts, sa, ca := make([]float64, n), make([]float64, n), make([]float64, n)
		for x := range n {
			ts[x] = r.Float64() * f0 / 2
			sa[x], ca[x] = math.Sincos((r.Float64()*2 - 1) * math.Pi)
		}
		lo, hi := make([]float64, n), make([]float64, n)
		taylorRow(&m, ts, sa, ca, lo, hi)
		for x := range n {
			l, h := taylorBracket(&m, ts[x], sa[x], ca[x])
			if math.Float64bits(l) != math.Float64bits(lo[x]) || math.Float64bits(h) != math.Float64bits(hi[x]) {
				t.Fatalf("trial %d cell %d: taylorRow [%v, %v], taylorBracket [%v, %v]", trial, x, lo[x], hi[x], l, h)
			}
		}
	}
}

// TestStencilMirror checks that a stencil's columns west of the anchor,
// which stencil takes from the mirror images of those east of it, hold
// what geodesy.Inverse gives for them bit for bit, on rows from pole to
// pole of grids of several cell sizes, both stencil sides.
func TestStencilMirror(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	for trial := range 40 {
		dlon := math.Exp(r.Float64()*math.Log(1/1e-4)) * 1e-4 // 1e-4 to 1 degree
		dlat := -dlon * (0.5 + r.Float64())
		north := 90 - r.Float64()*dlat*-3
		ll := &lonLat{west: -180 + 360*r.Float64(), dlon: dlon, north: north, dlat: dlat, rows: map[[2]int]*stencil{}}
		for _, k := range []int{patchK, SuperTile / 2} {
			p := 2*k + 1
			rows := int(180 / -dlat / float64(p))
			for q := range 25 {
				pr := q * rows / 24
				if trial%2 == 1 {
					pr = r.IntN(rows + 1)
				}
				st := ll.stencil(k, pr)
				if !st.ok {
					continue
				}
				la := ll.lat(pr*p + k)
				for dr := -k; dr <= k; dr++ {
					lp := ll.lat(pr*p + k + dr)
					for dc := -k; dc <= k; dc++ {
						j := (dr+k)*p + dc + k
						d, az, _ := geodesy.Inverse(la, 0, lp, float64(dc)*dlon)
						sa, ca := math.Sincos(az * math.Pi / 180)
						if math.Float64bits(d) != math.Float64bits(st.t[j]) || math.Float64bits(sa) != math.Float64bits(st.sa[j]) || math.Float64bits(ca) != math.Float64bits(st.ca[j]) {
							t.Fatalf("trial %d, K %d, row %d (lat %v), dr %d, dc %d: stencil (%v, %v, %v), Inverse (%v, %v, %v)",
								trial, k, pr, la, dr, dc, st.t[j], st.sa[j], st.ca[j], d, sa, ca)
						}
					}
				}
			}
		}
	}
}

// TestSortChordSitesStable checks that sortChordSites orders a super-tile's
// candidate sites as the insertion sort it replaced did (increasing chord,
// equal chords in list order), so the brackets are the same bits: lists of
// 0 to 3000 sites with many ties, against that insertion sort written out
// here.
func TestSortChordSitesStable(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, n := range []int{0, 1, 2, 16, 17, 100, 3000} {
		s := make([]chordSite, n)
		for i := range s {
			// Few distinct chords: many ties; p[0] records the order.
			s[i] = chordSite{p: [3]float64{float64(i)}, cc: float64(rng.IntN(max(n/4, 1))) * 1000}
		}
		want := append([]chordSite(nil), s...)
		for i := 1; i < len(want); i++ {
			for j := i; j > 0 && want[j].cc < want[j-1].cc; j-- {
				want[j], want[j-1] = want[j-1], want[j]
			}
		}
		sortChordSites(s)
		for i := range s {
			if s[i] != want[i] {
				t.Fatalf("n=%d: site %d is %v, the insertion sort gives %v", n, i, s[i], want[i])
			}
		}
	}
}

// BenchmarkSortChordSites sorts the candidate list of one super-tile near
// dense training points (1,000 and 4,000 sites, as a lattice of 2,000 and
// 8,000 points gives): an insertion sort took n^2/4 swaps, 0.25 and 4
// million per super-tile, and most of the pass.
func BenchmarkSortChordSites(b *testing.B) {
	for _, n := range []int{16, 1000, 4000} {
		rng := rand.New(rand.NewPCG(3, 5))
		src := make([]chordSite, n)
		for i := range src {
			src[i].cc = 5e5 + rng.Float64()*3e4
		}
		s := make([]chordSite, n)
		b.Run(fmt.Sprintf("sites=%d", n), func(b *testing.B) {
			for b.Loop() {
				copy(s, src)
				sortChordSites(s)
			}
		})
	}
}

// latticeSites returns n sites on a square lattice of step deg degrees
// centred on (lat, lon): training points crowded around one place.
func latticeSites(n int, lat, lon, deg float64) (lats, lons []float64) {
	k := int(math.Ceil(math.Sqrt(float64(n))))
	for i := range n {
		lons = append(lons, lon+(float64(i%k)-float64(k)/2+0.5)*deg)
		lats = append(lats, lat+(float64(i/k)-float64(k)/2+0.5)*deg)
	}
	return lats, lons
}

// denseGrid is the grid of the dense-cluster tests and benchmark: side x
// side cells of deg degrees whose north-west corner is (10 E, 50 N), and a
// lattice of n sites of one cell's step at its centre.
func denseGrid(tb testing.TB, n, side int, deg float64) (*Field, *geodesy.Index) {
	tb.Helper()
	north, west := 50.0, 10.0
	lats, lons := latticeSites(n, north-deg*float64(side)/2, west+deg*float64(side)/2, deg)
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		tb.Fatal(err)
	}
	return NewLonLat(ix, west, deg, north, -deg), ix
}

// TestDenseSitesHoldNearest checks denseSites, which keeps of a
// super-tile's many candidates (a dense lattice of sites) those that may be
// nearest to one of its cells: at every cell of every super-tile where it
// gives a list, the smallest geodesic to the sites kept is the exact
// distance of geodesy.Index.Nearest at the cell, bit for bit (an
// independent query over all sites), and the list is a small part of the
// candidates.
func TestDenseSitesHoldNearest(t *testing.T) {
	const side, deg = 240, 0.04
	f, ix := denseGrid(t, 400, side, deg)
	tiles, lists, kept, cands := holdsNearest(t, f, ix, side, side, func(b *bracketer, clat, clon float64, st *stencil, rho float64) []int {
		if !st.ok {
			t.Fatalf("super-tile at (%v, %v): no stencil", clat, clon)
		}
		if !b.denseSites(clat, clon, st, rho) {
			return nil
		}
		var ks []int
		for _, m := range b.measured {
			ks = append(ks, m.k)
		}
		return ks
	})
	t.Logf("%d super-tiles with more than %d candidates, %d with a list: %.1f sites kept of %.1f on average",
		tiles, maxCandidates, lists, float64(kept)/float64(lists), float64(cands)/float64(lists))
	if tiles < 200 || lists < tiles*3/4 || kept*10 > cands {
		t.Fatalf("%d super-tiles with many candidates, %d lists keeping %d of %d sites: not the dense case", tiles, lists, kept, cands)
	}
}

// holdsNearest calls keep at every super-tile of the w x h grid of f
// whose candidates (as Bracket finds them, in b.cands) are more than
// maxCandidates, and checks, at every cell of each super-tile where keep
// gives a list of sites (non-nil), that the smallest geodesic to them is
// the exact distance of ix.Nearest at the cell, bit for bit. It returns
// the number of such super-tiles, of lists, of sites kept and of
// candidates in the super-tiles with a list.
func holdsNearest(t *testing.T, f *Field, ix *geodesy.Index, w, h int, keep func(b *bracketer, clat, clon float64, st *stencil, rho float64) []int) (tiles, lists, kept, cands int) {
	t.Helper()
	ll := f.ll
	b := bracketer{f: f, ll: ll, sc: new(scratch)}
	for sr := 0; sr < h/SuperTile; sr++ {
		st := ll.stencil(SuperTile/2, sr)
		rho := st.tmax*1.02 + 1
		for sc := 0; sc < w/SuperTile; sc++ {
			cr, cc := sr*SuperTile+SuperTile/2, sc*SuperTile+SuperTile/2
			clat, clon := ll.lat(cr), ll.lon(cc)
			_, d1 := ix.NearestBounds(clat, clon, 0)
			b.cands = ix.Within(clat, clon, d1+2*rho, b.cands[:0])
			if len(b.cands) <= maxCandidates {
				continue
			}
			tiles++
			n := len(b.cands)
			ks := keep(&b, clat, clon, st, rho)
			if ks == nil {
				continue
			}
			lists++
			kept += len(ks)
			cands += n
			for r := sr * SuperTile; r < (sr+1)*SuperTile; r++ {
				for c := sc * SuperTile; c < (sc+1)*SuperTile; c++ {
					lat, lon := ll.lat(r), ll.lon(c)
					_, want := ix.Nearest(lat, lon, 0)
					got := math.Inf(1)
					for _, k := range ks {
						slat, slon := ix.Site(k)
						got = math.Min(got, geodesy.Distance(lat, lon, slat, slon))
					}
					if math.Float64bits(got) != math.Float64bits(want) {
						t.Fatalf("cell (%d, %d): %v over the %d sites kept of %d, Nearest %v", c, r, got, len(ks), n, want)
					}
				}
			}
		}
	}
	return tiles, lists, kept, cands
}

// farWindow is a window of cells and the sites of its Field.
type farWindow struct {
	name string
	f    *Field
	ix   *geodesy.Index
	w, h int
}

// farWindows returns side x side windows of 0.05-degree cells about
// 1,900, 10,000 and 17,000 km from a square and an elongated cluster of
// 300 sites.
func farWindows(t *testing.T, side int) []farWindow {
	var out []farWindow
	for _, g := range []struct {
		name           string
		west, north    float64
		sw, ss, se, sn float64
	}{
		{"1900km", 28, 40, 10, 45, 10.5, 45.5},
		{"10000km", 100, -4, 10, 45, 10.5, 45.5},
		{"17000km-long", -160, -20, 10, 45, 12, 45.1},
	} {
		lats, lons := clusteredSites(300, g.sw, g.ss, g.se, g.sn, 7)
		ix, err := geodesy.NewIndex(lats, lons)
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, farWindow{g.name, NewLonLat(ix, g.west, 0.05, g.north, -0.05), ix, side, side})
	}
	return out
}

// TestFarPruneHoldsNearest checks farPrune, which keeps of a super-tile's
// many candidates those that may be nearest to one of its cells from the
// bounds of its comparison theorems, at every super-tile of several grids
// where it gives a list: the dense lattice of TestDenseSitesHoldNearest
// (where the super-tiles lie near the sites), and windows of 0.05-degree
// cells about 1,900, 10,000 and 17,000 km from a square and an elongated
// cluster of 300 sites. At every cell the smallest geodesic to the sites
// kept is the exact distance of geodesy.Index.Nearest (an independent
// query over all sites) bit for bit, and on each grid it gives a list for
// most of the super-tiles with many candidates (our cut-off: half).
func TestFarPruneHoldsNearest(t *testing.T) {
	lattice, lix := denseGrid(t, 400, 240, 0.04)
	cases := append([]farWindow{{"lattice", lattice, lix, 240, 240}}, farWindows(t, 120)...)
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			tiles, lists, kept, cands := holdsNearest(t, tc.f, tc.ix, tc.w, tc.h, func(b *bracketer, clat, clon float64, st *stencil, rho float64) []int {
				if !b.farPrune(clat, clon, st, false) {
					return nil
				}
				return slices.Clone(b.cands)
			})
			t.Logf("%d super-tiles with more than %d candidates, %d with a list: %d sites kept of %d", tiles, maxCandidates, lists, kept, cands)
			if tiles == 0 || lists*2 < tiles {
				t.Fatalf("%d super-tiles with many candidates, %d lists: farPrune not at work", tiles, lists)
			}
		})
	}
}

// TestMacroHoldsNearest checks the macro-tiles' lists (macroCands): on
// windows of 0.05-degree cells about 1,900, 10,000 and 17,000 km from a
// cluster of 300 sites (where every super-tile has them all as
// candidates) and on the dense lattice of TestDenseSitesHoldNearest, at
// every cell of every macro-tile that has a list, the smallest geodesic to
// its sites is the exact distance of geodesy.Index.Nearest bit for bit;
// on the far windows at least half of the macro-tiles have one (our
// cut-off: the path is at work).
func TestMacroHoldsNearest(t *testing.T) {
	lattice, lix := denseGrid(t, 400, 270, 0.04)
	cases := append([]farWindow{{"lattice", lattice, lix, 270, 270}}, farWindows(t, 135)...)
	const side = macroP * SuperTile
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			b := bracketer{f: tc.f, ll: tc.f.ll, sc: &scratch{macroT: map[int]float64{}}}
			ll := tc.f.ll
			tiles, lists, kept := 0, 0, 0
			for mr := 0; mr < tc.h/side; mr++ {
				for mc := 0; mc < tc.w/side; mc++ {
					tiles++
					ks := b.macro(mr, mc)
					if ks == nil {
						continue
					}
					lists++
					kept += len(ks)
					if len(ks) > maxCandidates {
						t.Fatalf("macro-tile (%d, %d): %d sites", mr, mc, len(ks))
					}
					for r := mr * side; r < (mr+1)*side; r++ {
						for c := mc * side; c < (mc+1)*side; c++ {
							lat, lon := ll.lat(r), ll.lon(c)
							_, want := tc.ix.Nearest(lat, lon, 0)
							got := math.Inf(1)
							for _, k := range ks {
								slat, slon := tc.ix.Site(k)
								got = math.Min(got, geodesy.Distance(lat, lon, slat, slon))
							}
							if math.Float64bits(got) != math.Float64bits(want) {
								t.Fatalf("cell (%d, %d): %v over the %d sites of macro-tile (%d, %d), Nearest %v", c, r, got, len(ks), mr, mc, want)
							}
						}
					}
				}
			}
			t.Logf("%d macro-tiles, %d with a list, %d sites kept", tiles, lists, kept)
			if tc.name != "lattice" && lists*2 < tiles {
				t.Fatalf("%d of %d macro-tiles with a list", lists, tiles)
			}
		})
	}
}

// TestAntipodePruneHoldsNearest checks antipodePrune, which keeps of a
// super-tile's many candidates those that may be nearest to one of its
// cells from geodesics to each (round the antipodes of a dense cluster,
// where farPrune's bounds end), as TestFarPruneHoldsNearest checks
// farPrune: at every cell of windows of 30 arc-second and 2.5 arc-minute
// cells round the antipodes of a square and an elongated cluster of 300
// sites, the smallest geodesic to the sites kept is the exact distance of
// geodesy.Index.Nearest (an independent query over all sites) bit for bit.
// On the 2.5 arc-minute windows (5 degrees across) it gives a list for at
// least a quarter of the super-tiles with many candidates (our cut-off);
// the others, and all of the 30 arc-second window (one degree round the
// antipodes, on the sites' cut loci), take antipodeSites' list: there
// antipodePrune must keep its geodesics.
func TestAntipodePruneHoldsNearest(t *testing.T) {
	for _, g := range []struct {
		name           string
		deg            float64
		west, north    float64
		w, h           int
		sw, ss, se, sn float64
		minLists       float64
	}{
		{"square-2.5m", 1.0 / 24, -174.75, -40.25, 120, 120, 10, 45, 10.5, 45.5, 0.25},
		{"square-30s", 1.0 / 120, -170.5, -44.5, 120, 120, 10, 45, 10.5, 45.5, 0},
		{"long-2.5m", 1.0 / 24, -175, -42.5, 150, 60, 10, 45, 12, 45.1, 0.25},
	} {
		t.Run(g.name, func(t *testing.T) {
			lats, lons := clusteredSites(300, g.sw, g.ss, g.se, g.sn, 7)
			ix, err := geodesy.NewIndex(lats, lons)
			if err != nil {
				t.Fatal(err)
			}
			f := NewLonLat(ix, g.west, g.deg, g.north, -g.deg)
			withD := 0
			tiles, lists, kept, cands := holdsNearest(t, f, ix, g.w, g.h, func(b *bracketer, clat, clon float64, st *stencil, rho float64) []int {
				b.antiD = nil
				n := len(b.cands)
				if !b.antipodePrune(clat, clon, st) {
					if b.antiD != nil {
						if len(b.antiD) != n {
							t.Fatalf("%d geodesics kept for %d candidates", len(b.antiD), n)
						}
						withD++
					}
					return nil
				}
				return slices.Clone(b.cands)
			})
			t.Logf("%d super-tiles with more than %d candidates, %d with a list: %d sites kept of %d; %d left to antipodeSites", tiles, maxCandidates, lists, kept, cands, withD)
			if tiles == 0 || float64(lists) < g.minLists*float64(tiles) || lists+withD != tiles {
				t.Fatalf("%d super-tiles with many candidates, %d lists, %d left to antipodeSites", tiles, lists, withD)
			}
		})
	}
}

// TestBracketDenseLattice checks Bracket around a dense lattice of sites,
// where many super-tiles have more candidates than the anchors measure and
// their cells are computed exactly from denseSites' lists (the others
// take farPrune's few sites and are bracketed): against
// Distances (Index.Nearest's values bit for bit) as in
// TestBracketContainsDistance, the same brackets for several cuts into
// blocks, and the same under a need mask.
func TestBracketDenseLattice(t *testing.T) {
	const side, deg = 240, 0.04
	f, ix := denseGrid(t, 400, side, deg)
	want := make([]float64, side*side)
	New(ix, lonLatGrid(10, 50, deg)).Distances(0, 0, side, side, nil, want)
	layout := testLayout(t, want, f.FarthestBound(side, side, 16))
	need := make([]uint64, side*side)
	for i := range need {
		if i%7 != 2 {
			need[i] = 1
		}
	}
	var ref []float64
	for _, bs := range [][2]int{{side, side}, {60, 45}, {17, 23}} {
		for _, masked := range []bool{false, true} {
			lo, hi := make([]float64, side*side), make([]float64, side*side)
			var mask []uint64
			if masked {
				mask = need
			}
			walkTiles(side, side, bs[0], bs[1], mask, [][]float64{lo, hi}, func(x0, y0, w, h int, n []uint64, bufs [][]float64) {
				f.Bracket(x0, y0, w, h, n, layout, bufs[0], bufs[1])
			})
			exact := checkBrackets(t, fmt.Sprintf("blocks %v masked %v", bs, masked), want, lo, hi, mask, layout)
			if masked {
				for i := range lo {
					if need[i] != 0 && (math.Float64bits(lo[i]) != math.Float64bits(ref[i]) || math.Float64bits(hi[i]) != math.Float64bits(ref[i+len(lo)])) {
						t.Fatalf("blocks %v masked: bracket of cell %d differs from the one-block cut", bs, i)
					}
				}
				continue
			}
			t.Logf("blocks %v: %d of %d cells exact", bs, exact, len(want))
			if exact < len(want)/10 {
				t.Fatalf("blocks %v: %d of %d cells exact: not the dense case", bs, exact, len(want))
			}
			key := append(append([]float64{}, lo...), hi...)
			if ref == nil {
				ref = key
				continue
			}
			for i := range key {
				if math.Float64bits(key[i]) != math.Float64bits(ref[i]) {
					t.Fatalf("blocks %v: bracket of cell %d differs from the one-block cut", bs, i%len(lo))
				}
			}
		}
	}
}

// BenchmarkFieldBracketDense is BenchmarkFieldBracket around a dense
// cluster: a lattice of 1,000 and 4,000 sites one cell apart at the centre
// of a grid of 2048 x 2048 cells of 0.005 degrees, where most super-tiles
// have hundreds of candidates and most cells are computed exactly (one
// geodesic each, from denseSites' few sites, where the index's query took
// more).
func BenchmarkFieldBracketDense(b *testing.B) {
	const side, deg = 2048, 0.005
	for _, sites := range []int{1000, 4000} {
		f, ix := denseGrid(b, sites, side, deg)
		// presence-like layout values: the distances at the sites' cells
		var vals []float64
		for k := range ix.Len() {
			lat, lon := ix.Site(k)
			_, d := ix.Nearest(50-(math.Floor((50-lat)/deg)+0.5)*deg, 10+(math.Floor((lon-10)/deg)+0.5)*deg, 0)
			vals = append(vals, -d)
		}
		far := f.FarthestBound(side, side, 64)
		l, err := metrics.NewLayout(vals, 4096, metrics.WithHistFloor(metrics.FloorExp(far/4096)))
		if err != nil {
			b.Fatal(err)
		}
		layout := newFloorBins(l)
		b.Run(fmt.Sprintf("sites=%d/cells=%d", sites, side*side), func(b *testing.B) { benchBracket(b, f, side, side, layout) })
	}
}

// TestSiteFansPerIndex checks that siteFans, kept in pooled scratch that
// Fields of different training points share, never hands one Index's
// geodesics to another: after a fan of site 0 of one Index is filled, the
// fan of site 0 of another (the same number of sites, elsewhere) is fresh
// and its geodesics are its own (PROJ's, via geodesy.Inverse).
func TestSiteFansPerIndex(t *testing.T) {
	latsA, lonsA := clusteredSites(20, 10, 45, 10.5, 45.5, 1)
	latsB, lonsB := clusteredSites(20, -70, -30, -69.5, -29.5, 2)
	ixA, errA := geodesy.NewIndex(latsA, lonsA)
	ixB, errB := geodesy.NewIndex(latsB, lonsB)
	if errA != nil || errB != nil {
		t.Fatal(errA, errB)
	}
	var fs siteFans
	a0lat, a0lon := ixA.Site(0)
	fanA := fs.fan(ixA, 0)
	pairAt(ixA, fanA, a0lat, a0lon, 5)
	fanB := fs.fan(ixB, 0)
	if c := ixB.Slot(5) / fanChunk; len(fanB.chunks)*fanChunk < ixB.Len() || fanB.chunks[c] != nil {
		t.Fatalf("fan of another Index: %d chunks (want room for %d sites), the chunk of site 5 made %v (want none yet)", len(fanB.chunks), ixB.Len(), fanB.chunks[c] != nil)
	}
	b0lat, b0lon := ixB.Site(0)
	k5lat, k5lon := ixB.Site(5)
	want, _, _ := geodesy.Inverse(b0lat, b0lon, k5lat, k5lon)
	if got := pairAt(ixB, fanB, b0lat, b0lon, 5).d; got != want {
		t.Fatalf("geodesic from site 0 to 5 of the second Index: %v, want %v", got, want)
	}
	if again := fs.fan(ixB, 0); &again.chunks[0] != &fanB.chunks[0] || again.at(5).d != want {
		t.Fatal("the fan of the same Index and site was made again")
	}
}

// TestSiteFansChunks checks the fan's chunks: a site's geodesic is made
// once, in its own chunk, beside the NaN of the chunk's sites not asked
// for; the entries held are counted, and past fanLimit the next new fan
// starts a fresh cache while the fans handed out keep their geodesics.
func TestSiteFansChunks(t *testing.T) {
	lats, lons := clusteredSites(3*fanChunk+5, 10, 45, 12, 47, 3)
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		t.Fatal(err)
	}
	var fs siteFans
	alat, alon := ix.Site(0)
	fan := fs.fan(ix, 0)
	if got, want := len(fan.chunks), 4; got != want {
		t.Fatalf("%d chunks for %d sites, want %d", got, ix.Len(), want)
	}
	// The site in tree slot 2 fanChunk + 3: chunk 2, entry 3.
	k := -1
	for i := range ix.Len() {
		if ix.Slot(i) == 2*fanChunk+3 {
			k = i
		}
	}
	klat, klon := ix.Site(k)
	want, _, _ := geodesy.Inverse(alat, alon, klat, klon)
	if got := pairAt(ix, fan, alat, alon, k).d; got != want {
		t.Fatalf("geodesic to site %d: %v, want %v", k, got, want)
	}
	for c, ch := range fan.chunks {
		if (ch != nil) != (c == 2) {
			t.Fatalf("chunk %d made %v; only chunk 2 should be", c, ch != nil)
		}
	}
	if !math.IsNaN(fan.chunks[2][4].d) || fan.chunks[2][3].d != want || fan.at(k).d != want {
		t.Fatalf("chunk 2: entry 4 %v (want NaN), entry 3 %v (want %v)", fan.chunks[2][4].d, fan.at(k).d, want)
	}
	if got := *fs.n; got != 4+fanChunk {
		t.Fatalf("%d entries counted, want %d", got, 4+fanChunk)
	}
	*fs.n = fanLimit + 1
	held := fs.n
	fresh := fs.fan(ix, 1)
	if fs.n == held || *fs.n != len(fresh.chunks) {
		t.Fatalf("past the limit: counter kept (%v) or counts %d, want %d", fs.n == held, *fs.n, len(fresh.chunks))
	}
	if fan.at(k).d != want {
		t.Fatal("a fan handed out lost its geodesic when the cache started afresh")
	}
}

// BenchmarkFieldBracketAntipode measures Bracket on windows of 480 x 480
// cells centred on the antipode of a dense cluster (300 sites within 0.6
// degrees round 10 N, 20 E): 30 arc-second and 2.5 arc-minute cells, where
// every site lies more than 19,000 km away and the cells within about
// 150 km of the antipodes lie where the comparison bounds end (the sites'
// cut loci). CPU ns per cell and the share of cells computed exactly.
func BenchmarkFieldBracketAntipode(b *testing.B) {
	lats, lons := clusteredSites(300, 19.7, 9.7, 20.3, 10.3, 11)
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		b.Fatal(err)
	}
	const side = 480
	for _, tc := range []struct {
		name string
		deg  float64
	}{{"30s", 1.0 / 120}, {"2.5m", 1.0 / 24}} {
		half := float64(side/2) * tc.deg
		f := NewLonLat(ix, -160-half, tc.deg, -10+half, -tc.deg)
		var vals []float64
		for i := range lats {
			_, d := ix.Nearest(lats[i], lons[i]+0.3, 0)
			vals = append(vals, -d)
		}
		l, err := metrics.NewLayout(vals, 4096, metrics.WithHistFloor(metrics.FloorExp(2.1e7/4096)))
		if err != nil {
			b.Fatal(err)
		}
		b.Run(tc.name, func(b *testing.B) { benchBracket(b, f, side, side, newFloorBins(l)) })
	}
}
