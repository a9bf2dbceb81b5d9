package pipeline

import (
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
)

// TestMustExistUnreadable: an input file the user cannot read is refused
// as an input error naming it and the cause, before GDAL reports it as
// "not a raster". Root reads every file whatever its mode, so as root
// the case is a file the kernel lets nobody read, /proc/sys/vm/drop_caches
// (write only), and the test is skipped only when even that opens.
func TestMustExistUnreadable(t *testing.T) {
	p := filepath.Join(t.TempDir(), "model.tif")
	if err := os.WriteFile(p, []byte("x"), 0o000); err != nil {
		t.Fatal(err)
	}
	if f, err := os.Open(p); err == nil {
		f.Close()
		p = "/proc/sys/vm/drop_caches"
		if f, err := os.Open(p); err == nil || !os.IsPermission(err) {
			if err == nil {
				f.Close()
			}
			t.Skip("no file here that this user cannot read")
		}
	}
	err := mustExist("model m", p)
	if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), "cannot be read (permission denied)") || !strings.Contains(err.Error(), p) {
		t.Fatalf("mustExist = %v", err)
	}
}

// TestMustExistEmptyAndCommas: a raster of 0 bytes is refused as empty,
// and a path holding a second NAME=PATH item names that mistake.
func TestMustExistEmptyAndCommas(t *testing.T) {
	dir := t.TempDir()
	empty := filepath.Join(dir, "zero.tif")
	os.WriteFile(empty, nil, 0o644)
	if err := mustExist("model m", empty); err == nil || !strings.Contains(err.Error(), "empty (0 bytes)") {
		t.Errorf("empty file: %v", err)
	}
	if err := mustExist("occurrences", empty); err != nil {
		t.Errorf("an empty occurrence table is left to the table reader: %v", err)
	}
	if err := mustExist("model a", filepath.Join(dir, "a.tif,b="+filepath.Join(dir, "b.tif"))); err == nil || !strings.Contains(err.Error(), "several NAME=PATH items") {
		t.Errorf("two items in one flag: %v", err)
	}
}

// TestMustExistLayerInPath: a layer named in the path, as QGIS shows a
// layer's source (FILE|layername=NAME, FILE|layerid=N) or as FILE:LAYER,
// is refused saying that areasweep takes a file and how to save the
// layer alone, instead of "does not exist or cannot be read; check the
// path" for a file that exists.
func TestMustExistLayerInPath(t *testing.T) {
	dir := t.TempDir()
	gpkg := filepath.Join(dir, "study.gpkg")
	if err := os.WriteFile(gpkg, []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct{ path, want string }{
		{gpkg + "|layername=m_large", "ogr2ogr OUT.gpkg " + gpkg + " m_large;"},
		{gpkg + "|layerid=2", "ogr2ogr OUT.gpkg " + gpkg + " LAYER;"},
		{gpkg + "|layername=m large|subset=x", "ogr2ogr OUT.gpkg " + gpkg + " 'm large';"},
		{gpkg + ":m_large", "ogr2ogr OUT.gpkg " + gpkg + " m_large;"},
	}
	for _, c := range cases {
		err := mustExist("region", c.path)
		if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), "names a layer inside the path") || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v", c.path, err)
		}
	}
	if err := mustExist("region", filepath.Join(dir, "other.gpkg|layername=m")); err == nil || !strings.Contains(err.Error(), "does not exist or cannot be read") {
		t.Errorf("a layer of a missing file: %v", err)
	}
}

// TestMustExistLayerInPathRaster: a model's path is not read as naming
// a layer.
func TestMustExistLayerInPathRaster(t *testing.T) {
	tif := filepath.Join(t.TempDir(), "m.tif")
	os.WriteFile(tif, []byte("x"), 0o644)
	if err := mustExist("model m", tif+":2"); err == nil || strings.Contains(err.Error(), "layer") {
		t.Errorf("model: %v", err)
	}
}

