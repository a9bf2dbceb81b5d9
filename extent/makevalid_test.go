package extent

import (
	"path/filepath"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestRepairKeepsArea: an invalid polygon is repaired to the area inside
// any of its outer rings and outside every hole (README), on a 0.1 degree
// grid whose centres lie on none of the edges. Expected cells: the cell
// centres inside the area osgeo.ogr (GEOS) computes for what the feature
// was meant to be, counted in Python in hV's audit: the union of the two
// overlapping parts (2800), the shell minus its hole (1500), the square
// without its spike (1600). Before, GDAL's default (linework) repair
// dropped the parts' overlap (2400 cells) and added the part of the hole
// outside its shell (1600).
func TestRepairKeepsArea(t *testing.T) {
	g, _ := geoGrid(t, 0, 10, 0.1, 100, 100)
	sr := wgs84SR(t)
	tests := []struct {
		name, wkt string
		want      int
	}{
		{"two overlapping parts of a multipolygon", "MULTIPOLYGON(((1.02 1.02,5.02 1.02,5.02 5.02,1.02 5.02,1.02 1.02)),((3.02 3.02,7.02 3.02,7.02 7.02,3.02 7.02,3.02 3.02)))", 2800},
		{"a hole running out of its shell", "POLYGON((1.02 1.02,5.02 1.02,5.02 5.02,1.02 5.02,1.02 1.02),(4.02 2.02,6.02 2.02,6.02 3.02,4.02 3.02,4.02 2.02))", 1500},
		{"a spike", "POLYGON((1.02 1.02,5.02 1.02,5.02 3.02,8.02 3.02,5.02 3.02,5.02 5.02,1.02 5.02,1.02 1.02))", 1600},
	}
	for i, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			geom, err := godal.NewGeometryFromWKT(tc.wkt, sr)
			if err != nil {
				t.Fatal(err)
			}
			b, err := geom.WKB()
			geom.Close()
			if err != nil {
				t.Fatal(err)
			}
			path := filepath.Join(t.TempDir(), "x.gpkg")
			if err := WriteLayer(path, "x", sr, godal.GTUnknown, nil, []Feature{{WKB: b}}); err != nil {
				t.Fatal(err)
			}
			s, warns, err := ReadShape(path, g)
			if err != nil {
				t.Fatal(err)
			}
			if len(warns) != 1 {
				t.Errorf("case %d: warnings %q, want one about the repair", i, warns)
			}
			n := 0
			Fill(g, s.Grid, func(row, c0, c1 int) { n += c1 - c0 })
			if n != tc.want {
				t.Errorf("%d cells, want %d", n, tc.want)
			}
		})
	}
}
