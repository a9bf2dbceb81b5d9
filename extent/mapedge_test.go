package extent

import (
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"areasweep/extent/gdalmsg"
	"areasweep/extent/vocab"
)

// TestMapEdgeCells: the area of cells that the outline of a world map
// cuts (Mollweide, Equal Earth) is the true area of their part on the
// map, as testdata/geodesy/map_edge_cells.py computes it with pyproj
// without any outline polygon (rerun by CI). Tolerance: 2e-5 of the
// whole cell, the bound of the outline's tolerance (outlineRelTol, 1e-5
// of the cell side, times the outline's length in the cell; our choice).
// Before this, each of them had its whole planar area (10,000 km2).
func TestMapEdgeCells(t *testing.T) {
	cells := readCellGolden(t, "map_edge_cells.txt")
	n := 0
	for name, tc := range cells {
		if tc.w == 0 {
			continue // the whole ellipsoid, for TestMapEdgeWholeMap
		}
		n++
		t.Run(name, func(t *testing.T) {
			_, g := cells.grid(t, name)
			defer g.Close()
			got := g.RowAreasRange(tc.r, tc.c, tc.c+1, nil)[0]
			if math.Abs(got-tc.want) > 2e-5*tc.planar {
				t.Errorf("cell (%d, %d): %.6f km2, pyproj gives %.6f (off by %.2g of the cell)", tc.c, tc.r, got, tc.want, (got-tc.want)/tc.planar)
			}
			if g.RowCellsEqual(tc.r, 0, g.Width) {
				t.Errorf("row %d holds a cut cell but RowCellsEqual says its cells are equal", tc.r)
			}
		})
	}
	if n < 8 {
		t.Fatalf("%d cut cells in the golden file, want 8", n)
	}
}

// TestMapEdgeWholeMap: the surface each projection maps: the planar area
// inside PROJ's outline is that of the sphere of WGS84's semi-major axis,
// 4 pi a^2, on Mollweide (which PROJ computes on that sphere; 0.22% more
// than the ellipsoid), and the WGS84 ellipsoid's on Equal Earth and the
// sinusoidal (computed on the ellipsoid), within 1e-6 (our choice). Then,
// on grids that cover the whole map, the areas of every cell that has a
// part on the map (cut cells at that part) add up to the area of the
// WGS84 ellipsoid (pyproj, map_edge_cells.txt's last line) within 1e-6
// (our choice; measured 1.1e-7 on Mollweide's 100 km grid, 2.6e-8 on
// Equal Earth's, 4.9e-7 on 250 km cells: the outline's chords lie inside
// the curve, by up to the tolerance, 1e-5 of the cell side), where the
// whole cells alone made it 0.7% to 2.6% too large on such coarse grids.
// Also: the cut cells lie between nothing and a whole cell, and the rows
// they lie in are the ones RowCellsEqual says are not equal.
func TestMapEdgeWholeMap(t *testing.T) {
	want := readCellGolden(t, "map_edge_cells.txt")["whole WGS84 ellipsoid"].want
	if !(want > 5e8) {
		t.Fatal("no whole-ellipsoid line in map_edge_cells.txt")
	}
	for _, tc := range []struct {
		name   string
		crs    string
		gt     [6]float64
		w, h   int
		sphere bool // the planar map is of the sphere of radius a
	}{
		{"Mollweide 100 km", "ESRI:54009", [6]float64{-18100000, 100000, 0, 9100000, 0, -100000}, 362, 182, true},
		{"Mollweide 250 km, off-centre", "ESRI:54009", [6]float64{-18170000, 250000, 0, 9130000, 0, -250000}, 146, 74, true},
		{"Equal Earth 100 km", "EPSG:8857", [6]float64{-17300000, 100000, 0, 8400000, 0, -100000}, 346, 168, false},
		{"sinusoidal 100 km", "ESRI:54008", [6]float64{-20100000, 100000, 0, 10100000, 0, -100000}, 402, 202, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			g, err := NewGrid(tc.w, tc.h, tc.gt, tc.crs)
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			xs, ys, _, ok := g.worldOutline()
			if !ok || g.edges == nil {
				t.Fatal("no outline for a grid covering the whole map")
			}
			surface := want
			if tc.sphere {
				surface = 4 * math.Pi * 6378.137 * 6378.137
			}
			planar := ringArea(xs, ys) / 1e6
			if math.Abs(planar/surface-1) > 1e-6 {
				t.Errorf("the outline holds %.3f km2 of the plane, the surface it maps %.3f", planar, surface)
			}
			sum, whole := 0.0, 0.0
			var areas []float64
			for r := 0; r < g.Height; r++ {
				areas = g.RowAreas(r, areas)
				full := g.wholeCellArea(r)
				_, yc := g.Centre(0, r)
				cross := ringCrossings(xs, ys, yc)
				cut := false
				for c, a := range areas {
					x, _ := g.Centre(c, r)
					if g.edges.cut(r, c, c+1) {
						cut = true
						if !(a > 0 && a < full) {
							t.Fatalf("cut cell (%d, %d) has %g km2, whole cells %g", c, r, a, full)
						}
						sum += a
						whole += full
					} else if insideCrossings(cross, x) {
						if a != full {
							t.Fatalf("whole cell (%d, %d) has %g km2, not its planar %g", c, r, a, full)
						}
						sum += a
						whole += a
					}
				}
				if g.RowCellsEqual(r, 0, g.Width) == cut {
					t.Fatalf("row %d: RowCellsEqual %v with cut cells %v", r, !cut, cut)
				}
			}
			t.Logf("outline %.3f km2 (%.2g off the surface it maps), cells on the map %.3f km2 (%.2g off the ellipsoid), whole cells %.2g over",
				planar, planar/surface-1, sum, sum/want-1, whole/want-1)
			if rel := sum/want - 1; math.Abs(rel) > 1e-6 {
				t.Errorf("cells on the map add up to %.3f km2, the ellipsoid's %.3f (%.2g off)", sum, want, rel)
			}
			if rel := whole/want - 1; rel < 1e-4 {
				t.Errorf("whole cells add up to %.3f km2, only %.2g over the ellipsoid: the test does not see the cut", whole, rel)
			}
		})
	}
}

