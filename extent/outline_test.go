package extent

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/airbusgeo/godal"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/encoding/wkb"
)

// polygonizeReference outlines member k the way GIS software does: the
// member is burnt into an in-memory Byte raster and GDAL's Polygonize
// (4-connected) traces it; the result is the union of its polygons.
func polygonizeReference(t *testing.T, f *Family, k int) *godal.Geometry {
	t.Helper()
	g := f.Grid
	ds, err := godal.Create(godal.Memory, "", 1, godal.Byte, g.Width, g.Height)
	if err != nil {
		t.Fatal(err)
	}
	defer ds.Close()
	if err := ds.SetGeoTransform(g.GeoTransform); err != nil {
		t.Fatal(err)
	}
	band := ds.Bands()[0]
	if err := f.fillMemberBand(band, k); err != nil {
		t.Fatal(err)
	}
	if err := band.SetNoData(0); err != nil {
		t.Fatal(err)
	}
	vds, err := godal.CreateVector(godal.Memory, "")
	if err != nil {
		t.Fatal(err)
	}
	defer vds.Close()
	layer, err := vds.CreateLayer("cells", nil, godal.GTPolygon)
	if err != nil {
		t.Fatal(err)
	}
	if err := band.Polygonize(layer); err != nil {
		t.Fatal(err)
	}
	var union *godal.Geometry
	layer.ResetReading()
	for ft := layer.NextFeature(); ft != nil; ft = layer.NextFeature() {
		gm := ft.Geometry()
		if union == nil {
			union = gm
		} else if union, err = union.Union(gm); err != nil {
			t.Fatal(err)
		}
	}
	return union
}

// TestOutlineMatchesPolygonize: outlines traced from runs enclose the same
// area as GDAL's Polygonize of the same cells (symmetric difference of
// zero area), are valid geometries by GEOS, hold exactly the member's
// cells, and have one polygon per 4-connected group of cells. Members are
// random blobs with holes, islands in holes, diagonal contacts and cells
// on the grid's edges (by construction).
func TestOutlineMatchesPolygonize(t *testing.T) {
	Register()
	g, err := NewGrid(40, 30, [6]float64{10, 0.5, 0, 60, 0, -0.5}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(21, 4))
	cases := map[string][][]bool{}
	for n := 0; n < 12; n++ {
		in := make([][]bool, g.Height)
		density := 0.3 + 0.05*float64(n)
		for r := range in {
			in[r] = make([]bool, g.Width)
			for c := range in[r] {
				in[r][c] = rng.Float64() < density
			}
		}
		cases[fmt.Sprintf("random%d", n)] = in
	}
	// A square ring with a diagonal island inside its hole, and a
	// checkerboard corner (diagonal contacts only).
	ring := make([][]bool, g.Height)
	for r := range ring {
		ring[r] = make([]bool, g.Width)
		for c := range ring[r] {
			ring[r][c] = (r >= 2 && r < 20 && c >= 2 && c < 20) && !(r >= 5 && r < 17 && c >= 5 && c < 17) ||
				r == 8 && c == 8 || r == 9 && c == 9 || (r+c)%2 == 0 && r > 22 && c > 30
		}
		ring[r][0] = r%3 == 0
	}
	cases["ring"] = ring
	for name, in := range cases {
		t.Run(name, func(t *testing.T) {
			f := NewFamilyFromRuns(g, []Member{{ID: name}}, func(_, row int) []int32 { return runsOf(in[row]) })
			mp := f.Outline(0)
			b, err := wkb.Marshal(mp)
			if err != nil {
				t.Fatal(err)
			}
			got, err := godal.NewGeometryFromWKB(b, nil)
			if err != nil {
				t.Fatal(err)
			}
			if !got.Valid() {
				t.Fatalf("outline is not a valid geometry (GEOS): %s", orbWKT(mp))
			}
			cells := 0
			for _, r := range in {
				for _, v := range r {
					if v {
						cells++
					}
				}
			}
			if a := got.Area(); math.Abs(a-float64(cells)*0.25) > 1e-9 {
				t.Errorf("outline area %.4f, cells give %.4f", a, float64(cells)*0.25)
			}
			ref := polygonizeReference(t, f, 0)
			d1, err := got.Difference(ref)
			if err != nil {
				t.Fatal(err)
			}
			d2, err := ref.Difference(got)
			if err != nil {
				t.Fatal(err)
			}
			if d1.Area() > 1e-9 || d2.Area() > 1e-9 {
				t.Errorf("outline and Polygonize differ by %.4f and %.4f square degrees", d1.Area(), d2.Area())
			}
			if want := components4(in); len(mp) != want {
				t.Errorf("%d polygons, want %d 4-connected groups", len(mp), want)
			}
		})
	}
}

// components4 counts 4-connected groups of true cells by flood fill.
func components4(in [][]bool) int {
	h, w := len(in), len(in[0])
	seen := make([][]bool, h)
	for r := range seen {
		seen[r] = make([]bool, w)
	}
	n := 0
	for r := 0; r < h; r++ {
		for c := 0; c < w; c++ {
			if !in[r][c] || seen[r][c] {
				continue
			}
			n++
			stack := [][2]int{{r, c}}
			seen[r][c] = true
			for len(stack) > 0 {
				p := stack[len(stack)-1]
				stack = stack[:len(stack)-1]
				for _, d := range [][2]int{{1, 0}, {-1, 0}, {0, 1}, {0, -1}} {
					y, x := p[0]+d[0], p[1]+d[1]
					if y >= 0 && y < h && x >= 0 && x < w && in[y][x] && !seen[y][x] {
						seen[y][x] = true
						stack = append(stack, [2]int{y, x})
					}
				}
			}
		}
	}
	return n
}

func orbWKT(mp orb.MultiPolygon) string { return fmt.Sprint(mp) }
