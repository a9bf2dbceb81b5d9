package extent

import (
	"errors"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestSurfacesAsAreas: a triangle is a polygon of one ring, and a TIN
// or a polyhedral surface a set of polygon faces; each is read as the
// area its faces cover in the plane, with or without Z coordinates, with
// no warning (faces sharing edges are no repair). A triangle was refused
// as "not a polygon" unless it had Z coordinates (the 3D copy made it a
// polygon), and a TIN, Z or not, and a polyhedral surface of several
// faces without Z were refused too. A collection holding a point beside
// a TIN is still refused for its point.
func TestSurfacesAsAreas(t *testing.T) {
	Register()
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	gpkg := func(name, wkt string) string {
		p := filepath.Join(dir, name)
		ds, err := godal.CreateVector(godal.GeoPackage, p)
		if err != nil {
			t.Fatal(err)
		}
		sr, _ := godal.NewSpatialRefFromEPSG(4326)
		l, err := ds.CreateLayer("region", sr, godal.GTUnknown)
		if err != nil {
			t.Fatal(err)
		}
		geom, err := godal.NewGeometryFromWKT(wkt, sr)
		if err != nil {
			t.Fatal(err)
		}
		// GDAL warns that it registers its own GeoPackage extension for
		// these types.
		quiet := godal.ErrLogger(func(ec godal.ErrorCategory, code int, msg string) error {
			if ec <= godal.CE_Warning {
				return nil
			}
			return errors.New(msg)
		})
		if _, err := l.NewFeature(geom, quiet); err != nil {
			t.Fatal(err)
		}
		if err := ds.Close(quiet); err != nil {
			t.Fatal(err)
		}
		return p
	}
	cells := func(t *testing.T, path string) int {
		t.Helper()
		s, warns, err := ReadShape(path, g)
		if err != nil {
			t.Fatal(err)
		}
		if len(warns) > 0 {
			t.Errorf("warnings: %q", warns)
		}
		n := 0
		Fill(g, s.Grid, func(row, c0, c1 int) { n += c1 - c0 })
		return n
	}
	triangle := cells(t, gpkg("polygon3.gpkg", "POLYGON ((0.55 0.55, 3.05 0.55, 1.8 2.95, 0.55 0.55))"))
	square := cells(t, gpkg("polygon4.gpkg", "POLYGON ((0.55 0.55, 3.05 0.55, 3.05 2.95, 0.55 2.95, 0.55 0.55))"))
	if triangle == 0 || square <= triangle {
		t.Fatalf("%d cells in the triangle, %d in the square", triangle, square)
	}
	const (
		t1 = "((0.55 0.55, 3.05 0.55, 3.05 2.95, 0.55 0.55))"
		t2 = "((0.55 0.55, 3.05 2.95, 0.55 2.95, 0.55 0.55))"
	)
	for _, c := range []struct {
		name, wkt string
		want      int
	}{
		{"triangle", "TRIANGLE ((0.55 0.55, 3.05 0.55, 1.8 2.95, 0.55 0.55))", triangle},
		{"triangle Z", "TRIANGLE Z ((0.55 0.55 1, 3.05 0.55 2, 1.8 2.95 3, 0.55 0.55 1))", triangle},
		{"TIN", "TIN (" + t1 + ", " + t2 + ")", square},
		{"TIN Z", "TIN Z (" + zOf(t1) + ", " + zOf(t2) + ")", square},
		{"polyhedral surface", "POLYHEDRALSURFACE (" + t1 + ", " + t2 + ", ((1 1, 2 1, 2 2, 1 1)))", square},
		{"polyhedral surface Z, a box", "POLYHEDRALSURFACE Z (" +
			"((0.55 0.55 0, 0.55 2.95 0, 3.05 2.95 0, 3.05 0.55 0, 0.55 0.55 0))," +
			"((0.55 0.55 0, 0.55 0.55 1, 0.55 2.95 1, 0.55 2.95 0, 0.55 0.55 0))," +
			"((0.55 0.55 0, 3.05 0.55 0, 3.05 0.55 1, 0.55 0.55 1, 0.55 0.55 0))," +
			"((3.05 2.95 1, 3.05 0.55 1, 0.55 0.55 1, 0.55 2.95 1, 3.05 2.95 1))," +
			"((3.05 2.95 1, 0.55 2.95 1, 0.55 2.95 0, 3.05 2.95 0, 3.05 2.95 1))," +
			"((3.05 2.95 1, 3.05 2.95 0, 3.05 0.55 0, 3.05 0.55 1, 3.05 2.95 1)))", square},
		{"collection of a triangle", "GEOMETRYCOLLECTION (TRIANGLE ((0.55 0.55, 3.05 0.55, 1.8 2.95, 0.55 0.55)))", triangle},
		{"collection of a TIN and a polygon", "GEOMETRYCOLLECTION (TIN (" + t1 + "), POLYGON " + t2 + ")", square},
	} {
		t.Run(c.name, func(t *testing.T) {
			if got := cells(t, gpkg(strings.ReplaceAll(c.name, " ", "_")+".gpkg", c.wkt)); got != c.want {
				t.Errorf("%d cells, want %d as for the polygon", got, c.want)
			}
		})
	}
	t.Run("collection of a point and a TIN", func(t *testing.T) {
		_, _, err := ReadShape(gpkg("pointtin.gpkg", "GEOMETRYCOLLECTION (POINT (1 1), TIN ("+t1+"))"), g)
		if err == nil || !strings.Contains(err.Error(), "feature 1 is a geometry collection whose part 1 is a point, not a polygon") {
			t.Errorf("got %v, want the point refused", err)
		}
	})
}

// zOf gives the ring of a face in WKT ("((x y, ...))") a height of 5 at
// each vertex.
func zOf(face string) string {
	return strings.NewReplacer(",", " 5,", "))", " 5))").Replace(face)
}