// TestMustExistBackslashes: a path written with Windows's backslashes (a
// study file made on Windows, whose relative paths are joined to its
// folder) is refused saying that / separates folders here, naming the
// file that the path with / would be when it exists, and a path with a
// drive letter as a Windows path.
func TestMustExistBackslashes(t *testing.T) {
	dir := t.TempDir()
	os.MkdirAll(filepath.Join(dir, "inputs", "rasters"), 0o755)
	tif := filepath.Join(dir, "inputs", "rasters", "model.tif")
	os.WriteFile(tif, []byte("x"), 0o644)
	cases := []struct{ path, want string }{
		{filepath.Join(dir, `inputs\rasters\model.tif`), "write the path with / between folders (" + tif + " exists)"},
		{filepath.Join(dir, `.\inputs\rasters\model.tif`), "write the path with / between folders (" + tif + " exists)"},
		{filepath.Join(dir, `inputs\model.tif`), "a backslash (\\) separates folders on Windows only; write the path with / between folders"},
		{filepath.Join(dir, `C:\Users\ana\sdm\occ.csv`), "it is a Windows path"},
		{`D:\sdm\occ.csv`, "it is a Windows path"},
		{filepath.Join(dir, "D:/sdm/occ.csv"), "it is a Windows path"},
	}
	for _, c := range cases {
		err := mustExist("occurrences", c.path)
		if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v", c.path, err)
		}
	}
	if err := mustExist("occurrences", filepath.Join(dir, `inputs\model.tif`)); strings.Contains(err.Error(), "exists)") {
		t.Errorf("names a file that does not exist: %v", err)
	}
}

// TestTaxaWarning: an occurrence table whose species column names more
// than one taxon (a portal's export of a genus) is warned about, the
// taxa listed by their number of lines (counted by hand from recs), as
// every line is scored as one species; one taxon, or no species column,
// gives no warning. A name with a line break (a quoted cell over two
// lines) is quoted with it escaped: it used to split the warning over two
// lines of the terminal and run.log.
func TestTaxaWarning(t *testing.T) {
	recs := func(names ...string) []inputs.Record {
		var r []inputs.Record
		for i, n := range names {
			r = append(r, inputs.Record{Line: i + 2, Taxon: n})
		}
		return r
	}
	cases := []struct {
		names []string
		want  string
	}{
		{[]string{"Vornia palustris", "Vornia alia", "Vornia palustris", ""}, "names 2 taxa (Vornia palustris on 2 lines, Vornia alia on 1 line); areasweep scores every line of the table as one species"},
		{[]string{"a", "b", "c", "d", "e", "f", "g", "g"}, "names 7 taxa (g on 2 lines, a on 1 line, b on 1 line, c on 1 line, d on 1 line, and 2 more)"},
		{[]string{"Vornia m\xfcller", "Vornia alia", "Vornia alia"}, "(Vornia alia on 2 lines, Vornia m\uFFFDller on 1 line)"},
		{[]string{"Vornia\npalustris", "Vornia alia", "Vornia\npalustris", "Vornia\talia"}, `("Vornia\npalustris" on 2 lines, "Vornia\talia" on 1 line, Vornia alia on 1 line)`},
		{[]string{"Vornia palustris", "Vornia palustris", ""}, ""},
		{[]string{"", ""}, ""},
	}
	for _, c := range cases {
		got := taxaWarning("occ.tsv", recs(c.names...))
		if (c.want == "") != (got == "") || !strings.Contains(got, c.want) {
			t.Errorf("%v: got %q, want %q", c.names, got, c.want)
		}
	}
}

// TestZeroWarning: records at exactly 0, 0 in degrees (the placeholder
// of a missing coordinate) are named, ten lines at most; a projected
// table's 0, 0 is a place like any other.
func TestZeroWarning(t *testing.T) {
	var recs []inputs.Record
	for i := 0; i < 12; i++ {
		recs = append(recs, inputs.Record{Line: 2 + 2*i, X: 0, Y: 0}, inputs.Record{Line: 3 + 2*i, X: 0, Y: 0.5})
	}
	got := zeroWarning("occ.csv", recs, true)
	if want := "12 record(s) of occ.csv lie at longitude 0, latitude 0 exactly (lines 2, 4, 6, 8, 10, 12, 14, 16, 18, 20 and 2 more)"; !strings.Contains(got, want) {
		t.Errorf("got %q, want %q", got, want)
	}
	if got := zeroWarning("occ.csv", recs, false); got != "" {
		t.Errorf("projected: %q", got)
	}
	if got := zeroWarning("occ.csv", recs[1:2], true); got != "" {
		t.Errorf("no record at 0, 0: %q", got)
	}
}