// ringCrossings returns the sorted x where the ring (xs, ys) crosses the
// line at height y.
func ringCrossings(xs, ys []float64, y float64) []float64 {
	var out []float64
	for i := range xs {
		j := (i + 1) % len(xs)
		if (ys[i] > y) != (ys[j] > y) {
			out = append(out, xs[i]+(y-ys[i])*(xs[j]-xs[i])/(ys[j]-ys[i]))
		}
	}
	slices.Sort(out)
	return out
}

// insideCrossings reports whether x lies inside by the even-odd rule.
func insideCrossings(cross []float64, x float64) bool {
	i, _ := slices.BinarySearch(cross, x)
	return i%2 == 1
}

// TestMapEdgeOutline: the polygonal outline of the Mollweide map lies
// within its tolerance of the map's closed form, the ellipse x^2/(2 sqrt2
// a)^2 + y^2/(sqrt2 a)^2 = 1 (a the semi-major axis; from memory: the
// Mollweide map of the sphere of radius a), at its vertices and at the
// middle of every edge; and Equal Earth's, of PROJ's transform of points
// along the meridian 180 between its own (1,000 latitudes).
func TestMapEdgeOutline(t *testing.T) {
	g, err := NewGrid(362, 182, [6]float64{-18100000, 100000, 0, 9100000, 0, -100000}, "ESRI:54009")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	xs, ys, tol, ok := g.worldOutline()
	if !ok {
		t.Fatal("no outline")
	}
	if tol != 1 {
		t.Fatalf("tolerance %g m on 100 km cells, want 1 m", tol)
	}
	A, B := 2*math.Sqrt2*6378137, math.Sqrt2*6378137
	// Distance to the ellipse, to first order: |F - 1| / |grad F|.
	dist := func(x, y float64) float64 {
		f := x*x/(A*A) + y*y/(B*B) - 1
		return math.Abs(f) / math.Hypot(2*x/(A*A), 2*y/(B*B))
	}
	worst := 0.0
	for i := range xs {
		j := (i + 1) % len(xs)
		// PROJ's Mollweide stops its iteration near the poles a little
		// early (the pole comes out 113 m off the central meridian):
		// measured away from the tips' 0.01 degree.
		if math.Abs(ys[i]) > B-1 || math.Abs(ys[j]) > B-1 {
			continue
		}
		worst = math.Max(worst, math.Max(dist(xs[i], ys[i]), dist((xs[i]+xs[j])/2, (ys[i]+ys[j])/2)))
	}
	if worst > tol {
		t.Errorf("Mollweide outline up to %.3g m from the ellipse, tolerance %g m", worst, tol)
	}
	t.Logf("Mollweide: %d points, up to %.3g m from the ellipse (tolerance %g m)", len(xs), worst, tol)

	e, err := NewGrid(346, 168, [6]float64{-17300000, 100000, 0, 8400000, 0, -100000}, "EPSG:8857")
	if err != nil {
		t.Fatal(err)
	}
	defer e.Close()
	xs, ys, tol, ok = e.worldOutline()
	if !ok {
		t.Fatal("no Equal Earth outline")
	}
	lons, lats := make([]float64, 1000), make([]float64, 1000)
	for i := range lats {
		lons[i], lats[i] = 180, -90+180*(float64(i)+0.5)/1000
	}
	px, py := make([]float64, 1000), make([]float64, 1000)
	e.FromLonLat(lons, lats, px, py)
	worst = 0
	for i := range px {
		best := math.Inf(1)
		for k := range xs {
			l := (k + 1) % len(xs)
			best = math.Min(best, chordDistance(xs[k], ys[k], xs[l], ys[l], px[i], py[i]))
		}
		worst = math.Max(worst, best)
	}
	if worst > tol {
		t.Errorf("Equal Earth outline up to %.3g m from PROJ's meridian 180, tolerance %g m", worst, tol)
	}
	t.Logf("Equal Earth: %d points, up to %.3g m from PROJ's meridian (tolerance %g m)", len(xs), worst, tol)
}

