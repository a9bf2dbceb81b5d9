package gdalmsg

import (
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/airbusgeo/godal"
)

// TestCause checks that library prefixes and function names go and the
// message itself stays, on one line. The inputs are messages GDAL 3.6,
// libtiff, SQLite and GEOS print (copied from their output on damaged
// files).
func TestCause(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"ERROR 1: TIFFFillTile:Read error at row 4294967295, col 0, tile 3; got 0 bytes, expected 1024", "only 0 of the 1024 bytes of tile 3 are in the file"},
		{"TIFFReadEncodedStrip() failed: Read error at row 64, col 0, strip 17; got 1520 bytes, expected 6164", "failed: only 1520 of the 6164 bytes of strip 17 are in the file"},
		{"sqlite3_exec(SELECT 1) failed: database disk image is malformed", "the database inside it is damaged, as in a file cut short or copied while it was being written"},
		{"Self-intersection at or near point 1 1\nsecond line", "Self-intersection at or near point 1 1"},
		{"ERROR 10: Pointer 'hGeom' is NULL in 'OGR_G_GetGeometryType'.", "the library reported an error"},
		{"  ", "the library reported an error"},
		// GDAL 3.6's words for a file no driver opens, and later versions'.
		{"`/tmp/x y/bad.tif' not recognized as a supported file format.", UnknownFormat},
		{"`bad.gpkg' not recognized as being in a supported file format.", UnknownFormat},
		// An SQLite file that is no GeoPackage; a GeoJSON file cut short
		// (GDAL 3.6's and its JSON parser's words).
		{"GPKG: bad application_id=0x00000000 on 'empty.gpkg'", "an SQLite database but not a GeoPackage: its application id is 0x00000000, a GeoPackage's is 0x47504B47"},
		{"At line 1, character 41: Unterminated array", "its JSON is not valid at line 1, character 41: Unterminated array"},
		// Copied from GDAL 3.6.2's output on a GeoTIFF cut at byte 400
		// (the libtiff function name in it is removed as before).
		{"trunc400.tif: TIFFFetchNormalTag:IO error during reading of \"GeoPixelScale\"; tag ignored", "trunc400.tif: its header field GeoPixelScale lies past the end of the file, as in a file cut short"},
		// Copied from GDAL 3.6.2's output on a KML file cut short, a GML
		// file cut short and VRT files cut short or with a broken
		// attribute (the last two are GDAL's own XML parser's).
		{"ERROR parsing kml /tmp/hG/cases/kml_trunc.kml :no element found on line 8 at offset 716", "its XML is not valid at line 8: the file ends before its elements are closed, as a file cut short does"},
		{"XML parsing of GML file failed : no element found at line 13, column 475", "its XML is not valid at line 13, column 475: the file ends before its elements are closed, as a file cut short does"},
		{"XML parsing of GML file failed : mismatched tag at line 4, column 2", "its XML is not valid at line 4, column 2: mismatched tag"},
		{"Parse error on line 7, reached EOF before closing quote.", "its XML is not valid at line 7: reached the end of the file before closing quote"},
		{"IO error during reading of \"GDALNoDataValue\"; tag ignored", "its header field GDALNoDataValue lies past the end of the file, as in a file cut short"},
		{"Line 7: Didn't find expected attribute value.", "its XML is not valid at line 7: Didn't find expected attribute value"},
		// Copied from GDAL 3.6.2's output for --occurrences-crs
		// "+proj=garbage +foo", a local engineering CRS and a Mars CRS
		// (PROJ's).
		{"Error 1027 (Invalid value for an argument): Unknown projection", "Unknown projection"},
		// Copied from GDAL 3.6.2's output when a block read met a limit
		// of address space (ulimit -v 1900000 on a 27-million-cell run);
		// CPLMalloc's words and the general phrase recalled from memory;
		// on a second line too (it is the cause whatever came first).
		{"/gcore/gdalrasterblock.cpp, 1108: cannot allocate 262144 bytes", OutOfMemory + " (it could not allocate 262144 bytes)"},
		{"CPLMalloc(): Out of memory allocating 1048576 bytes.", OutOfMemory + " (it could not allocate 1048576 bytes)"},
		{"GTiffRasterBand::IReadBlock(): Out of memory", OutOfMemory},
		// Copied from GDAL 3.6.2's output (libtiff's words) when the read
		// of a 400 MB deflate strip met ulimit -v 2200000.
		{"No space for data buffer at scanline 4294967295", OutOfMemory},
		{"IReadBlock failed at X offset 3, Y offset 0\n/gcore/gdalrasterblock.cpp, 1108: cannot allocate 65536 bytes", OutOfMemory + " (it could not allocate 65536 bytes)"},
		{"Cannot find coordinate operations from `ENGCRS[\"arbitrary\",EDATUM[\"\"],CS[Cartesian,2]]' to `EPSG:4326'", "PROJ knows no transformation between the two CRSs"},
		{"PROJ: proj_create_operations: Source and target ellipsoid do not belong to the same celestial body", "Source and target ellipsoid do not belong to the same celestial body"},
		// Copied from GDAL 3.6.2's output on a GeoPackage whose
		// user_version was set to 99999.
		{"This version of GeoPackage user_version=0x0001869F (99999, v9.99.99) on '/tmp/hG/cases/gpkg_userversion.gpkg' may only be partially supported", "its GeoPackage version v9.99.99 (99999) is later than the ones GDAL reads in full"},
		{"a name in `quotes'", "a name in 'quotes'"},
		// Copied from GDAL 3.6.2's output on damaged GeoTIFFs: cut at
		// byte 4 and at byte 8, with the BigTIFF magic number in a classic
		// TIFF, with a tile's offset past the end, SamplesPerPixel 0, width
		// 0, compression code 34999, Predictor 9; and on a VRT whose pixel
		// function is unknown.
		{"/d/trunc4.tif: /d/trunc4.tif:Cannot read header", "its TIFF header cannot be read: the file is cut short, or is no TIFF"},
		{"/d/trunc8.tif: /d/trunc8.tif: Can not read directory count", "its TIFF header cannot be read: the file is cut short, or is no TIFF"},
		{"/d/bigtiff_magic.tif: _tiffSeekProc:Invalid argument", "its TIFF header cannot be read: the file is cut short, or is no TIFF"},
		{"open: Invalid argument", "open: Invalid argument"},
		{"_TIFFPartialReadStripArray:Cannot read offset/size for strile around ~1", "the place or size of block 1 cannot be read, as in a file cut short"},
		{"/d/spp0.tif: _TIFFVSetField:/d/spp0.tif: Bad value 0 for \"SamplesPerPixel\" tag", "its header field SamplesPerPixel has the invalid value 0"},
		{"/d/zerowidth.tif: Cannot handle zero number of tiles", "its header gives a width, height or block size of 0"},
		{"/d/unknowncompr.tif: Cannot open file due to missing codec of code 34999", "its compression (code 34999) is not one GDAL reads"},
		{"PredictorSetup:\"Predictor\" value 9 not supported", "\"Predictor\" value 9 not supported"},
		{"VRTDerivedRasterBand::IRasterIO:Derived band pixel function 'nonexistentfn' not registered", "Derived band pixel function 'nonexistentfn' not registered"},
		// Copied from GDAL 3.6.2's output on a GeoPackage cut to a third,
		// one whose layer table was dropped, one declaring POINT for its
		// polygons, one with a garbage geometry blob, and a GeoJSON file whose
		// "crs" member links to the host x.
		{"database disk image is malformed", "the database inside it is damaged, as in a file cut short or copied while it was being written"},
		{"Table/view region is referenced in gpkg_contents, but does not exist", "it lists a layer region whose table is not in the file"},
		{"geometry column type in 'region.geom' is not consistent with type in gpkg_geometry_columns", "the geometries of layer region are not of the type its GeoPackage declares for them"},
		{"Unable to read geometry", "a feature's geometry cannot be read: its bytes are damaged"},
		{"Could not resolve host: x", "it names a web address on the host x, which cannot be reached: areasweep reads local files only"},
		// Copied from GDAL 3.6.2's output on an ERDAS .img file cut in
		// half and on a VRT whose source band is 9 of a one-band file.
		{"VSIFReadL(0x27d6a540,6*4) @ 332087 failed in HFAEntry()", "its bytes end before byte 332087 that its header points to, as in a file cut short"},
		{"/d/model_good.tif: GDALDataset::GetRasterBand(9) - Illegal band #", "/d/model_good.tif: it has no band 9"},
		// Copied from GDAL 3.6.2's output on a KML and a GML file whose
		// first coordinate was made text (GDAL's words, then GEOS's).
		{"Non closed ring detected. To avoid accepting it, set the OGR_GEOMETRY_ACCEPT_UNCLOSED_RING configuration option to NO", OpenRing},
		{"GEOSUnaryUnion_r: IllegalArgumentException: Points of LinearRing do not form a closed linestring", OpenRing},
		// Copied from GDAL 3.6.2's output on a GeoJSON ecoregion layer
		// whose second unit's ring was made [[1,2]] (GEOS's words).
		{"IllegalArgumentException: point array must contain 0 or >1 elements", "a ring or line of it has a single point"},
		// Copied from run logs of GDAL 3.6.2 / PROJ 9.1 on Mollweide and
		// EASE-Grid 2.0 world grids, whose corner cells lie off the Earth.
		{"Point outside of projection domain", OffDomain},
		{"Reprojection failed, err = 2050, further errors will be suppressed on the transform object", OffDomain + "; no more of them are reported for this transformation"},
		{strings.Repeat("x", 1000), strings.Repeat("x", maxCause) + "..."},
	} {
		if got := Cause(c.in); got != c.want {
			t.Errorf("Cause(%.40q) = %q, want %q", c.in, got, c.want)
		}
	}
}

