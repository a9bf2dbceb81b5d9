package extent

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestShapefilePRJNotACRS: a shapefile whose .prj GDAL cannot read as a
// CRS was refused as having "no CRS", and the user looked for a missing
// file. The refusal now names the .prj, says what is wrong with it
// (empty, text that is no CRS, a CRS in a form GDAL does not take from a
// .prj: WKT2, or the blank line gdalsrsinfo writes before the WKT) and
// gives the command that writes a readable one. A shapefile without a
// .prj keeps the refusal for no CRS, and one whose .prj holds one line
// of ESRI WKT, as that command writes it, is read.
func TestShapefilePRJNotACRS(t *testing.T) {
	Register()
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	const esri = `GEOGCS["GCS_WGS_1984",DATUM["D_WGS_1984",SPHEROID["WGS_1984",6378137.0,298.257223563]],PRIMEM["Greenwich",0.0],UNIT["Degree",0.0174532925199433]]`
	const wkt2 = `GEOGCRS["WGS 84",DATUM["World Geodetic System 1984",ELLIPSOID["WGS 84",6378137,298.257223563,LENGTHUNIT["metre",1]]],PRIMEM["Greenwich",0,ANGLEUNIT["degree",0.0174532925199433]],CS[ellipsoidal,2],AXIS["geodetic latitude (Lat)",north,ORDER[1],ANGLEUNIT["degree",0.0174532925199433]],AXIS["geodetic longitude (Lon)",east,ORDER[2],ANGLEUNIT["degree",0.0174532925199433]],ID["EPSG",4326]]`
	for _, c := range []struct {
		name, shp, prj string // prj "-": none
		words          []string
	}{
		{"garbage", "garbage.shp", "this is not a CRS at all", []string{"garbage.shp has no CRS: its CRS file " + filepath.Join(dir, "garbage.prj") + ` could not be read as a CRS (it holds "this is not a CRS at all")`, "gdalsrsinfo -o wkt_esri --single-line EPSG:4326 > " + filepath.Join(dir, "garbage.prj"), "ogr2ogr -a_srs"}},
		{"cut short", "cut.shp", esri[:60], []string{"cut.prj could not be read as a CRS", `GEOGCS[\"GCS_WGS_1984\"`}},
		{"binary", "binary.shp", "\x00\x01\x02", []string{`binary.prj could not be read as a CRS (it holds "\x00\x01\x02")`}},
		{"empty", "empty.shp", "\n", []string{"empty.prj is empty", "gdalsrsinfo -o wkt_esri --single-line"}},
		{"WKT2", "wkt2.shp", wkt2, []string{"wkt2.prj holds a CRS in a form GDAL does not take from a .prj (WKT2"}},
		{"a blank line first", "blank.shp", "\n" + esri + "\n", []string{"blank.prj holds a CRS in a form GDAL does not take"}},
		{"upper-case names", "UPPER.SHP", "garbage", []string{"UPPER.SHP has no CRS: its CRS file " + filepath.Join(dir, "UPPER.PRJ") + " could not be read"}},
		{"no .prj", "none.shp", "-", []string{`none.shp layer "none" has no CRS; give it the one its coordinates are in`}},
		{"one line of ESRI WKT", "good.shp", esri, nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			shp := filepath.Join(dir, c.shp)
			ext := filepath.Ext(shp)
			stem := strings.TrimSuffix(shp, ext)
			if _, err := godalCreateShapefile(stem + ".shp"); err != nil {
				t.Fatal(err)
			}
			if ext == ".SHP" {
				// GDAL writes lower-case extensions; a shapefile copied
				// from an old system has upper-case ones.
				for _, e := range []string{"shp", "shx", "dbf"} {
					if err := os.Rename(stem+"."+e, stem+"."+strings.ToUpper(e)); err != nil {
						t.Fatal(err)
					}
				}
			}
			if c.prj != "-" {
				prj := stem + ".prj"
				if ext == ".SHP" {
					prj = stem + ".PRJ"
				}
				if err := os.WriteFile(prj, []byte(c.prj), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			_, _, err := ReadShape(shp, g)
			if c.words == nil {
				if err != nil {
					t.Fatalf("refused: %v", err)
				}
				return
			}
			if err == nil {
				t.Fatal("read, want a refusal")
			}
			for _, w := range c.words {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("%v\nlacks %q", err, w)
				}
			}
		})
	}
}