// TestMapEdgeNone: grids no world map's outline crosses keep every cell's
// planar area bit for bit and equal rows: LAEA Europe (EPSG:3035, an
// azimuthal projection with no such outline), a Mollweide grid over
// Africa (inside the map), the EASE-Grid 2.0 global grid (EPSG:6933,
// whose edges are the map's to 5 mm: within the snap), and Goode's
// interrupted homolosine (not handled: its outline has gaps).
func TestMapEdgeNone(t *testing.T) {
	forGrids(t, []gridCase{
		{"LAEA Europe", "EPSG:3035", [6]float64{1000000, 10000, 0, 6000000, 0, -10000}, 500, 500},
		{"Mollweide over Africa", "ESRI:54009", [6]float64{-2000000, 10000, 0, 4000000, 0, -10000}, 500, 800},
		{"EASE-Grid 2.0 global", "EPSG:6933", [6]float64{-17367530.45, 25025.26, 0, 7314540.83, 0, -25025.26}, 1388, 584},
		{"Goode homolosine", "ESRI:54052", [6]float64{-20100000, 100000, 0, 9100000, 0, -100000}, 402, 182},
	}, func(t *testing.T, g *Grid) {
		if g.edges != nil {
			t.Fatalf("%d cut cells", len(g.edges.cols))
		}
		var areas []float64
		for r := 0; r < g.Height; r++ {
			areas = g.RowAreas(r, areas)
			want := math.Abs(g.GeoTransform[1]*g.GeoTransform[5]) * g.areaScale(r) / 1e6
			for c, a := range areas {
				if math.Float64bits(a) != math.Float64bits(want) {
					t.Fatalf("cell (%d, %d): %v km2, planar %v", c, r, a, want)
				}
			}
			if !g.RowCellsEqual(r, 0, g.Width) {
				t.Fatalf("row %d not equal", r)
			}
		}
	})
}

// TestTrapezoidStrip: the area of a trapezoid between two columns, worked
// by hand.
func TestTrapezoidStrip(t *testing.T) {
	for _, tc := range []struct {
		name                           string
		hgt, l0, l1, r0, r1, xa, xb, w float64
	}{
		{"rectangle inside the strip", 2, 1, 1, 3, 3, 0, 10, 4},
		{"strip inside the rectangle", 2, 0, 0, 10, 10, 1, 3, 4},
		{"disjoint", 1, 0, 0, 1, 1, 2, 3, 0},
		// right side from x=0 at the bottom to x=2 at the top, strip 1..3:
		// the triangle above x=1, of base 1 and height 1/2.
		{"slanted side", 1, -5, -5, 0, 2, 1, 3, 0.25},
		// triangle (0,0),(2,0),(0,2) cut at x=1: 2 - 1/2.
		{"triangle cut", 2, 0, 0, 2, 0, 0, 1, 1.5},
	} {
		if got := trapezoidStrip(tc.hgt, tc.l0, tc.l1, tc.r0, tc.r1, tc.xa, tc.xb); math.Abs(got-tc.w) > 1e-12 {
			t.Errorf("%s: %g, want %g", tc.name, got, tc.w)
		}
	}
}

