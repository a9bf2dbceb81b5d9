package main

import (
	"context"
	"encoding/binary"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/airbusgeo/godal"

	"areasweep/extent"
)

// wgs84WKT is EPSG:4326 as WKT, for rasters written with rasterWith.
const wgs84WKT = `GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["degree",0.0174532925199433]]`

// runBadCasesH26 runs each case as TestBadInputs does and checks the same
// things: the exit code, the words of the message, no crash output or raw
// library words, --out absent, nothing left beside it or in the inputs'
// folder, and every input as it was.
func runBadCasesH26(t *testing.T, f *badFixture, cases []badCase) {
	t.Helper()
	for i, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			caseDir := filepath.Join(f.outs, "h26case"+strconv.Itoa(i))
			os.MkdirAll(caseDir, 0o755)
			out := filepath.Join(caseDir, "out")
			if c.keepOut != "" {
				out = c.keepOut // an existing folder, which must stay as it was
			}
			args := append(append([]string{}, c.args...), "--out", out, "--quiet")
			before, outBefore := treeSums(t, f.dir), treeSums(t, out)
			// A refusal takes a second: a run still going after a minute
			// hangs (on a named pipe, say) and fails the case.
			ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
			defer cancel()
			cmd := exec.CommandContext(ctx, areasweepBin, args...)
			var se strings.Builder
			cmd.Stderr = &se
			code := exitCode(cmd.Run())
			stderr := se.String()
			checkRefusal(t, code, c.code, stderr, c.words)
			for _, raw := range []string{"4294967295", "Decode:", "SHAPE_RESTORE_SHX", "PROJ:", `unit ""`} {
				if strings.Contains(stderr, raw) {
					t.Errorf("stderr holds the library's %q: %s", raw, stderr)
				}
			}
			if c.keepOut != "" {
				if after := treeSums(t, out); !sameSums(outBefore, after) {
					t.Errorf("--out %s changed: %d files before, %d after", out, len(outBefore), len(after))
				}
			} else if _, err := os.Stat(out); err == nil {
				t.Errorf("--out %s was created", out)
			}
			if l := leftovers(f.dir, caseDir); len(l) > 0 {
				t.Errorf("left behind: %v", l)
			}
			if after := treeSums(t, f.dir); !sameSums(before, after) {
				t.Errorf("an input file changed or appeared: %d files before, %d after", len(before), len(after))
			}
		})
	}
}