// TestInstallCaptures raises a GDAL error outside any godal call (opening
// a missing file through a call godal does not wrap would need C; a
// failed WKT parse reports through the per-call handler instead), so it
// checks the recorder through the exported callback and that Install can
// be called twice.
func TestInstallCaptures(t *testing.T) {
	godal.RegisterAll()
	Install()
	Install()
	Drain()
	gdalmsgRecordGo(3, 1, "TIFFReadDirectory: damaged")
	gdalmsgRecordGo(1, 0, "debug line")
	msgs, dropped := Drain()
	if len(msgs) != 1 || dropped != 0 || msgs[0].String() != "library error: damaged" {
		t.Fatalf("Drain = %v, %d", msgs, dropped)
	}
	for i := 0; i < maxKept+5; i++ {
		gdalmsgRecordGo(2, 1, "w")
	}
	if msgs, dropped := Drain(); len(msgs) != maxKept || dropped != 5 {
		t.Fatalf("bound: kept %d dropped %d", len(msgs), dropped)
	}
}

// TestIsOutOfMemory: libraries' words for memory they could not get are
// told from a full disk's (the system's "No space left on device", which
// GDAL passes on for a write). The first three
// are copied from GDAL 3.6.2's output (see TestCause); the disk's is the
// system's strerror(ENOSPC).
func TestIsOutOfMemory(t *testing.T) {
	for _, tc := range []struct {
		text string
		want bool
	}{
		{"/gcore/gdalrasterblock.cpp, 1108: cannot allocate 262144 bytes", true},
		{"No space for data buffer at scanline 4294967295", true},
		{"GTiffRasterBand::IReadBlock(): Out of memory", true},
		{"Write error: No space left on device", false},
	} {
		if got := IsOutOfMemory(tc.text); got != tc.want {
			t.Errorf("IsOutOfMemory(%q) = %v, want %v", tc.text, got, tc.want)
		}
	}
}

