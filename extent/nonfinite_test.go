package extent

import (
	"encoding/binary"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// polygonWKB is the WKB (little-endian) of a polygon of one ring.
func polygonWKB(ring [][2]float64) []byte {
	b := []byte{1}
	b = binary.LittleEndian.AppendUint32(b, 3) // polygon
	b = binary.LittleEndian.AppendUint32(b, 1) // one ring
	b = binary.LittleEndian.AppendUint32(b, uint32(len(ring)))
	for _, p := range ring {
		b = binary.LittleEndian.AppendUint64(b, math.Float64bits(p[0]))
		b = binary.LittleEndian.AppendUint64(b, math.Float64bits(p[1]))
	}
	return b
}

// TestNonFiniteVertexRefused: a region whose square has one vertex NaN or
// infinite is refused, naming the feature and the vertex. GEOS finds such
// a polygon invalid ("Invalid Coordinate"), and MakeValid dropped the
// vertex: the square became the triangle of its three other corners (7800
// cells instead of the square's 15600 on the demo's grid), with a warning
// that the repair kept all of its area.
func TestNonFiniteVertexRefused(t *testing.T) {
	Register()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	for _, tc := range []struct {
		name string
		bad  float64
		want string
	}{
		{"nan", math.NaN(), "(NaN 3,"},
		{"inf", math.Inf(1), "(+Inf 3,"},
		{"minus inf", math.Inf(-1), "(-Inf 3,"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "region.gpkg")
			sr := wgs84SR(t)
			ds, err := godal.CreateVector(godal.GeoPackage, path)
			if err != nil {
				t.Fatal(err)
			}
			layer, err := ds.CreateLayer("region", sr, godal.GTPolygon)
			if err != nil {
				t.Fatal(err)
			}
			geom, err := godal.NewGeometryFromWKB(polygonWKB([][2]float64{{1, 1}, {3, 1}, {3, 3}, {tc.bad, 3}, {1, 1}}), sr)
			if err != nil {
				t.Fatal(err)
			}
			if _, err := layer.NewFeature(geom); err != nil {
				t.Fatal(err)
			}
			geom.Close()
			if err := ds.Close(); err != nil {
				// GDAL 3.6 cannot write the layer's extent with an
				// infinite bound into gpkg_contents; the feature is
				// written all the same.
				t.Logf("closing: %v", err)
			}
			_, _, err = ReadShape(path, g)
			if err == nil {
				t.Fatal("a region with a non-finite vertex was read")
			}
			for _, want := range []string{"feature 1", "not a finite number", tc.want} {
				if !strings.Contains(err.Error(), want) {
					t.Errorf("error %q lacks %q", err, want)
				}
			}
		})
	}
}
