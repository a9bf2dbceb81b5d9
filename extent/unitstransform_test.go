package extent

import (
	"fmt"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestManyUnitsInAnotherCRS: a layer of many small units in longitude/
// latitude on a projected raster is put on the grid with one
// transformation for the layer, not three per unit (densifyEdges', the
// centre cell's and Reproject's): each transformation made is looked up
// in PROJ's database (tens of milliseconds), and 6,500 units of a layer
// in EPSG:4326 on an EPSG:3035 raster took 159 s of 'extents' (1.7 s with
// one). The test counts the transformations onGrid makes, and checks
// that every unit is put on the grid.
func TestManyUnitsInAnotherCRS(t *testing.T) {
	g, err := NewGrid(600, 500, [6]float64{3800000, 2000, 0, 3400000, 0, -2000}, "EPSG:3035")
	if err != nil {
		t.Fatal(err)
	}
	var ids []string
	var rings [][][2]float64
	for i := 0; i < 40; i++ {
		for j := 0; j < 25; j++ {
			lon, lat := 6+0.2*float64(i), 47+0.2*float64(j)
			ids = append(ids, fmt.Sprintf("u%d_%d", i, j))
			rings = append(rings, [][2]float64{{lon, lat}, {lon + 0.15, lat}, {lon + 0.15, lat + 0.15}, {lon, lat + 0.15}, {lon, lat}})
		}
	}
	path := writeGeoJSON(t, t.TempDir(), "units.geojson", ids, rings)
	made := 0
	defer func(f func(src, dst *godal.SpatialRef, opts ...godal.TransformOption) (*godal.Transform, error)) {
		newTransform = f
	}(newTransform)
	orig := newTransform
	newTransform = func(src, dst *godal.SpatialRef, opts ...godal.TransformOption) (*godal.Transform, error) {
		made++
		return orig(src, dst, opts...)
	}
	units, _, err := ReadUnits(path, "id", g)
	if err != nil {
		t.Fatal(err)
	}
	if len(units) != len(ids) {
		t.Fatalf("%d units, want %d", len(units), len(ids))
	}
	// Each unit in the grid's CRS (metres), inside the grid: not left in
	// degrees.
	gb := g.Bounds()
	for _, u := range units {
		b := u.Shape.Grid.Bound()
		if len(u.Shape.Grid) == 0 || b.Min[0] < gb[0] || b.Max[0] > gb[2] || b.Min[1] < gb[1] || b.Max[1] > gb[3] {
			t.Fatalf("unit %s lies at %v, outside the grid's %v", u.ID, b, gb)
		}
	}
	if made != 1 {
		t.Errorf("%d units in EPSG:4326 on an EPSG:3035 grid made %d transformations, want 1 for the layer", len(units), made)
	}
}
