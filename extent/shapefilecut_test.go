package extent

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestShapefileCutShort: a shapefile whose .shp, .shx or .dbf was cut
// off (a copy interrupted) is refused naming the file cut short and what
// to do, as a region and as ecoregions. GDAL read a .shp cut short as
// features without geometry (skipped with a warning) and a .dbf cut short
// up to its last whole record, dropping the features after it without a
// word (found by helper hB: 30 of 40 ecoregion features lost); a .shx cut
// short it refused with its own words ("Failed to read all values for 40
// records in .shx file: Success"). The whole shapefile is read.
func TestShapefileCutShort(t *testing.T) {
	Register()
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 10, 0.1, 100, 100)
	var feats []string
	for i := 0; i < 6; i++ {
		a, b := float64(i)+1.05, float64(i)+1.95
		feats = append(feats, fmt.Sprintf(`{"type":"Feature","properties":{"id":"u%d"},"geometry":{"type":"Polygon","coordinates":[[[%g,1],[%g,1],[%g,2],[%g,2],[%g,1]]]}}`, i, a, b, b, a, a))
	}
	gj := filepath.Join(dir, "units.geojson")
	if err := os.WriteFile(gj, []byte(`{"type":"FeatureCollection","features":[`+strings.Join(feats, ",")+`]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	src, err := godal.Open(gj, godal.VectorOnly())
	if err != nil {
		t.Fatal(err)
	}
	defer src.Close()
	write := func(name string) string {
		sub := filepath.Join(dir, name)
		if err := os.Mkdir(sub, 0o755); err != nil {
			t.Fatal(err)
		}
		out, err := src.VectorTranslate(filepath.Join(sub, "units.shp"), []string{"-f", "ESRI Shapefile"})
		if err != nil {
			t.Fatal(err)
		}
		out.Close()
		return filepath.Join(sub, "units.shp")
	}
	whole := write("whole")
	if units, _, err := ReadUnits(whole, "id", g); err != nil || len(units) != 6 {
		t.Fatalf("whole shapefile: %d units, %v", len(units), err)
	}
	if _, _, err := ReadShape(whole, g); err != nil {
		t.Fatalf("whole shapefile as a region: %v", err)
	}
	// Records its .dbf marks deleted, as an edit without repacking leaves
	// them, are skipped by GDAL's reading but counted in its feature
	// count: no damage (the first count check refused such a file).
	deleted := write("deleted")
	ds, err := godal.Open(deleted, godal.VectorOnly(), godal.Update(), godal.DriverOpenOption("AUTO_REPACK=NO"))
	if err != nil {
		t.Fatal(err)
	}
	l := ds.Layers()[0]
	for f := l.NextFeature(); f != nil; f = l.NextFeature() {
		if id := f.Fields()["id"].String(); id == "u1" || id == "u4" {
			if err := l.DeleteFeature(f); err != nil {
				t.Fatal(err)
			}
		}
		f.Close()
	}
	if err := ds.Close(); err != nil {
		t.Fatal(err)
	}
	if units, _, err := ReadUnits(deleted, "id", g); err != nil || len(units) != 4 {
		t.Errorf("shapefile with 2 of 6 records deleted: %d units, %v", len(units), err)
	}
	for _, c := range []struct {
		ext  string
		keep func(size int64) int64 // bytes kept of the file
	}{
		{".shp", func(n int64) int64 { return n / 2 }},
		{".dbf", func(n int64) int64 { return n - 40 }},
		{".shx", func(n int64) int64 { return 100 + 8*2 }},
	} {
		path := write("cut" + c.ext)
		file := strings.TrimSuffix(path, ".shp") + c.ext
		st, err := os.Stat(file)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.Truncate(file, c.keep(st.Size())); err != nil {
			t.Fatal(err)
		}
		want := fmt.Sprintf("%s is cut short: its units%s holds %d bytes where its records need", path, c.ext, c.keep(st.Size()))
		_, _, uerr := ReadUnits(path, "id", g)
		_, _, serr := ReadShape(path, g)
		for _, err := range []error{uerr, serr} {
			if err == nil || !strings.Contains(err.Error(), want) || !strings.Contains(err.Error(), "copy the whole shapefile again") {
				t.Errorf("%s cut short: %v, want %q", c.ext, err, want)
			}
		}
	}
}