// TestMapEdgeExtentArea: an extent's area (finish's measure, which adds a
// row of whole cells by repeatAdd) is bit for bit the sum of its cells'
// areas one by one in cell order, on a Mollweide grid of the whole map:
// the whole grid, a band of columns across the map's east edge, and runs
// of whole cells alone on rows the outline cuts. (It fails when measure
// takes one area for every cell of a row the outline cuts.)
func TestMapEdgeExtentArea(t *testing.T) {
	g, err := NewGrid(362, 182, [6]float64{-18100000, 100000, 0, 9100000, 0, -100000}, "ESRI:54009")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	members := []Member{{ID: "whole", Status: vocab.StatusOK}, {ID: "east", Status: vocab.StatusOK}, {ID: "inner", Status: vocab.StatusOK}}
	f := NewFamilyFromRuns(g, members, func(k, row int) []int32 {
		switch k {
		case 0:
			return []int32{0, int32(g.Width)}
		case 1:
			return []int32{300, int32(g.Width)}
		}
		return []int32{171, 191}
	})
	f.Clip(NewValidFunc(g.Width, g.Height, func(int) bool { return true }), nil, nil)
	for k, m := range f.Members {
		want := 0.0
		var areas []float64
		for r := 0; r < g.Height; r++ {
			runs := []int32{0, int32(g.Width)}
			switch k {
			case 1:
				runs = []int32{300, int32(g.Width)}
			case 2:
				runs = []int32{171, 191}
			}
			areas = g.RowAreasRange(r, int(runs[0]), int(runs[1]), areas)
			for _, a := range areas {
				want += a
			}
		}
		if math.Float64bits(m.AreaKm2) != math.Float64bits(want) {
			t.Errorf("%s: area %.9f km2, its cells add up to %.9f", m.ID, m.AreaKm2, want)
		}
	}
	whole := 0.0
	for r := 0; r < g.Height; r++ {
		whole += float64(g.Width) * g.wholeCellArea(r)
	}
	if a, b := f.Members[0].AreaKm2, whole; !(a < b) {
		t.Errorf("whole grid %.0f km2, not less than its whole cells' %.0f", a, b)
	}
}

// TestMapEdgeOffMap checks that ToLonLat gives no position (NaN) to the
// centres of cells beyond a world map's outline, which PROJ's inverse
// wraps onto the other side of the Earth on Equal Earth and the
// sinusoidal map (Mollweide's fails by itself), and the same position as
// the plain transformation, bit for bit, to every centre inside it; the
// centres within 1 km of the outline (where the ring's tolerance could
// decide) are not asked. The outline is the one TestMapEdgeOutline checks.
func TestMapEdgeOffMap(t *testing.T) {
	forGrids(t, []gridCase{
		{"Mollweide 100 km", "ESRI:54009", [6]float64{-18100000, 100000, 0, 9100000, 0, -100000}, 362, 182},
		{"Equal Earth 100 km", "EPSG:8857", [6]float64{-17300000, 100000, 0, 8400000, 0, -100000}, 346, 168},
		{"sinusoidal 100 km", "ESRI:54008", [6]float64{-20100000, 100000, 0, 10100000, 0, -100000}, 402, 202},
	}, func(t *testing.T, g *Grid) {
		xs, ys, _, ok := g.worldOutline()
		if !ok || g.edges == nil {
			t.Fatal("no outline")
		}
		lons, lats := make([]float64, g.Width), make([]float64, g.Width)
		plon, plat := make([]float64, g.Width), make([]float64, g.Width)
		in, off, wrapped := 0, 0, 0
		for r := 0; r < g.Height; r++ {
			g.RowLonLat(r, lons, lats)
			for c := range plon {
				plon[c], plat[c] = g.Centre(c, r)
			}
			g.transform(g.toLL, plon, plat)
			_, yc := g.Centre(0, r)
			cross := ringCrossings(xs, ys, yc)
			for c := range lons {
				x, _ := g.Centre(c, r)
				near := false
				for _, xc := range cross {
					near = near || math.Abs(x-xc) < 1000
				}
				if near {
					continue
				}
				if insideCrossings(cross, x) {
					in++
					if math.Float64bits(lons[c]) != math.Float64bits(plon[c]) || math.Float64bits(lats[c]) != math.Float64bits(plat[c]) {
						t.Fatalf("cell (%d, %d) on the map: (%v, %v), the transformation gives (%v, %v)", c, r, lons[c], lats[c], plon[c], plat[c])
					}
					continue
				}
				off++
				if !math.IsNaN(plon[c]) {
					wrapped++
				}
				if !math.IsNaN(lons[c]) || !math.IsNaN(lats[c]) {
					t.Fatalf("cell (%d, %d) off the map at (%v, %v): given (%v, %v)", c, r, x, yc, lons[c], lats[c])
				}
			}
		}
		t.Logf("%d cells on the map, %d off it (%d of them given a position by PROJ's inverse)", in, off, wrapped)
		if in == 0 || off == 0 {
			t.Fatal("the grid must hold cells on and off the map")
		}
	})
}

