package batchrun

import (
	"os"
	"path/filepath"
	"slices"
	"testing"

	"areasweep/cmd/internal/batch"
)

// TestAddedSidecars: the files found beside a recorded input that the
// marker does not record, by the input's kind; the occurrence table has
// none, and a recorded sidecar is not new.
func TestAddedSidecars(t *testing.T) {
	dir := t.TempDir()
	for _, n := range []string{"r.shp", "r.shx", "r.dbf", "r.prj", "m.tif", "m.tif.aux.xml", "m.tfw", "occ.csv", "occ.prj"} {
		if err := os.WriteFile(filepath.Join(dir, n), []byte("x"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	f := func(role, name string) batch.InputFile {
		return batch.InputFile{Role: role, Path: filepath.Join(dir, name)}
	}
	for _, c := range []struct {
		name  string
		files []batch.InputFile
		want  []string
	}{
		{"all recorded", []batch.InputFile{f("region", "r.shp"), f("region", "r.dbf"), f("region", "r.prj"), f("region", "r.shx")}, nil},
		{"a shapefile's .prj added", []batch.InputFile{f("region", "r.shp"), f("region", "r.dbf"), f("region", "r.shx")}, []string{"region r.prj"}},
		{"a raster's world file and PAM file added", []batch.InputFile{f("model:m", "m.tif")}, []string{"model:m m.tfw", "model:m m.tif.aux.xml"}},
		{"a null is a raster too", []batch.InputFile{f("null:n", "m.tif"), f("null:n", "m.tfw")}, []string{"null:n m.tif.aux.xml"}},
		{"the occurrence table has none", []batch.InputFile{f("occurrences", "occ.csv")}, nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			var got []string
			for _, a := range addedSidecars(c.files) {
				if !a.Added {
					t.Errorf("%v not marked as added", a)
				}
				got = append(got, a.File.Role+" "+filepath.Base(a.File.Path))
			}
			slices.Sort(got)
			if !slices.Equal(got, c.want) {
				t.Errorf("added %v, want %v", got, c.want)
			}
		})
	}
}