// TestBadRastersAndLayers: model rasters whose band holds complex
// numbers or declares a scale of 0, a raster and a layer on another
// planet, rasters georeferenced by ground control points, south-up or
// with cells of no height, GeoTIFFs cut short or with a damaged
// compressed tile, a shapefile without its .shx, ecoregions in a
// shapefile without its .dbf, a file of two rasters or one of them named
// as GDAL names it (NETCDF:"x.nc":var), a named pipe as a model or layer (GDAL
// would wait for its writer), a region smaller than a cell or over cells
// without data only (told apart from one elsewhere; in extents too, which
// knows the cells with data before it builds, and told such a region it
// was smaller than a cell), and --out (with
// --force) the folder of a virtual raster's source. Each is refused with exit 2 naming the model
// or input and the file, in plain words.
func TestBadRastersAndLayers(t *testing.T) {
	outs := t.TempDir()
	f := &badFixture{smallStudy: newSmallStudy(t), outs: outs}
	ridge := func(i int) float64 { return f.vals[i] }

	// A complex band: GDAL would hand over its real part alone.
	complexModel := filepath.Join(f.dir, "complex.tif")
	{
		ds, err := godal.Create(godal.GTiff, complexModel, 1, godal.CFloat32, f.w, f.h)
		if err != nil {
			t.Fatal(err)
		}
		ds.SetGeoTransform(f.gt)
		ds.SetProjection(wgs84WKT)
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
	}
	// A scale of 0: every cell would read as the offset (it was taken as 1).
	scaleZero := f.rasterWith(t, "scale0.tif", f.gt, wgs84WKT, ridge)
	{
		ds, err := godal.Open(scaleZero, godal.Update())
		if err != nil {
			t.Fatal(err)
		}
		if err := ds.Bands()[0].SetScaleOffset(0, 0); err != nil {
			t.Fatal(err)
		}
		ds.Close()
	}
	// Scales that take stored values beyond the largest float64: at
	// every cell (met when the points are sampled), and on the last row
	// only, away from the points (met by the pass). Both stopped the run
	// as a bug (exit 3).
	scaled := func(name string, fn func(i int) float64, scale float64) string {
		p := f.rasterWith(t, name, f.gt, wgs84WKT, fn)
		ds, err := godal.Open(p, godal.Update())
		if err != nil {
			t.Fatal(err)
		}
		if err := ds.Bands()[0].SetScaleOffset(scale, 0); err != nil {
			t.Fatal(err)
		}
		ds.Close()
		return p
	}
	scaleHuge := scaled("scalehuge.tif", func(i int) float64 { return 2 + ridge(i) }, 1e308)
	scaleHugeLastRow := scaled("scalehugerow.tif", func(i int) float64 {
		if i >= (f.h-1)*f.w {
			return 1e30
		}
		return 1 + ridge(i)
	}, 1e300)
	// A classic netCDF file cut short: GDAL read its missing cells as 0.
	ncCut := filepath.Join(f.dir, "cut3.nc")
	{
		toNetCDF(t, f.model, ncCut, "NC")
		b, err := os.ReadFile(ncCut)
		if err != nil {
			t.Fatal(err)
		}
		os.WriteFile(ncCut, b[:len(b)/2], 0o644)
	}
	// Grids no cell of which can be placed: past a pole, around the globe
	// more than once, in a local (engineering) CRS. Each refusal said what
	// was wrong but not what to do (or, for the local CRS, gave 'FILE').
	pastPole := f.rasterWith(t, "pastpole.tif", [6]float64{10, 0.25, 0, -67, 0, -0.75}, wgs84WKT, ridge)
	tooWide := f.rasterWith(t, "toowide.tif", [6]float64{-180, 7.6, 0, 47.875, 0, -0.25}, wgs84WKT, ridge)
	local := f.rasterWith(t, "local.tif", [6]float64{0, 1000, 0, 32000, 0, -1000}, `LOCAL_CS["site grid",UNIT["metre",1]]`, ridge)
	// Longitudes and latitudes on Mars: PROJ relates them to no Earth CRS.
	const marsWKT = `GEOGCS["Mars 2000",DATUM["D_Mars_2000",SPHEROID["Mars_2000_IAU_IAG",3396190.0,169.89444722361179]],PRIMEM["Greenwich",0],UNIT["Decimal_Degree",0.0174532925199433]]`
	mars := f.rasterWith(t, "mars.tif", f.gt, marsWKT, ridge)
	marsRegion := filepath.Join(f.dir, "mars.gpkg")
	{
		src, err := godal.Open(f.region, godal.VectorOnly())
		if err != nil {
			t.Fatal(err)
		}
		dst, err := src.VectorTranslate(marsRegion, []string{"-f", "GPKG", "-a_srs", marsWKT})
		if err != nil {
			t.Fatal(err)
		}
		dst.Close()
		src.Close()
	}

	// Georeferenced by ground control points only (no geotransform), rows
	// running south to north, and cells of no height.
	gcp := filepath.Join(f.dir, "gcp.tif")
	{
		ds, err := godal.Create(godal.GTiff, gcp, 1, godal.Float32, f.w, f.h)
		if err != nil {
			t.Fatal(err)
		}
		corners := []godal.GCP{{PszId: "1", DfGCPX: 10, DfGCPY: 48}, {PszId: "2", DfGCPPixel: 48, DfGCPX: 22, DfGCPY: 48}, {PszId: "3", DfGCPLine: 32, DfGCPX: 10, DfGCPY: 40}}
		if err := ds.SetGCPs(corners, godal.GCPProjection(wgs84WKT)); err != nil {
			t.Fatal(err)
		}
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
	}
	southUp := f.rasterWith(t, "southup.tif", [6]float64{10, 0.25, 0, 40, 0, 0.25}, wgs84WKT, ridge)
	flat := f.rasterWith(t, "flat.tif", [6]float64{10, 0.25, 0, 48, 0, 0}, wgs84WKT, ridge)
	// A cell width of 0: GDAL writes a tie point without a cell size and
	// reads it back as one ground control point; the message said "by 1
	// ground control points" and advised gdalwarp, which needs three.
	noWidth := f.rasterWith(t, "nowidth.tif", [6]float64{10, 0, 0, 48, 0, -0.25}, wgs84WKT, ridge)

	// Finite values whose range overflows: the report's axes were drawn
	// over an infinite span, and the run never ended.
	hugeRange := filepath.Join(f.dir, "hugerange.tif")
	grid, err := extent.NewGrid(f.w, f.h, f.gt, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer grid.Close()
	writeFloat64Raster(t, hugeRange, grid, func() []float64 {
		v := make([]float64, len(f.vals))
		for i, x := range f.vals {
			v[i] = (2*x - 1) * 1.7e308
			if math.IsNaN(x) {
				v[i] = math.NaN()
			}
		}
		return v
	}())

	// A tiled, deflate-compressed GeoTIFF, then a copy with one tile's
	// bytes overwritten and a copy cut in its last tile (uncompressed
	// tiles: libtiff then reports a short read).
	deflate := filepath.Join(f.dir, "deflate.tif")
	var tileOff, tileLen int
	{
		ds, err := godal.Create(godal.GTiff, deflate, 1, godal.Float32, f.w, f.h, godal.CreationOption("TILED=YES", "BLOCKXSIZE=16", "BLOCKYSIZE=16", "COMPRESS=DEFLATE"))
		if err != nil {
			t.Fatal(err)
		}
		ds.SetGeoTransform(f.gt)
		ds.SetProjection(wgs84WKT)
		b := ds.Bands()[0]
		b.SetNoData(smallNoData)
		buf := make([]float32, f.w*f.h)
		for i, v := range f.vals {
			buf[i] = float32(v)
			if math.IsNaN(v) {
				buf[i] = smallNoData
			}
		}
		if err := b.Write(0, 0, buf, f.w, f.h); err != nil {
			t.Fatal(err)
		}
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
		ds, err = godal.Open(deflate)
		if err != nil {
			t.Fatal(err)
		}
		tileOff, _ = strconv.Atoi(ds.Bands()[0].Metadata("BLOCK_OFFSET_1_1", godal.Domain("TIFF")))
		tileLen, _ = strconv.Atoi(ds.Bands()[0].Metadata("BLOCK_SIZE_1_1", godal.Domain("TIFF")))
		ds.Close()
		if tileOff == 0 || tileLen < 4 {
			t.Fatalf("tile (1,1) of %s at %d, %d bytes", deflate, tileOff, tileLen)
		}
	}
	corrupt, _ := os.ReadFile(deflate)
	for i := tileOff + 2; i < tileOff+tileLen; i++ {
		corrupt[i] = 0x55
	}
	corruptTile := f.file("corrupt.tif", string(corrupt))
	plain, _ := os.ReadFile(f.model)
	cut := f.file("cut.tif", string(plain[:len(plain)-100]))

	// A shapefile without its .shx, and one without its .dbf.
	shp := filepath.Join(f.dir, "units.shp")
	{
		src, err := godal.Open(f.region, godal.VectorOnly())
		if err != nil {
			t.Fatal(err)
		}
		dst, err := src.VectorTranslate(shp, []string{"-f", "ESRI Shapefile"})
		if err != nil {
			t.Fatal(err)
		}
		dst.Close()
		src.Close()
	}
	for _, c := range []struct{ name, skip string }{{"noshx", ".shx"}, {"nodbf", ".dbf"}} {
		for _, ext := range []string{".shp", ".shx", ".dbf", ".prj"} {
			if ext == c.skip {
				continue
			}
			b, err := os.ReadFile(strings.TrimSuffix(shp, ".shp") + ext)
			if err != nil {
				t.Fatal(err)
			}
			f.file(c.name+ext, string(b))
		}
	}
	noSHX, noDBF := filepath.Join(f.dir, "noshx.shp"), filepath.Join(f.dir, "nodbf.shp")

	// A virtual raster in the inputs' folder whose source lies in another
	// folder: that folder holds an input too.
	srcDir := filepath.Join(outs, "sources")
	os.MkdirAll(srcDir, 0o755)
	srcTIF := filepath.Join(srcDir, "src.tif")
	os.WriteFile(srcTIF, plain, 0o644)
	viaVRT := filepath.Join(f.dir, "via.vrt")
	virtualRaster(t, srcTIF, viaVRT)

	// A GeoPackage of two raster tables: GDAL sees two subdatasets.
	twoRasters := filepath.Join(f.dir, "two.gpkg")
	for i, m := range []string{f.model, f.model2} {
		src, err := godal.Open(m)
		if err != nil {
			t.Fatal(err)
		}
		opts := []string{"-of", "GPKG", "-co", "RASTER_TABLE=suit" + strconv.Itoa(i+1)}
		if i > 0 {
			opts = append(opts, "-co", "APPEND_SUBDATASET=YES")
		}
		ds, err := src.Translate(twoRasters, opts)
		if err != nil {
			t.Fatal(err)
		}
		ds.Close()
		src.Close()
	}

	// Named pipes nobody writes to: GDAL would wait for a writer forever.
	fifo := filepath.Join(f.dir, "pipe.tif")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}

	runBadCasesH26(t, f, []badCase{
		{name: "region GeoJSON naming an unknown CRS", args: f.withRegion(f.file("unknowncrs.geojson", `{"type":"FeatureCollection","crs":{"type":"name","properties":{"name":"EPSG:999999"}},"features":[{"type":"Feature","properties":{},"geometry":`+squareGeom+`}]}`)), code: 2,
			words: []string{"unknowncrs.geojson", `the CRS its "crs" member names is not one PROJ knows`, `correct the "crs" member`}},
		{name: "region table of WKT without CRS", args: f.withRegion(f.file("wkt.csv", "id,WKT\n1,\"POLYGON ((12.5 41.5,18.5 41.5,18.5 46.5,12.5 46.5,12.5 41.5))\"\n")), code: 2,
			words: []string{"wkt.csv", "has no CRS", "ogr2ogr -a_srs EPSG:4326 OUT.gpkg " + filepath.Join(f.dir, "wkt.csv")}},
		{name: "region smaller than a cell", args: f.withRegion(f.file("tiny.geojson", polygonJSON(`{"type":"Polygon","coordinates":[[[13.01,43.01],[13.05,43.01],[13.05,43.05],[13.01,43.05],[13.01,43.01]]]}`, ``))), code: 2,
			words: []string{"tiny.geojson lies over", "holds no cell's centre", "smaller or thinner than the cells of 0.25 x 0.25"}},
		{name: "region whose hole holds the raster", args: f.withRegion(f.file("bighole.geojson", polygonJSON(`{"type":"Polygon","coordinates":[[[0,30],[40,30],[40,60],[0,60],[0,30]],[[5,35],[5,55],[30,55],[30,35],[5,35]]]}`, ``))), code: 2,
			words: []string{"bighole.geojson lies over", "every cell's centre it surrounds lies in one of its holes", "the raster lies inside a hole of the region"}},
		{name: "region over cells without data only", args: f.withRegion(f.file("nodataonly.geojson", polygonJSON(`{"type":"Polygon","coordinates":[[[21.1,40.1],[21.9,40.1],[21.9,40.9],[21.1,40.9],[21.1,40.1]]]}`, ``))), code: 2,
			words: []string{"nodataonly.geojson covers no cell with data", "cells without data only"}},
		{name: "extents: region over cells without data only", args: append([]string{"extents"}, f.withRegion(f.file("nodataonly2.geojson", polygonJSON(`{"type":"Polygon","coordinates":[[[21.1,40.1],[21.9,40.1],[21.9,40.9],[21.1,40.9],[21.1,40.1]]]}`, ``)))[1:]...), code: 2,
			words: []string{"nodataonly2.geojson covers no cell with data", "cells without data only"}},
		{name: "out holds a virtual raster's source, force", args: f.withModel(viaVRT, "--force"), code: 2, words: []string{"--out " + srcDir, "holds the input", "src.tif", "whatever --force says"}, keepOut: srcDir},
		{name: "model file holding two rasters", args: f.withModel(twoRasters), code: 2, words: []string{"model m", "two.gpkg holds 2 rasters (suit1, suit2), not one", "gdal_translate 'GPKG:" + twoRasters + ":suit1' suit1.tif"}},
		{name: "model given as a GDAL subdataset name", args: f.withModel("GPKG:" + twoRasters + ":suit2"), code: 2, words: []string{"model m", "is a GDAL subdataset name, not a file", "gdal_translate GPKG:" + twoRasters + ":suit2 OUT.tif"}},
		{name: "model is a named pipe", args: f.withModel(fifo), code: 2, words: []string{"model m", "pipe.tif", "not a regular file"}},
		{name: "region is a named pipe", args: f.withRegion(fifo), code: 2, words: []string{"region", "pipe.tif", "not a regular file"}},
		{name: "extra layer is a named pipe", args: f.run("--extra", "x="+fifo), code: 2, words: []string{"extra extent x", "pipe.tif", "not a regular file"}},
		{name: "model of complex numbers", args: f.withModel(complexModel), code: 2, words: []string{"model m", "complex.tif", "complex numbers (CFloat32)", "real value per cell"}},
		{name: "null of complex numbers", args: f.run("--null", "n="+complexModel), code: 2, words: []string{"null n", "complex.tif", "complex numbers"}},
		{name: "extents: model of complex numbers", args: append([]string{"extents"}, f.withModel(complexModel)[1:]...), code: 2, words: []string{"model m", "complex numbers"}},
		{name: "model with a scale of 0", args: f.withModel(scaleZero), code: 2, words: []string{"model m", "scale0.tif", "scale of 0", "gdal_translate -a_scale 1"}},
		{name: "model whose scale overflows at the points", args: f.withModel(scaleHuge), code: 2, words: []string{"model m", "scalehuge.tif declares a scale of 1e+308", "beyond the largest number a float64 holds", "gdal_translate -a_scale"}},
		{name: "model whose scale overflows away from the points", args: f.withModel(scaleHugeLastRow), code: 2, words: []string{"model m", "scalehugerow.tif declares a scale of 1e+300", "its stored value 1.0000000150474662e+30", "beyond the largest number"}},
		{name: "model a classic netCDF file cut short", args: f.withModel(ncCut), code: 2, words: []string{"model m", "cut3.nc", "classic netCDF file whose header says its values take", "cut short"}},
		{name: "model past a pole", args: f.withModel(pastPole), code: 2, words: []string{"model m", "pastpole.tif", "run past the poles (top -67.000000, bottom -91.000000)", "gdal_translate -projwin"}},
		{name: "model around the globe more than once", args: f.withModel(tooWide), code: 2, words: []string{"model m", "toowide.tif", "more than 360 degrees of longitude", "gdal_translate -projwin -180 90 180 -90"}},
		{name: "model in a local CRS", args: f.withModel(local), code: 2, words: []string{"model m", "local.tif: its CRS is undefined (site grid)", "gdal_translate -a_srs EPSG:4326 " + local + " "}},
		{name: "model on Mars", args: f.withModel(mars), code: 2, words: []string{"model m", "mars.tif", "Mars 2000", "cannot be transformed to or from WGS84", "same celestial body"}},
		{name: "region on Mars", args: f.withRegion(marsRegion), code: 2, words: []string{"region: ", "mars.gpkg: cannot be reprojected to the raster CRS", "same celestial body", "check that the layer's CRS is right"}},
		{name: "extra layer on Mars", args: f.run("--extra", "x="+marsRegion), code: 2, words: []string{"extra x: ", "mars.gpkg: cannot be reprojected"}},
		{name: "model whose values' range overflows", args: f.withModel(hugeRange), code: 2, words: []string{"model m", "hugerange.tif run from -1.7e+308 to 1.7e+308", "beyond the largest number", "gdal_calc.py"}},
		{name: "null whose values' range overflows", args: f.run("--null", "n="+hugeRange), code: 2, words: []string{"null n", "hugerange.tif run from"}},
		{name: "model georeferenced by ground control points", args: f.withModel(gcp), code: 2, words: []string{"model m", "gcp.tif", "3 ground control points", "gdalwarp"}},
		{name: "model with cells of no width", args: f.withModel(noWidth), code: 2, words: []string{"model m", "nowidth.tif", "one tie point only, without a cell size", "gdal_translate -a_ullr"}},
		{name: "model south-up", args: f.withModel(southUp), code: 2, words: []string{"model m", "southup.tif", "rows from south to north", "gdalwarp"}},
		{name: "model with cells of no height", args: f.withModel(flat), code: 2, words: []string{"model m", "flat.tif", "0.25 x 0", "no width or no height"}},
		{name: "model with a damaged compressed tile", args: f.withModel(corruptTile), code: 2, words: []string{"model m", "corrupt.tif", "the block at column 16 row 16", "its compressed data cannot be decoded", "damaged"}},
		{name: "model cut in its last tile", args: f.withModel(cut), code: 2, words: []string{"model m", "cut.tif", "bytes of the block are in the file", "truncated"}},
		{name: "region shapefile without .shx", args: f.withRegion(noSHX), code: 2, words: []string{"region", "noshx.shp", "noshx.shx is not beside it", "must stay together"}},
		{name: "ecoregions shapefile without .dbf", args: f.run("--ecoregions", noDBF, "--ecoregion-field", "unit"), code: 2, words: []string{"ecoregions", "nodbf.shp", `no field "unit"`, "nodbf.dbf is not beside it"}},
	})

	// A region whose built base holds no cell is refused before the
	// family's warnings, which would only say of each empty member what
	// the refusal says (all 11 were printed first). Run without --quiet,
	// so that they would show.
	t.Run("no extent warnings before the refusal", func(t *testing.T) {
		args := append(f.withRegion(filepath.Join(f.dir, "bighole.geojson")), "--out", filepath.Join(outs, "loud"))
		cmd := exec.Command(areasweepBin, args...)
		var se strings.Builder
		cmd.Stderr = &se
		code := exitCode(cmd.Run())
		checkRefusal(t, code, 2, se.String(), []string{"bighole.geojson", "inside a hole of the region"})
		if strings.Contains(se.String(), "warning: extent") {
			t.Errorf("stderr warns of the extents before the refusal: %s", se.String())
		}
	})
}