// gridCase is a grid of the map-edge tests: a name, a CRS, a geotransform
// and a size.
type gridCase struct {
	name string
	crs  string
	gt   [6]float64
	w, h int
}

// forGrids runs fn, as a subtest named after it, on each grid of cases.
func forGrids(t *testing.T, cases []gridCase, fn func(t *testing.T, g *Grid)) {
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			g, err := NewGrid(tc.w, tc.h, tc.gt, tc.crs)
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			fn(t, g)
		})
	}
}

// TestMapEdgeInnerRuns: ToLonLat, which checks only the points outside
// the runs of cells wholly on the map (mapEdges.setInner), gives every
// point what checking them all gives, bit for bit: 20,000 random points
// over each grid and a margin beyond it, and every cell centre. The grids
// are those of TestMapEdgeOffMap and an EASE-Grid 2.0 global map whose
// columns end exactly on the map's vertical edges (there the outline runs
// along column edges and cuts no cell, so the runs must be parted by the
// cells beside it). At least 90% of the cells on the map must be spared
// the check, or the runs do not do their job.
func TestMapEdgeInnerRuns(t *testing.T) {
	const easeX, easeY = 17367530.445161372, 7314540.830638504 // EPSG:6933's extent (PROJ, from memory; the grid only needs its x to hold)
	forGrids(t, []gridCase{
		{"Mollweide 100 km", "ESRI:54009", [6]float64{-18100000, 100000, 0, 9100000, 0, -100000}, 362, 182},
		{"Equal Earth 100 km", "EPSG:8857", [6]float64{-17300000, 100000, 0, 8400000, 0, -100000}, 346, 168},
		{"sinusoidal 100 km", "ESRI:54008", [6]float64{-20100000, 100000, 0, 10100000, 0, -100000}, 402, 202},
		{"EASE-Grid 2.0 edges on columns", "EPSG:6933", [6]float64{-easeX - 5*easeX/100, easeX / 100, 0, easeY + 123456, 0, -easeX / 100}, 210, 90},
	}, func(t *testing.T, g *Grid) {
		if g.edges == nil {
			t.Fatal("no map edges")
		}
		rng := rand.New(rand.NewPCG(11, 12)) // our choice of seed
		gt := g.GeoTransform
		wx, wy := float64(g.Width)*gt[1], float64(g.Height)*-gt[5]
		var xs, ys []float64
		for range 20000 {
			xs = append(xs, gt[0]-0.05*wx+1.1*wx*rng.Float64())
			ys = append(ys, gt[3]+0.05*wy-1.1*wy*rng.Float64())
		}
		spared, on := 0, 0
		for r := 0; r < g.Height; r++ {
			for c := 0; c < g.Width; c++ {
				x, y := g.Centre(c, r)
				xs, ys = append(xs, x), append(ys, y)
			}
		}
		lons, lats := make([]float64, len(xs)), make([]float64, len(xs))
		g.ToLonLat(xs, ys, lons, lats)
		rlon, rlat := slices.Clone(xs), slices.Clone(ys)
		g.transform(g.toLL, rlon, rlat)
		g.dropOffMap(xs, ys, rlon, rlat, nil, new(offMapScratch))
		for i := range xs {
			if math.Float64bits(lons[i]) != math.Float64bits(rlon[i]) && !(math.IsNaN(lons[i]) && math.IsNaN(rlon[i])) ||
				math.Float64bits(lats[i]) != math.Float64bits(rlat[i]) && !(math.IsNaN(lats[i]) && math.IsNaN(rlat[i])) {
				t.Fatalf("point (%v, %v): (%v, %v), checking every point gives (%v, %v)", xs[i], ys[i], lons[i], lats[i], rlon[i], rlat[i])
			}
			if i >= 20000 && !math.IsNaN(rlon[i]) {
				on++
				if g.edges.surelyOnMap(&g.GeoTransform, g.Width, g.Height, xs[i], ys[i]) {
					spared++
				}
			}
		}
		t.Logf("%d of %d cells on the map spared the check", spared, on)
		if on == 0 || float64(spared) < 0.9*float64(on) {
			t.Errorf("%d of %d cells on the map spared the check, want 90%% or more", spared, on)
		}
	})
}

