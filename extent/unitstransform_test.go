package extent

import (
	"fmt"
	"testing"
	"time"
)

// TestManyUnitsInAnotherCRS: a layer of many small units in longitude/
// latitude on a projected raster is put on the grid with one
// transformation for the layer, not three per unit. Each transformation
// made is looked up in PROJ's database (tens of milliseconds): 6,500
// units of a layer in EPSG:4326 on an EPSG:3035 raster took 159 s of
// 'extents' (1.7 s with one; the same units in EPSG:3035 3.1 s), so
// 1,000 units took some 25 s before. The bound, 8 s, is far above the
// 0.3 s they take now on the 2-core machine, and far below the time
// before.
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
	start := time.Now()
	units, _, err := ReadUnits(path, "id", g)
	took := time.Since(start)
	if err != nil {
		t.Fatal(err)
	}
	if len(units) != len(ids) {
		t.Fatalf("%d units, want %d", len(units), len(ids))
	}
	if took > 8*time.Second {
		t.Errorf("%d units in EPSG:4326 on an EPSG:3035 grid took %v, want well under 8 s (one transformation for the layer)", len(units), took)
	}
}