// TestLines: the run log gets one line per distinct message, in the order
// each first came, with a count when it came more than once (a world map
// in Mollweide logged PROJ's message for a point off the map 60 times, one
// line each).
func TestLines(t *testing.T) {
	msgs := []Message{
		{Level: Failure, Text: "Point outside of projection domain"},
		{Level: Warning, Text: "something else"},
		{Level: Failure, Text: "Point outside of projection domain"},
		{Level: Failure, Text: "Point outside of projection domain"},
	}
	got := Lines(msgs)
	want := []string{"library error: " + OffDomain + " (3 times)", "library warning: something else"}
	if len(got) != len(want) {
		t.Fatalf("Lines = %q, want %q", got, want)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("line %d: %q, want %q", i, got[i], want[i])
		}
	}
}

// TestForget: the messages of one cause recorded after a Mark are
// forgotten; those of other causes, and those recorded before the mark,
// are kept in order (by construction).
func TestForget(t *testing.T) {
	Drain()
	Record(Failure, 1, "Point outside of projection domain") // before the mark
	mark := Mark()
	Record(Failure, 1, "Point outside of projection domain")
	Record(Warning, 1, "something else")
	Record(Failure, 1, "Reprojection failed, err = 2050, further errors will be suppressed on the transform object")
	Forget(mark, OffDomain)
	Record(Failure, 1, "Point outside of projection domain") // after the Forget
	got := Lines(must(Drain()))
	want := []string{"library error: " + OffDomain + " (2 times)", "library warning: something else"}
	if strings.Join(got, "\n") != strings.Join(want, "\n") {
		t.Errorf("kept %q, want %q", got, want)
	}
}

func must(m []Message, _ int) []Message { return m }

// TestCStderrRecorded: what a C library prints on C's stderr stream
// itself reaches the recorder, not the terminal: of an HDF5 error stack
// (the one HDF5 1.10 printed for a valid netCDF-4 model, whose optional
// attribute GDAL's driver looks for) only its first frame, once per
// stack; any other line as it is.
func TestCStderrRecorded(t *testing.T) {
	Install()
	Drain()
	printCStderr("HDF5-DIAG: Error detected in HDF5 (1.10.8) thread 1:\n" +
		"  #000: H5A.c line 528 in H5Aopen_by_name(): can't open attribute\n" +
		"    major: Attribute\n    minor: Can't open object\n" +
		"  #001: H5Aint.c line 545 in H5A__open_by_name(): unable to load attribute info from object header\n" +
		"    major: Attribute\n    minor: Unable to initialize object\n")
	printCStderr("some library: a line of its own\n")
	want := []string{"library warning: HDF5: H5Aopen_by_name(): can't open attribute", "library warning: some library: a line of its own"}
	var got []string
	for deadline := time.Now().Add(10 * time.Second); len(got) < len(want) && time.Now().Before(deadline); {
		msgs, _ := Drain()
		got = append(got, Lines(msgs)...)
		time.Sleep(5 * time.Millisecond)
	}
	if !slices.Equal(got, want) {
		t.Errorf("recorded %q, want %q", got, want)
	}
}