// TestCutCellsInnerRuns: every run of cells cutCells leaves for
// setInner to judge lies wholly on one side of the outline (each cell
// centre of it by the even-odd rule), on outlines whose vertical edges
// run exactly along column edges (where they cut no cell: without a cell
// either side marked, a row's run spans both sides) and on slanted and
// curved ones.
func TestCutCellsInnerRuns(t *testing.T) {
	circle := func(n int, cx, cy, r float64) (xs, ys []float64) {
		for i := range n {
			a := 2 * math.Pi * float64(i) / float64(n)
			xs, ys = append(xs, cx+r*math.Cos(a)), append(ys, cy+r*math.Sin(a))
		}
		return xs, ys
	}
	cx, cy := circle(200, 20, 15, 12.3)
	for _, tc := range []struct {
		name   string
		xs, ys []float64
	}{
		{"vertical edges on column edges", []float64{2, 8, 8, 2}, []float64{1.5, 1.5, 9.5, 9.5}},
		{"a notch along column edges", []float64{2, 5, 5, 6, 6, 8, 8, 2}, []float64{1.5, 1.5, 7.5, 7.5, 1.5, 1.5, 9.5, 9.5}},
		{"slanted", []float64{1.2, 8.7, 6.1}, []float64{0.7, 2.2, 9.6}},
		{"circle", cx, cy},
	} {
		t.Run(tc.name, func(t *testing.T) {
			w, h := 40, 30
			if len(tc.xs) < 100 {
				w, h = 10, 10
			}
			gt := [6]float64{0, 1, 0, float64(h), 0, -1}
			e := cutCells(gt, w, h, tc.xs, tc.ys, 1e-9)
			if e == nil {
				t.Fatal("no cut cells")
			}
			inside := 0
			for r := 0; r < h; r++ {
				yc := float64(h) - float64(r) - 0.5
				cross := ringCrossings(tc.xs, tc.ys, yc)
				for _, run := range e.inner[e.innerOff[r]:e.innerOff[r+1]] {
					first := insideCrossings(cross, float64(run[0])+0.5)
					for c := run[0]; c < run[1]; c++ {
						if insideCrossings(cross, float64(c)+0.5) != first {
							t.Fatalf("row %d: run [%d, %d) holds cells on both sides of the outline", r, run[0], run[1])
						}
					}
					if first {
						inside++
					}
				}
			}
			if inside == 0 {
				t.Fatal("no run inside the outline")
			}
		})
	}
}

// TestMapOutlineProbeQuiet: looking for a world map's outline traces the
// meridian lon0 + 180 through the antipode of an azimuthal projection's
// centre, off its map: PROJ's message for that point reached run.log as
// "library error: PROJ could not transform a point lying off the map of
// its CRS" on every run on an LAEA Europe grid (EPSG:3035), where no cell
// is off the map. The probe's expected failures are now forgotten; other
// messages, and those recorded before it, are kept.
func TestMapOutlineProbeQuiet(t *testing.T) {
	gdalmsg.Install()
	gdalmsg.Drain()
	gdalmsg.Record(gdalmsg.Failure, 1, "Point outside of projection domain") // before: kept
	// An origin no other test uses, so that the outline is not cached.
	g, err := NewGrid(300, 300, [6]float64{4000123, 5000, 0, 3500000, 0, -5000}, "EPSG:3035")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	msgs, _ := gdalmsg.Drain()
	if lines := gdalmsg.Lines(msgs); len(lines) != 1 || lines[0] != "library error: "+gdalmsg.OffDomain {
		t.Errorf("messages after opening an LAEA Europe grid: %q, want only the one recorded before", lines)
	}
	// The probe does meet the antipode: transformed directly, it fails
	// and its message is recorded.
	xs, ys := []float64{10 - 180}, []float64{-52}
	g.FromLonLat(xs, ys, xs, ys)
	msgs, _ = gdalmsg.Drain()
	if !math.IsNaN(xs[0]) || len(msgs) == 0 || !strings.HasPrefix(gdalmsg.Cause(msgs[0].Text), gdalmsg.OffDomain) {
		t.Errorf("the antipode of LAEA Europe's centre: (%v, %v), messages %v", xs[0], ys[0], msgs)
	}
}