// TestMustExistTilde: an input path that starts with ~ (--occurrences=~/x
// reaches areasweep so: a shell expands ~ only at the start of a word)
// and does not exist says so, with the flag and path to write apart or
// the full path; a NAME=PATH flag is told to give the full path.
func TestMustExistTilde(t *testing.T) {
	home := t.TempDir()
	t.Setenv("HOME", home)
	for _, c := range []struct{ what, want string }{
		{"occurrences", "not after --occurrences=): write --occurrences and the path apart (--occurrences ~/nope.csv) or give the full path (" + filepath.Join(home, "nope.csv") + ")"},
		{"region", "(--region ~/nope.csv)"},
		{"model m", "after NAME= only for some names): give the full path (" + filepath.Join(home, "nope.csv") + ")"},
		{"extra extent lake", "after NAME= only for some names"},
	} {
		err := mustExist(c.what, "~/nope.csv")
		if err == nil || !strings.Contains(err.Error(), "~/nope.csv does not exist: it starts with ~") || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want %q", c.what, err, c.want)
		}
	}
}

// TestMustExistRasterFolder: a model or null given as a folder (a Zarr
// store or an ArcInfo binary grid, which GDAL reads as a raster) is
// refused with the copy into one file that areasweep reads; before, the
// message said only "is a directory, not a file". Other inputs keep their
// words (a region's .gdb folder is named as a File Geodatabase).
func TestMustExistRasterFolder(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "suit.zarr")
	if err := os.Mkdir(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		what string
		want []string
	}{
		{"model m", []string{"model m: " + dir + " is a directory, not a file", "gdal_translate " + dir + " OUT.tif", "Zarr"}},
		{"null effort", []string{"null effort: " + dir + " is a directory, not a file", "gdal_translate " + dir + " OUT.tif"}},
		{"extra extent x", []string{"extra extent x: " + dir + " is a directory, not a file"}},
	} {
		err := mustExist(tc.what, dir)
		if err == nil || !fault.IsBadInput(err) {
			t.Fatalf("%s: mustExist = %v, want a bad input", tc.what, err)
		}
		for _, w := range tc.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: %q lacks %q", tc.what, err, w)
			}
		}
		if tc.what == "extra extent x" && strings.Contains(err.Error(), "gdal_translate") {
			t.Errorf("%s: %q advises a raster copy", tc.what, err)
		}
	}
}

// TestMustExistSubdatasetOrURL: a GDAL subdataset name is named as such
// with the gdal_translate that extracts it, an HDF5 one too although it
// holds "://" (HDF5:"x.h5"://grid, as gdalinfo lists it: it was named
// "a GDAL virtual path or a URL" with advice to download the file); a
// URL and a /vsi path are still named as such.
func TestMustExistSubdatasetOrURL(t *testing.T) {
	dir := t.TempDir()
	h5 := filepath.Join(dir, "clim.h5")
	cases := []struct{ path, want, not string }{
		{`HDF5:"` + h5 + `"://bio1`, "is a GDAL subdataset name, not a file", "download or unzip"},
		{"HDF5:" + h5 + "://group/bio1", "is a GDAL subdataset name, not a file", "download or unzip"},
		{`NETCDF:"` + h5 + `":bio1`, "is a GDAL subdataset name, not a file", "download or unzip"},
		{"https://example.org/model.tif", "is a GDAL virtual path or a URL", "gdal_translate"},
		{"/vsizip/" + dir + "/m.zip/m.tif", "is a GDAL virtual path or a URL", "gdal_translate"},
	}
	for _, c := range cases {
		err := mustExist("model m", c.path)
		if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), c.not) {
			t.Errorf("%s: %v", c.path, err)
		}
	}
}

// TestMustExistLineBreak: an input whose path holds a line break is
// refused with the path quoted: a refusal of its contents named it over
// two lines of the terminal ("areasweep: /d/bad\nocc.csv line 3, ..."),
// and run.log's lines broke there too.
func TestMustExistLineBreak(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"occ\nx.csv", "occ\rx.csv"} {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte("lon,lat,role\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		for _, what := range []string{"occurrences", "model m", "region"} {
			err := mustExist(what, p)
			if err == nil || !fault.IsBadInput(err) || strings.ContainsAny(err.Error(), "\n\r") || !strings.Contains(err.Error(), "holds a line break") || !strings.Contains(err.Error(), strconv.Quote(p)) {
				t.Errorf("%s %q: %v", what, p, err)
			}
		}
	}
}

