package inputs

import (
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// TestSidecars: the files GDAL names beside a raster or a shapefile are
// found when they exist, in sorted order, with the extension's case;
// unrelated files, folders and the input itself are not.
func TestSidecars(t *testing.T) {
	cases := []struct {
		name  string
		input string
		kind  int
		files []string // created beside the input
		want  []string
	}{
		{"raster, all kinds", "m.tif", RasterSidecars,
			[]string{"m.tif.aux.xml", "m.tif.ovr", "m.tif.msk", "m.prj", "m.tfw", "m.tifw", "m.wld", "m.hdr", "m.aux", "m.tif.hdr"},
			[]string{"m.aux", "m.hdr", "m.prj", "m.tfw", "m.tif.aux.xml", "m.tif.hdr", "m.tif.msk", "m.tif.ovr", "m.tifw", "m.wld"}},
		{"raster, none", "m.tif", RasterSidecars, nil, nil},
		{"ascii grid and its projection", "m.asc", RasterSidecars, []string{"m.prj", "m.asc.aux.xml", "other.prj", "m.dbf"},
			[]string{"m.asc.aux.xml", "m.prj"}},
		{"upper-case extension", "M.TIF", RasterSidecars, []string{"M.TFW", "M.PRJ", "m.prj"}, []string{"M.PRJ", "M.TFW"}},
		{"folder named like a sidecar", "m.tif", RasterSidecars, []string{"m.prj/"}, nil},
		{"shapefile", "r.shp", VectorSidecars, []string{"r.shx", "r.dbf", "r.prj", "r.cpg", "r.qix", "r.shp.xml", "s.dbf"},
			[]string{"r.cpg", "r.dbf", "r.prj", "r.shx"}},
		{"geopackage", "r.gpkg", VectorSidecars, []string{"r.prj", "r.gpkg.aux.xml"}, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			for _, f := range append([]string{c.input}, c.files...) {
				p := filepath.Join(dir, f)
				var err error
				if strings.HasSuffix(f, "/") {
					err = os.Mkdir(p, 0o755)
				} else {
					err = os.WriteFile(p, []byte(f), 0o644)
				}
				if err != nil {
					t.Fatal(err)
				}
			}
			var got []string
			for _, p := range Sidecars(filepath.Join(dir, c.input), c.kind) {
				got = append(got, filepath.Base(p))
			}
			if !slices.Equal(got, c.want) {
				t.Errorf("got %q, want %q", got, c.want)
			}
		})
	}
}

// BenchmarkSidecars is the cost of looking for a raster's sidecars when
// there are none (the usual case): one stat per candidate name.
func BenchmarkSidecars(b *testing.B) {
	p := filepath.Join(b.TempDir(), "model.tif")
	if err := os.WriteFile(p, nil, 0o644); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		Sidecars(p, RasterSidecars)
	}
}
