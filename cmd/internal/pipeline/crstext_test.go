package pipeline

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestCRSTrailingText: an --occurrences-crs of one authority code with
// more text after it is refused, naming the code and the text; GDAL 3.6
// reads "EPSG:4326,EPSG:3857" and "EPSG:4326xyz" as EPSG:4326 without a
// word (checked with osr.SpatialReference.SetFromUserInput, which
// returns 0 for both), so these runs went on in a CRS nobody chose. The
// forms GDAL reads whole are left to it. Options.Validate runs it, so a
// batch refuses such a row before anything runs.
func TestCRSTrailingText(t *testing.T) {
	cases := []struct {
		crs  string
		want string // "" when accepted
	}{
		{"EPSG:3035", ""},
		{" EPSG:3035 ", ""},
		{"epsg:4326", ""},
		{"ESRI:54009", ""},
		{"IAU_2015:49900", ""},
		{"OGC:CRS84", ""},
		{"EPSG:4326+5773", ""},
		{"urn:ogc:def:crs:EPSG::4326", ""},
		{"http://www.opengis.net/def/crs/EPSG/0/4326", ""},
		{"AUTO:42001,9001,-100,45", ""},
		{"+proj=utm +zone=33 +datum=WGS84", ""},
		{`GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["degree",0.0174532925199433]]`, ""},
		{"EPSG:", ""}, // no code: GDAL names it unknown
		{"EPSG:4326,EPSG:3857", `the CRS code EPSG:4326 (",EPSG:3857")`},
		{"EPSG:4326 EPSG:3857", `the CRS code EPSG:4326 (" EPSG:3857")`},
		{"EPSG:3035;", `the CRS code EPSG:3035 (";")`},
		{"EPSG:32633 (UTM 33N)", `the CRS code EPSG:32633 (" (UTM 33N)")`},
		{"EPSG:4326+5773+1", `the CRS code EPSG:4326+5773 ("+1")`},
		{"EPSG:4326xyz", `the CRS code EPSG:4326 ("xyz")`},
		{"EPSG:3O35", `the CRS code EPSG:3 ("O35")`},
		{"IGNF:LAMB93", ""},
	}
	for _, c := range cases {
		err := crsTrailingText(c.crs)
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%q refused: %v", c.crs, err)
		case c.want != "" && (err == nil || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), "give one CRS")):
			t.Errorf("%q: %v, want it refused with %s", c.crs, err, c.want)
		}
	}
}

// TestConvertedName: the advice for a raster without CRS in another
// format than GeoTIFF (an ASCII grid without .prj) names STEM.tif as the
// copy to write, or STEM_crs.tif when STEM.tif exists: it named
// grid.tif beside grid.asc although that file was there, and
// gdal_translate would have overwritten it.
func TestConvertedName(t *testing.T) {
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "taken.tif"), []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ in, want string }{
		{"free.asc", "free.tif"},
		{"taken.asc", "taken_crs.tif"},
		{"taken.bil", "taken_crs.tif"},
		{"noext", "noext.tif"},
	} {
		if got := convertedName(filepath.Join(dir, c.in)); got != filepath.Join(dir, c.want) {
			t.Errorf("%s: %s, want %s", c.in, got, c.want)
		}
	}
}

// TestCRSAdviceMissingFile: an --occurrences-crs that names a .prj or
// .wkt file that is not there was answered with the advice for a CRS
// text ("write an authority code ..."), as if the name were meant as
// one; it now says no such file exists and where a relative path is
// read from. An existing file, a bare number and other text keep their
// advice.
func TestCRSAdviceMissingFile(t *testing.T) {
	dir := t.TempDir()
	prj := filepath.Join(dir, "here.prj")
	if err := os.WriteFile(prj, []byte("garbage"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ crs, want string }{
		{"nothere.prj", "there is no file nothere.prj (a relative path is read from the study file's or table's folder"},
		{filepath.Join(dir, "gone.WKT"), "there is no file " + filepath.Join(dir, "gone.WKT")},
		{prj, prj + " is a file, read for the CRS"},
		{"3035", "EPSG:3035"},
		{"utm33", "write an authority code such as EPSG:3035, a PROJ string"},
	} {
		if got := crsAdvice(c.crs); !strings.Contains(got, c.want) {
			t.Errorf("%s: advice %q, want it to contain %q", c.crs, got, c.want)
		}
	}
}