// TestMustExistLayerFolder: a folder given for a polygon layer or the
// occurrences (a Shapefile's folder, as a file manager shows it) is
// refused with the files in it that could be meant; before, the message
// said only "is a directory, not a file".
func TestMustExistLayerFolder(t *testing.T) {
	root := t.TempDir()
	mk := func(dir string, files ...string) string {
		d := filepath.Join(root, dir)
		if err := os.Mkdir(d, 0o755); err != nil {
			t.Fatal(err)
		}
		for _, f := range files {
			if err := os.WriteFile(filepath.Join(d, f), nil, 0o644); err != nil {
				t.Fatal(err)
			}
		}
		return d
	}
	shp := mk("region_shp", "region.dbf", "region.prj", "region.shp", "region.shx")
	many := mk("layers", "a.gpkg", "b.geojson", "c.shp", "d.fgb", "e.csv")
	none := mk("empty")
	occ := mk("occ", "points.csv", "region.shp")
	for _, tc := range []struct {
		what, dir string
		want      []string
		not       string
	}{
		{"region", shp, []string{"region: " + shp + " is a directory, not a file", "give the file of the polygon layer itself, e.g. " + filepath.Join(shp, "region.shp")}, ".dbf"},
		{"extra extent x", many, []string{"one of the 4 in it: " + filepath.Join(many, "a.gpkg") + ", " + filepath.Join(many, "b.geojson") + ", " + filepath.Join(many, "c.shp") + ", ..."}, "e.csv"},
		{"ecoregions", none, []string{"ecoregions: " + none + " is a directory, not a file; give the file of the polygon layer itself"}, "e.g."},
		{"occurrences", occ, []string{"give the occurrence table's file itself, e.g. " + filepath.Join(occ, "points.csv")}, "region.shp"},
	} {
		err := mustExist(tc.what, tc.dir)
		if err == nil || !fault.IsBadInput(err) {
			t.Fatalf("%s: mustExist = %v, want a bad input", tc.what, err)
		}
		for _, w := range tc.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: %q lacks %q", tc.what, err, w)
			}
		}
		if strings.Contains(err.Error(), tc.not) {
			t.Errorf("%s: %q names %q", tc.what, err, tc.not)
		}
	}
}

// TestLongRasterPath: a model raster at a path of 2,100 bytes (valid on
// Linux, up to 4,096) was refused as "has no geotransform": GDAL names the
// files beside a raster in a buffer of 2,048 bytes and opened it without
// its georeferencing. It is now refused for what it is, naming the length
// and what to do; a path of 2,000 bytes passes this check.
func TestLongRasterPath(t *testing.T) {
	for _, n := range []int{2000, 2100} {
		dir := t.TempDir()
		p := dir
		for len(p)+210 < n {
			p = filepath.Join(p, strings.Repeat("d", 200))
		}
		p = filepath.Join(p, strings.Repeat("e", max(1, n-len(p)-8)))
		if err := os.MkdirAll(p, 0o755); err != nil {
			t.Fatal(err)
		}
		path := filepath.Join(p, "m1.tif")
		if len(path) != n {
			t.Fatalf("path of %d bytes, want %d", len(path), n)
		}
		if err := os.WriteFile(path, []byte("II*\x00 not read here"), 0o644); err != nil {
			t.Fatal(err)
		}
		err := mustExist("model m1", path)
		long := err != nil && fault.IsBadInput(err) && strings.Contains(err.Error(), fmt.Sprintf("is %d bytes long", n)) && strings.Contains(err.Error(), "give a shorter path")
		if long != (n > maxRasterPath) {
			t.Errorf("a model at a path of %d bytes: %v", n, err)
		}
		if err := mustExist("occurrences", path); err != nil && strings.Contains(err.Error(), "bytes long") {
			t.Errorf("an occurrence table (read without GDAL) at %d bytes refused: %v", n, err)
		}
	}
}