// writeEHdr writes a Float32 ESRI BIL of the small study's values with
// the given nodata value both in the cells without data and, as text, in
// the header, with a WGS84 .prj beside it.
func writeEHdr(t *testing.T, s *smallStudy, path string, cellNoData float32, headerNoData string) {
	t.Helper()
	buf := make([]byte, 4*len(s.vals))
	for i, v := range s.vals {
		x := float32(v)
		if math.IsNaN(v) {
			x = cellNoData
		}
		binary.LittleEndian.PutUint32(buf[4*i:], math.Float32bits(x))
	}
	stem := strings.TrimSuffix(path, filepath.Ext(path))
	hdr := "BYTEORDER I\nLAYOUT BIL\nNROWS " + strconv.Itoa(s.h) + "\nNCOLS " + strconv.Itoa(s.w) + "\nNBANDS 1\nNBITS 32\nPIXELTYPE FLOAT\n" +
		"ULXMAP 10.125\nULYMAP 47.875\nXDIM 0.25\nYDIM 0.25\nNODATA " + headerNoData + "\n"
	for name, body := range map[string][]byte{path: buf, stem + ".hdr": []byte(hdr), stem + ".prj": []byte(wgs84WKT)} {
		if err := os.WriteFile(name, body, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// TestInputsReadAsDeclared: inputs that are valid but were misread
// without a word, each scored exactly as its plain equivalent
// (scores.csv byte for byte, the whole raster included, where the cells
// without data lie):
//   - Float32 ESRI BILs whose header writes the nodata value as text that
//     is no float32 (-9999.99), or the lowest float32 as tools print it
//     (-3.4028235e+38, just beyond it): GDAL compares the cells with the
//     value rounded to float32, and so must areasweep, or every cell
//     without data is scored as data;
//   - a Float64 GeoTIFF whose cells without data hold a float32's
//     -9999.99 (-9999.990234375) under the declared -9999.99, which
//     GDAL's mask takes for no data (within its tolerance);
//   - a region whose polygon sits in a GeometryCollection inside a
//     GeometryCollection: read as no polygon at all, it was taken for the
//     whole globe.
func TestInputsReadAsDeclared(t *testing.T) {
	s := newSmallStudy(t)
	outs := t.TempDir()
	run := func(t *testing.T, name string, args ...string) []byte {
		t.Helper()
		return smallRunScores(t, filepath.Join(outs, name), append([]string{"--occurrences", s.occ}, args...)...)
	}
	want := run(t, "plain", "--model", "m="+s.model, "--region", s.region)
	if !strings.Contains(string(want), "m,whole_raster,") {
		t.Fatal("the plain run scores no whole_raster extent: the cells without data would not matter")
	}

	for _, c := range []struct {
		name   string
		cell   float32
		header string
	}{
		{"nodata -9999.99", -9999.99, "-9999.99"},
		{"nodata -3.4028235e+38", -math.MaxFloat32, "-3.4028235e+38"},
	} {
		t.Run("ESRI BIL "+c.name, func(t *testing.T) {
			bil := filepath.Join(s.dir, strings.ReplaceAll(c.name, " ", "_")+".bil")
			writeEHdr(t, s, bil, c.cell, c.header)
			if got := run(t, filepath.Base(bil), "--model", "m="+bil, "--region", s.region); string(got) != string(want) {
				t.Error("scores.csv differs from the run on the GeoTIFF: cells without data were scored")
			}
		})
	}

	t.Run("Float64 GeoTIFF holding a float32's nodata", func(t *testing.T) {
		// Converted from a Float32 raster, its cells without data hold
		// -9999.990234375 under the declared -9999.99: GDAL's mask takes
		// them for no data (within its tolerance).
		p := filepath.Join(s.dir, "float64.tif")
		ds, err := godal.Create(godal.GTiff, p, 1, godal.Float64, s.w, s.h)
		if err != nil {
			t.Fatal(err)
		}
		ds.SetGeoTransform(s.gt)
		ds.SetProjection(wgs84WKT)
		b := ds.Bands()[0]
		b.SetNoData(-9999.99)
		buf := make([]float64, len(s.vals))
		for i, v := range s.vals {
			buf[i] = v
			if math.IsNaN(v) {
				buf[i] = float64(float32(-9999.99))
			}
		}
		if err := b.Write(0, 0, buf, s.w, s.h); err != nil {
			t.Fatal(err)
		}
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
		if got := run(t, "float64", "--model", "m="+p, "--region", s.region); string(got) != string(want) {
			t.Error("scores.csv differs from the run on the Float32 GeoTIFF: cells without data were scored")
		}
	})

	t.Run("netCDF-4", func(t *testing.T) {
		// HDF5's error stacks for the optional attributes GDAL's driver
		// looks for ("HDF5-DIAG: Error detected in HDF5 ...") reached
		// the terminal, 60 lines a run, though the file is valid.
		nc := filepath.Join(s.dir, "model4.nc")
		toNetCDF(t, s.model, nc, "NC4")
		out := filepath.Join(outs, "nc4")
		_, se, code := runBin(t, "run", "--iterations", "20", "--region-buffers=-40,60", "--point-buffers", "40", "--hull-buffers", "0", "--out", out,
			"--occurrences", s.occ, "--model", "m="+nc, "--region", s.region)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, se)
		}
		if strings.Contains(se, "HDF5") || strings.Contains(se, "#000") {
			t.Errorf("the HDF5 library's messages reached stderr: %s", se)
		}
		if got, err := os.ReadFile(filepath.Join(out, "scores.csv")); err != nil || string(got) != string(want) {
			t.Errorf("scores.csv differs from the run on the GeoTIFF (%v)", err)
		}
	})

	t.Run("region in nested collections", func(t *testing.T) {
		dir := filepath.Join(s.dir, "nested")
		os.MkdirAll(dir, 0o755)
		region := filepath.Join(dir, filepath.Base(s.region)) // scores.csv records the region's file name
		os.WriteFile(region, []byte(polygonJSON(`{"type":"GeometryCollection","geometries":[{"type":"GeometryCollection","geometries":[`+
			`{"type":"Polygon","coordinates":[[[12.5,41.5],[18.5,41.5],[18.5,46.5],[12.5,46.5],[12.5,41.5]]]}]}]}`, ``)), 0o644)
		if got := run(t, "nested", "--model", "m="+s.model, "--region", region); string(got) != string(want) {
			t.Error("scores.csv differs from the run on the plain polygon")
		}
	})
}

// toNetCDF writes the raster src as a netCDF file dst in GDAL's format
// (NC: classic CDF-1, NC2, NC4), without the .aux.xml GDAL leaves beside
// it.
func toNetCDF(t *testing.T, src, dst, format string) {
	t.Helper()
	in, err := godal.Open(src)
	if err != nil {
		t.Fatal(err)
	}
	ds, err := in.Translate(dst, []string{"-of", "netCDF", "-co", "FORMAT=" + format})
	in.Close()
	if err != nil {
		t.Fatal(err)
	}
	ds.Close()
	os.Remove(dst + ".aux.xml")
}
