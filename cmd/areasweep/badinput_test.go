package main

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io/fs"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/extent"
)

// forbidden are words that must never reach a user's terminal: Go crash
// output and the raw prefixes of GDAL, libtiff, SQLite and GEOS messages.
var forbidden = regexp.MustCompile(`panic|goroutine|SIGSEGV|runtime error|ERROR \d+:|Warning \d+:|\bTIFF[A-Z][A-Za-z]+|sqlite|GEOS|\bGDAL: |nil pointer|ogr error|strconv\.|\bjson: |` + "`" + `|PROJ: |\bproj_[a-z]|Error \d+ \(|ERROR parsing|XML parsing of|_TIFF|_tiff|[A-Za-z]::[A-Za-z]|Exception: |HDF5-DIAG`)

// badFixture holds the good inputs of the small study plus the bad ones
// each case writes, and a separate folder for outputs.
type badFixture struct {
	*smallStudy
	outs string
}

// file writes body into the fixture's input folder and returns its path.
func (f *badFixture) file(name, body string) string {
	p := filepath.Join(f.dir, name)
	if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
		panic(err)
	}
	return p
}

// run returns the arguments of a good run with extra flags appended
// (a later flag overrides an earlier one).
func (f *badFixture) run(extra ...string) []string {
	a := []string{"run", "--model", "m=" + f.model, "--occurrences", f.occ, "--region", f.region, "--iterations", "5",
		"--region-buffers=-40,60", "--point-buffers", "40", "--hull-buffers", "0"}
	return append(a, extra...)
}

// withModel, withOcc and withRegion replace one input of a good run.
func (f *badFixture) withModel(p string, extra ...string) []string {
	return append([]string{"run", "--model", "m=" + p, "--occurrences", f.occ, "--region", f.region, "--iterations", "5"}, extra...)
}
func (f *badFixture) withOcc(p string, extra ...string) []string {
	return append([]string{"run", "--model", "m=" + f.model, "--occurrences", p, "--region", f.region, "--iterations", "5"}, extra...)
}
func (f *badFixture) withRegion(p string, extra ...string) []string {
	return append([]string{"run", "--model", "m=" + f.model, "--occurrences", f.occ, "--region", p, "--iterations", "5"}, extra...)
}

// polygonJSON is a one-feature GeoJSON layer with the given geometry and
// properties (lon/lat, CRS84).
func polygonJSON(geom, props string) string {
	return `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{` + props + `},"geometry":` + geom + `}]}`
}

const squareGeom = `{"type":"Polygon","coordinates":[[[12.5,41.5],[18.5,41.5],[18.5,46.5],[12.5,46.5],[12.5,41.5]]]}`

// rasterWith writes a 48x32 Float32 raster on the study grid whose cells
// come from fn (NaN = the nodata value), with the given geotransform and
// CRS ("" for none).
func (f *badFixture) rasterWith(t *testing.T, name string, gt [6]float64, crs string, fn func(i int) float64) string {
	t.Helper()
	p := filepath.Join(f.dir, name)
	ds, err := godal.Create(godal.GTiff, p, 1, godal.Float32, f.w, f.h, godal.CreationOption("TILED=YES", "BLOCKXSIZE=16", "BLOCKYSIZE=16"))
	if err != nil {
		t.Fatal(err)
	}
	if err := ds.SetGeoTransform(gt); err != nil {
		t.Fatal(err)
	}
	if crs != "" {
		if err := ds.SetProjection(crs); err != nil {
			t.Fatal(err)
		}
	}
	b := ds.Bands()[0]
	b.SetNoData(smallNoData)
	buf := make([]float32, f.w*f.h)
	for i := range buf {
		v := fn(i)
		if math.IsNaN(v) {
			v = smallNoData
		}
		buf[i] = float32(v)
	}
	if err := b.Write(0, 0, buf, f.w, f.h); err != nil {
		t.Fatal(err)
	}
	if err := ds.Close(); err != nil {
		t.Fatal(err)
	}
	return p
}

// treeSums returns the SHA-256 of every file under dir, by path.
func treeSums(t *testing.T, dir string) map[string]string {
	t.Helper()
	sums := map[string]string{}
	filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() || !d.Type().IsRegular() {
			return nil
		}
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatalf("read %s: %v", p, err)
		}
		h := sha256.Sum256(b)
		sums[p] = hex.EncodeToString(h[:])
		return nil
	})
	return sums
}

// leftovers lists staging folders, set-aside folders and lock files
// under the dirs.
func leftovers(dirs ...string) []string {
	var found []string
	for _, dir := range dirs {
		filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
			if err != nil {
				return nil
			}
			n := d.Name()
			if strings.Contains(n, "areasweep-partial") || strings.Contains(n, ".partial-") || strings.HasPrefix(n, ".areasweep-old-") || strings.HasSuffix(n, ".areasweep-lock") {
				found = append(found, p)
			}
			return nil
		})
	}
	return found
}

type badCase struct {
	name  string
	args  []string
	code  int
	words []string // each must appear in stderr
	dir   string   // working directory of the run ("" = the test's)
	// keepOut: the case gives --out itself (an existing folder whose
	// content must stay as it was, or a path that must stay absent).
	keepOut string
}

// TestBadInputs runs the built binary on bad inputs and settings of every
// kind. Each case checks the exit code, that stderr names the file and the
// line, feature, band or field with words a user can act on, that nothing
// was written (--out absent or unchanged, no staging folder or lock left),
// that every input is byte-identical afterwards, and that no crash output
// or raw library message reached stderr.
func TestBadInputs(t *testing.T) {
	// Outputs live apart from the inputs' parent folder, so that cases
	// whose --out is that parent see no other case's files.
	outs, err := os.MkdirTemp("", "areasweep-bad-")
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { os.RemoveAll(outs) })
	f := &badFixture{smallStudy: newSmallStudy(t), outs: outs}
	cases := f.cases(t)
	if len(cases) < 60 {
		t.Fatalf("only %d bad-input cases; the suite promises at least 60", len(cases))
	}
	for i, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel() // cases share read-only inputs; each has its own output folder
			caseDir := filepath.Join(f.outs, fmt.Sprintf("case%02d", i))
			os.MkdirAll(caseDir, 0o755)
			out := filepath.Join(caseDir, "out")
			args := append([]string{}, c.args...)
			if c.keepOut != "" {
				out = c.keepOut
			} else if args[0] == "run" || args[0] == "extents" || args[0] == "demo" {
				args = append(args, "--out", out)
			}
			if args[0] != "report" && args[0] != "completion" && !contains(args, "--quiet") {
				args = append(args, "--quiet")
			}
			before := treeSums(t, f.dir)
			outBefore := treeSums(t, out)
			_, outExisted := os.Stat(out)
			cmd := exec.Command(areasweepBin, args...)
			cmd.Dir = c.dir
			var se strings.Builder
			cmd.Stderr = &se
			code := exitCode(cmd.Run())
			stderr := se.String()
			checkRefusal(t, code, c.code, stderr, c.words)
			if len(stderr) > 3000 {
				t.Errorf("stderr is %d bytes long; a refusal should be a few lines", len(stderr))
			}
			if outExisted != nil {
				if _, err := os.Stat(out); err == nil {
					t.Errorf("--out %s was created", out)
				}
			} else if after := treeSums(t, out); !sameSums(outBefore, after) {
				t.Errorf("--out %s changed", out)
			}
			l := leftovers(f.dir, caseDir)
			beside, _ := filepath.Glob(filepath.Join(filepath.Dir(out), "."+filepath.Base(out)+".*"))
			if l = append(l, beside...); len(l) > 0 {
				t.Errorf("left behind: %v", l)
				for _, p := range l {
					os.RemoveAll(p)
				}
			}
			if after := treeSums(t, f.dir); !sameSums(before, after) {
				t.Errorf("an input file changed or appeared: %d files before, %d after", len(before), len(after))
			}
		})
	}
}

func sameSums(a, b map[string]string) bool {
	if len(a) != len(b) {
		return false
	}
	for k, v := range a {
		if b[k] != v {
			return false
		}
	}
	return true
}

// cases builds the bad inputs. Files are written into the fixture before
// any case runs.
func (f *badFixture) cases(t *testing.T) []badCase {
	gt := f.gt
	ridge := func(i int) float64 { return f.vals[i] }
	wgs := `GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["degree",0.0174532925199433]]`

	// Occurrence tables.
	occHeader := "lon,lat,role\n13.1,42.6,train\n"
	big := strings.Repeat("x", 20<<20)
	longLine := "lon,lat,role\n13.1,42.6,train\n13.5,43.0,test," + strings.Repeat("y", 2<<20) + "\n"
	var far strings.Builder
	far.WriteString("lon,lat,role\n")
	for i := 0; i < 5; i++ {
		far.WriteString(fmt.Sprintf("%d.5,%d.5,train\n%d.5,%d.5,test\n", 13+i, 43, 14+i, 44))
	}
	occDir := filepath.Join(f.dir, "occdir.csv")
	os.Mkdir(occDir, 0o755)
	// An Esri File Geodatabase (a folder of files): it passed the
	// existence check, then the checksums read it as one file and failed
	// in Go's own words, twice ("read fake.gdb: read fake.gdb: is a
	// directory"); now refused at once with the export to a GeoPackage.
	fakeGDB := filepath.Join(f.dir, "fake.gdb")
	os.Mkdir(fakeGDB, 0o755)

	// Rasters.
	allNoData := f.rasterWith(t, "allnodata.tif", gt, wgs, func(int) float64 { return math.NaN() })
	rotated := f.rasterWith(t, "rotated.tif", [6]float64{10, 0.25, 0.01, 48, 0, -0.25}, wgs, ridge)
	local := f.rasterWith(t, "local.tif", gt, `LOCAL_CS["Undefined Cartesian SRS",UNIT["metre",1]]`, ridge)
	notRaster := f.file("notraster.tif", "this is text, not a raster\n")
	good, _ := os.ReadFile(f.model)
	truncated := f.file("truncated.tif", string(good[:len(good)*2/3]))
	// A copy of the model with a nodata value set in an auxiliary file
	// only (as gdal_edit.py -a_nodata 0 leaves it on a format that cannot
	// hold one): GDAL would read it, areasweep does not.
	auxNoData := f.file("auxnodata.tif", string(good))
	f.file("auxnodata.tif.aux.xml", `<PAMDataset><PAMRasterBand band="1"><NoDataValue>0</NoDataValue></PAMRasterBand></PAMDataset>`)
	// The same with an XML declaration first, which makes GDAL skip the
	// file: the remedy says to remove that line first.
	auxDeclared := f.file("auxdecl.tif", string(good))
	f.file("auxdecl.tif.aux.xml", `<?xml version="1.0" encoding="ISO-8859-1"?>`+"\n"+`<PAMDataset><PAMRasterBand band="1"><NoDataValue>0</NoDataValue></PAMRasterBand></PAMDataset>`)
	shifted := f.rasterWith(t, "shifted.tif", [6]float64{10.5, 0.25, 0, 48, 0, -0.25}, wgs, ridge)
	// A sparse grid of 4096 x 16 million cells (within the grid size
	// limits) run with 100 region buffers: each extent keeps a slice of runs
	// per grid row, so the estimate is above 60 GB (8 GB of it the map of
	// cells with data), beyond any test machine's memory.
	huge := filepath.Join(f.dir, "huge.tif")
	{
		ds, err := godal.Create(godal.GTiff, huge, 1, godal.Byte, 4096, 16000000, godal.CreationOption("TILED=YES", "SPARSE_OK=TRUE", "BIGTIFF=YES", "BLOCKXSIZE=4096", "BLOCKYSIZE=4096"))
		if err != nil {
			t.Fatal(err)
		}
		ds.SetGeoTransform([6]float64{13, 0.00001125, 0, 90, 0, -0.00001125})
		ds.SetProjection(wgs)
		ds.Bands()[0].SetNoData(255)
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
	}

	// A model whose cells without data are marked by an alpha band (as
	// gdalwarp -dstalpha writes a Float32 raster) or by an internal mask,
	// with no nodata value: those cells hold 0, which would be scored.
	masked := func(name string, alpha bool) string {
		p := filepath.Join(f.dir, name)
		bands := 1
		if alpha {
			bands = 2
		}
		ds, err := godal.Create(godal.GTiff, p, bands, godal.Float32, f.w, f.h)
		if err != nil {
			t.Fatal(err)
		}
		ds.SetGeoTransform(gt)
		ds.SetProjection(wgs)
		vals, valid := make([]float32, f.w*f.h), make([]float32, f.w*f.h)
		mask := make([]byte, f.w*f.h)
		for i, v := range f.vals {
			if !math.IsNaN(v) {
				vals[i], valid[i], mask[i] = float32(v), 255, 255
			}
		}
		ds.Bands()[0].Write(0, 0, vals, f.w, f.h)
		if alpha {
			ds.Bands()[1].SetColorInterp(godal.CIAlpha)
			ds.Bands()[1].Write(0, 0, valid, f.w, f.h)
		} else {
			m, err := ds.CreateMaskBand(0x02) // GMF_PER_DATASET
			if err != nil {
				t.Fatal(err)
			}
			m.Write(0, 0, mask, f.w, f.h)
		}
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
		return p
	}
	alphaModel := masked("alpha.tif", true)
	maskModel := masked("masked.tif", false)
	// The same mask on a raster that also declares a nodata value: GDAL
	// takes the mask instead of the value (the refusal said the raster had
	// none).
	maskNodataModel := masked("maskednd.tif", false)
	{
		ds, err := godal.Open(maskNodataModel, godal.Update())
		if err != nil {
			t.Fatal(err)
		}
		if err := ds.Bands()[0].SetNoData(-9999); err != nil {
			t.Fatal(err)
		}
		ds.Close()
	}
	// A null whose first tile cannot be decoded (its deflate stream
	// overwritten in the middle): the message names the null as a null.
	damagedNull := func() string {
		src, err := godal.Open(f.model)
		if err != nil {
			t.Fatal(err)
		}
		p := filepath.Join(f.dir, "damagednull.tif")
		ds, err := src.Translate(p, []string{"-co", "TILED=YES", "-co", "BLOCKXSIZE=16", "-co", "BLOCKYSIZE=16", "-co", "COMPRESS=DEFLATE"})
		src.Close()
		if err != nil {
			t.Fatal(err)
		}
		off, size := ds.Bands()[0].Metadata("BLOCK_OFFSET_0_0", godal.Domain("TIFF")), ds.Bands()[0].Metadata("BLOCK_SIZE_0_0", godal.Domain("TIFF"))
		ds.Close()
		var o, n int
		if _, err := fmt.Sscan(off, &o); err != nil {
			t.Fatalf("block offset %q: %v", off, err)
		}
		if _, err := fmt.Sscan(size, &n); err != nil || n < 8 {
			t.Fatalf("block size %q: %v", size, err)
		}
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		for i := o + 2; i < o+n-4; i++ {
			b[i] ^= 0x5a
		}
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}()

	// Vector layers.
	pointLayer := f.file("point.geojson", polygonJSON(`{"type":"Point","coordinates":[14,43]}`, ``))
	lineLayer := f.file("line.geojson", polygonJSON(`{"type":"LineString","coordinates":[[14,43],[15,44]]}`, ``))
	degenerate := f.file("degenerate.geojson", polygonJSON(`{"type":"Polygon","coordinates":[[[14,43],[15,44],[16,45],[14,43]]]}`, ``))
	mixedCollection := f.file("collection.geojson", polygonJSON(`{"type":"GeometryCollection","geometries":[`+squareGeom+`,{"type":"Point","coordinates":[14,43]}]}`, ``))
	beyondPole := f.file("pole.geojson", polygonJSON(`{"type":"Polygon","coordinates":[[[14,43],[16,43],[16,99],[14,43]]]}`, ``))
	emptyLayer := f.file("empty.geojson", `{"type":"FeatureCollection","features":[]}`)
	noGeometries := f.file("nogeometries.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":null},{"type":"Feature","properties":{},"geometry":null}]}`)
	notVector := f.file("notvector.gpkg", "plain text\n")
	antimeridian := f.file("antimeridian.geojson", polygonJSON(`{"type":"Polygon","coordinates":[[[170,41],[-170,41],[-170,46],[170,46],[170,41]]]}`, ``))
	ecoNull := f.file("eco_null.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"unit":"a"},"geometry":`+squareGeom+`},{"type":"Feature","properties":{"unit":null},"geometry":{"type":"Polygon","coordinates":[[[18.5,41.5],[21,41.5],[21,46.5],[18.5,46.5],[18.5,41.5]]]}}]}`)
	ecoEmpty := f.file("eco_empty.geojson", polygonJSON(squareGeom, `"unit":""`))
	ecoGood := f.file("eco_good.geojson", polygonJSON(squareGeom, `"unit":"a"`))
	ecoPoint := f.file("eco_point.geojson", polygonJSON(`{"type":"Point","coordinates":[14,43]}`, `"unit":"a"`))
	// A GeoJSONSeq region whose second feature's type is misspelt, and
	// ArcGIS JSON units whose second feature has a hole "abc": GDAL
	// hands both over without geometry, and before, the feature was
	// skipped with the warning for one without geometry.
	seqBroken := f.file("region.geojsonl", `{"type":"Feature","properties":{},"geometry":`+squareGeom+`}`+"\n"+
		`{"type":"Feature","properties":{},"geometry":{"type":"Polygn","coordinates":[[[18.5,41.5],[21,41.5],[21,46.5],[18.5,41.5]]]}}`+"\n")
	// A TopoJSON region (GDAL reads no CRS from one) whose second
	// feature refers to an arc the file does not have: before, only "has
	// no CRS", and the conversion advised made that feature empty.
	topoBroken := f.file("region.topojson", `{"type":"Topology","objects":{"region":{"type":"GeometryCollection","geometries":[`+
		`{"type":"Polygon","arcs":[[0]]},{"type":"Polygon","arcs":[[1],[5]]}]}},`+
		`"arcs":[[[12.5,41.5],[18.5,41.5],[18.5,46.5],[12.5,46.5],[12.5,41.5]],[[18.5,41.5],[21,41.5],[21,46.5],[18.5,46.5],[18.5,41.5]]]}`)
	esriBroken := f.file("units_query.json", `{"geometryType":"esriGeometryPolygon","spatialReference":{"wkid":4326},"fields":[{"name":"unit","type":"esriFieldTypeString","length":8}],"features":[`+
		`{"attributes":{"unit":"a"},"geometry":{"rings":[[[12.5,41.5],[12.5,46.5],[18.5,46.5],[18.5,41.5],[12.5,41.5]]]}},`+
		`{"attributes":{"unit":"b"},"geometry":{"rings":[[[18.5,41.5],[18.5,46.5],[21,46.5],[21,41.5],[18.5,41.5]],"abc"]}}]}`)
	// A GeoTIFF as a desktop GIS exports it: .tif, .tfw and a .prj,
	// which GDAL does not read beside a GeoTIFF.
	tifPrj := filepath.Join(f.dir, "tifprj.tif")
	writeRaster(t, tifPrj, f.w, f.h, f.gt, f.vals, false)
	f.file("tifprj.prj", `GEOGCS["GCS_WGS_1984",DATUM["D_WGS_1984",SPHEROID["WGS_1984",6378137.0,298.257223563]],PRIMEM["Greenwich",0.0],UNIT["Degree",0.0174532925199433]]`)
	tifNoPrj := filepath.Join(f.dir, "tifnoprj.tif")
	writeRaster(t, tifNoPrj, f.w, f.h, f.gt, f.vals, false)
	noCRSshp := filepath.Join(f.dir, "nocrs.shp")
	// badPRJshp's .prj holds text that is no CRS: it was refused as
	// having "no CRS", as if the .prj were missing.
	badPRJshp := filepath.Join(f.dir, "badprj.shp")
	for _, p := range []string{noCRSshp, badPRJshp} {
		ds, err := godal.CreateVector(godal.Shapefile, p)
		if err != nil {
			t.Fatal(err)
		}
		l, err := ds.CreateLayer(strings.TrimSuffix(filepath.Base(p), ".shp"), nil, godal.GTPolygon)
		if err != nil {
			t.Fatal(err)
		}
		g, _ := godal.NewGeometryFromWKT("POLYGON ((12.5 41.5, 18.5 41.5, 18.5 46.5, 12.5 46.5, 12.5 41.5))", nil)
		l.NewFeature(g)
		ds.Close()
	}
	f.file("badprj.prj", "WGS84 lon/lat\n")
	undefGPKG := filepath.Join(f.dir, "undefined.gpkg")
	{
		src, err := godal.Open(f.region, godal.VectorOnly())
		if err != nil {
			t.Fatal(err)
		}
		dst, err := src.VectorTranslate(undefGPKG, []string{"-f", "GPKG"})
		if err != nil {
			t.Fatal(err)
		}
		dst.Close()
		src.Close()
		ds, err := godal.Open(undefGPKG, godal.VectorOnly(), godal.Update())
		if err != nil {
			t.Fatal(err)
		}
		for _, q := range []string{"UPDATE gpkg_geometry_columns SET srs_id = 0", "UPDATE gpkg_contents SET srs_id = 0"} {
			if rs, err := ds.ExecuteSQL(q, godal.SQLiteDialect()); err != nil {
				t.Fatal(err)
			} else if rs != nil {
				rs.Close()
			}
		}
		ds.Close()
	}

	// Study files.
	studyOutUp := f.file("study_out_up.yaml", "model: [m="+f.model+"]\noccurrences: "+f.occ+"\nregion: "+f.region+"\nout: ..\n")
	studyUnknown := f.file("study_unknown.yaml", "modle: x\n")
	studyType := f.file("study_type.yaml", "model: [m="+f.model+"]\noccurrences: occ.csv\nregion: region.geojson\niterations: many\n")
	studyDup := f.file("study_dup.yaml", "occurrences: a.csv\noccurrences: b.csv\n")
	studyBig := f.file("study_big.yaml", "# "+strings.Repeat("z", 2<<20)+"\n")
	studyDir := filepath.Join(f.dir, "study.d")
	os.Mkdir(studyDir, 0o755)

	// Results files for report.
	reportDir := func(name string, body string) string {
		d := filepath.Join(f.outs, name)
		os.MkdirAll(d, 0o755)
		if body != "" {
			os.WriteFile(filepath.Join(d, "results.json"), []byte(body), 0o644)
		}
		return d
	}
	badAUC := func() string {
		b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "report", "sample_results.json"))
		if err != nil {
			t.Fatal(err)
		}
		var m map[string]any
		if err := json.Unmarshal(b, &m); err != nil {
			t.Fatal(err)
		}
		for _, s := range m["scores"].([]any) {
			if sc := s.(map[string]any); sc["scored"] == true {
				sc["auc"] = -5
				break
			}
		}
		out, _ := json.Marshal(m)
		return string(out)
	}()
	rdShard := reportDir("report-shard", "")
	os.WriteFile(filepath.Join(rdShard, "shard-1-of-2.aspf"), []byte("ASPF"), 0o644)
	rdFile := filepath.Join(reportDir("report-file", ""), "notes.txt")
	os.WriteFile(rdFile, []byte("mine"), 0o644)
	rdEmptyObject := reportDir("report-empty-object", `{}`)
	rdArray := reportDir("report-array", `[1, 2]`)
	rdFigFile := reportDir("report-figures-file", "{}")
	os.WriteFile(filepath.Join(rdFigFile, "figures"), []byte("mine"), 0o644)
	rdNone := reportDir("report-none", "")
	rdAUC := reportDir("report-auc", badAUC)
	rdBroken := reportDir("report-broken", `{"schema_version": 1, "scores": [`)
	rdSchema := reportDir("report-schema", `{"schema_version": 99}`)
	rdOldSchema := reportDir("report-old-schema", `{"schema_version": 3, "software": {"name": "areasweep", "version": "0.1.0-dev"}}`)

	// Existing outputs.
	nonEmpty := filepath.Join(f.outs, "nonempty")
	os.MkdirAll(nonEmpty, 0o755)
	os.WriteFile(filepath.Join(nonEmpty, "notes.txt"), []byte("mine"), 0o644)
	ownFigure := filepath.Join(f.outs, "ownfigure")
	os.MkdirAll(filepath.Join(ownFigure, "figures"), 0o755)
	os.WriteFile(filepath.Join(ownFigure, "figures", "my_figure.png"), []byte("mine"), 0o644)
	os.WriteFile(filepath.Join(ownFigure, "results.json"), []byte("{}"), 0o644)
	aFile := filepath.Join(f.outs, "afile")
	os.WriteFile(aFile, []byte("x"), 0o644)

	// With the fixture's two region buffers, tooMany makes MaxMembers
	// region buffers plus the base region: one member more than the family
	// holds, refused as the members are listed; many is more values than a
	// buffer list takes.
	many := make([]string, extent.MaxMembers+1)
	for i := range many {
		many[i] = fmt.Sprint(i + 1)
	}
	tooMany := strings.Join(many[:extent.MaxMembers-2], ",")
	tooManyMsg := fmt.Sprintf("more extents than the %d a run holds (base and whole raster 2, region buffers 10", extent.MaxMembers)
	hundred := strings.Join(many[:100], ",")
	manyThresholds := make([]string, 1001)
	for i := range manyThresholds {
		manyThresholds[i] = fmt.Sprintf("%g", float64(i)/1001)
	}

	return []badCase{
		// Settings and flags.
		{"e above 1", f.run("--e", "1.5"), 2, []string{"--e", "1.5", "(0,1)"}, "", ""},
		{"e zero", f.run("--e", "0"), 2, []string{"--e", "(0,1)"}, "", ""},
		{"e twice", f.run("--e", "0.05,0.05"), 2, []string{"--e", "0.05 twice"}, "", ""},
		{"thresholds twice", f.run("--thresholds", "0.5,0.2,0.5"), 2, []string{"--thresholds", "0.5 twice"}, "", ""},
		{"thresholds too many", f.run("--thresholds", strings.Join(manyThresholds, ",")), 2, []string{"--thresholds", "1001 values", "at most 1000"}, "", ""},
		{"thresholds not numbers", f.run("--thresholds", "0.5,high"), 2, []string{"--thresholds", "high"}, "", ""},
		// 1000 thresholds are allowed, but omitted_points.gpkg holds a
		// column per model or null and threshold, and a GeoPackage table
		// at most 1998 besides its id and geometry: two models and the
		// distance-only null with 1000 thresholds (2 + 3 x 1002 = 3008
		// columns) ran to the end and failed there (exit 1, SQLite's "too
		// many columns on test_points"). The most that fit: (1998 - 2) / 3
		// - 2 = 663 thresholds, and (1998 - 2) / 2 - 2 = 996 without the
		// null.
		{"thresholds: more columns than omitted_points.gpkg holds", f.run("--model", "m2="+f.model2, "--thresholds", strings.Join(manyThresholds[:1000], ",")), 2,
			[]string{"--thresholds has 1000 value(s)", "3 model(s) and null(s)", "3008 columns", "give at most 663 --thresholds, or add --no-distance-null"}, "", ""},
		{"thresholds: more columns than omitted_points.gpkg holds, no distance-only null", f.run("--model", "m2="+f.model2, "--no-distance-null", "--thresholds", strings.Join(manyThresholds[:1000], ",")), 2,
			[]string{"2 model(s) and null(s)", "2006 columns", "give at most 996 --thresholds"}, "", ""},
		{"iterations zero", f.run("--iterations", "0"), 2, []string{"--iterations is 0"}, "", ""},
		{"iterations too many", f.run("--iterations", "2000000"), 2, []string{"--iterations", "1000000"}, "", ""},
		{"fraction zero", f.run("--fraction", "0"), 2, []string{"--fraction 0"}, "", ""},
		{"fraction above 1", f.run("--fraction", "1.5"), 2, []string{"--fraction 1.5"}, "", ""},
		{"workers huge", f.run("--workers", "100000"), 2, []string{"--workers is 100000", "256"}, "", ""},
		{"workers negative", f.run("--workers", "-1"), 2, []string{"--workers is -1"}, "", ""},
		{"point buffer negative", f.run("--point-buffers=-5"), 2, []string{"--point-buffers", "-5", "positive"}, "", ""},
		{"hull buffer negative", f.run("--hull-buffers=-1"), 2, []string{"--hull-buffers", "-1"}, "", ""},
		{"region buffers too many", f.run("--region-buffers=" + strings.Join(many, ",")), 2, []string{"--region-buffers", fmt.Sprintf("values; at most %d", extent.MaxMembers)}, "", ""},
		{"region buffers not numbers", f.run("--region-buffers=10,ten"), 2, []string{"--region-buffers", "ten"}, "", ""},
		{"more extents than the family holds", f.run("--region-buffers="+tooMany, "--point-buffers", "10,20,30", "--hull-buffers", "0,10"), 2, []string{tooManyMsg}, "", ""},
		{"extents: more than the family holds", append([]string{"extents"}, f.run("--region-buffers="+tooMany, "--point-buffers", "10,20,30", "--hull-buffers", "0,10")[1:]...), 2, []string{tooManyMsg}, "", ""},
		{"ecoregion min points zero", f.run("--ecoregions", ecoGood, "--ecoregion-field", "unit", "--ecoregion-min-points", "0"), 2, []string{"--ecoregion-min-points is 0"}, "", ""},
		{"ecoregions without field", f.run("--ecoregions", ecoGood), 2, []string{"--ecoregion-field"}, "", ""},
		{"model without path", []string{"run", "--model", "m=", "--occurrences", f.occ, "--region", f.region}, 2, []string{"--model", "no PATH"}, "", ""},
		{"model without name", []string{"run", "--model", f.model, "--occurrences", f.occ, "--region", f.region}, 2, []string{"--model", "no '='"}, "", ""},
		{"model name twice", f.run("--model", "m="+f.model2), 2, []string{"name \"m\" is given twice"}, "", ""},
		// Its example is a polygon layer, not a model raster.
		{"extra without name", f.run("--extra", f.region), 2, []string{"--extra", "no '='", "for example lakes=layers/lakes.gpkg"}, "", ""},
		{"unknown command", []string{"bogus"}, 2, []string{`unknown command "bogus"`, "areasweep --help"}, "", ""},
		{"completion for an unknown shell", []string{"completion", "tcsh"}, 2, []string{`unknown command "tcsh"`, "areasweep completion --help"}, "", ""},
		{"merge given nothing", []string{"merge", "--out", filepath.Join(f.outs, "merged")}, 2, []string{"no partial file given"}, "", filepath.Join(f.outs, "merged")},
		{"unknown flag", []string{"run", "--modle", "x"}, 2, []string{"unknown flag: --modle"}, "", ""},
		{"seed negative", f.run("--seed", "-1"), 2, []string{"--seed", `"-1" is not a whole number of 0 or more`}, "", ""},
		{"iterations not a whole number", f.run("--iterations", "1.5"), 2, []string{"--iterations", `"1.5" is not a whole number`}, "", ""},
		// Base prefixes were read as Go reads them (0x10 = 16, 0701 = 449).
		{"seed in hexadecimal", f.run("--seed", "0x10"), 2, []string{"--seed", `"0x10" is not a whole number of 0 or more in decimal digits`}, "", ""},
		{"iterations with an underscore", f.run("--iterations", "1_000"), 2, []string{"--iterations", `"1_000" is not a whole number in decimal digits`}, "", ""},
		{"demo seed out of range", []string{"demo", "--scenario-seed", "99999999999999999999"}, 2, []string{"--scenario-seed", "is out of range", "demo --help"}, "", ""},
		{"report given two folders", []string{"report", f.outs, f.outs}, 2, []string{"'areasweep report' takes one argument, DIR (got 2: ", "report --help"}, "", ""},
		{"occurrences crs unknown", f.run("--occurrences-crs", "EPSG:999999"), 2, []string{"--occurrences-crs", "EPSG:999999"}, "", ""},
		{"occurrences crs a bare number", f.run("--occurrences-crs", "3035"), 2, []string{"--occurrences-crs", `"3035"`, "EPSG:3035"}, "", ""},
		{"occurrences crs not a CRS", f.run("--occurrences-crs", "lonlat"), 2, []string{"--occurrences-crs", `"lonlat"`, "EPSG:3035", "+proj="}, "", ""},
		// PROJ's words for these reached the user whole (a sweep of malformed inputs):
		// "PROJ: proj_create_operations: ..." and "Cannot find coordinate
		// operations from `ENGCRS[...]' to `EPSG:4326'".
		{"occurrences crs of Mars", f.run("--occurrences-crs", `GEOGCS["Mars 2000",DATUM["D_Mars_2000",SPHEROID["Mars_2000_IAU_IAG",3396190.0,169.89444722361179]],PRIMEM["Greenwich",0],UNIT["Decimal_Degree",0.0174532925199433]]`), 2, []string{"--occurrences-crs", "cannot be transformed to WGS84", "same celestial body", "a CRS of the Earth"}, "", ""},
		{"occurrences crs a local engineering one", f.run("--occurrences-crs", `LOCAL_CS["arbitrary",UNIT["metre",1]]`), 2, []string{"--occurrences-crs", "neither a geographic nor a projected CRS", "EPSG:4326"}, "", ""},
		{"occurrences crs geocentric", f.run("--occurrences-crs", "EPSG:4978"), 2, []string{"--occurrences-crs", `"EPSG:4978"`, "neither a geographic nor a projected CRS"}, "", ""},
		{"occurrences crs vertical", f.run("--occurrences-crs", "EPSG:5703"), 2, []string{"--occurrences-crs", `"EPSG:5703"`, "neither a geographic nor a projected CRS"}, "", ""},
		{"occurrences crs an unknown projection", f.run("--occurrences-crs", "+proj=garbage +foo"), 2, []string{"--occurrences-crs", "(Unknown projection)"}, "", ""},
		// Points beyond a world map's outline: PROJ's inverse fails on
		// Mollweide, and on Equal Earth gives a position on the other side
		// of the Earth (the second point came back as 79 W, 75 N and would
		// have been placed there).
		{"occurrences beyond Mollweide's outline", f.withOcc(f.file("offmap_moll.csv", "x,y,role\n1557116.5,-325493.1,train\n18500000,100,test\n"), "--occurrences-crs", "ESRI:54009"), 2,
			[]string{"offmap_moll.csv", "line 3 (18500000, 100)", "not on the Earth in ESRI:54009", "--occurrences-crs"}, "", ""},
		{"occurrences beyond Equal Earth's outline", f.withOcc(f.file("offmap_ee.csv", "x,y,role\n1557116.5,-325493.1,train\n17300000,8000000,test\n"), "--occurrences-crs", "EPSG:8857"), 2,
			[]string{"offmap_ee.csv", "line 3 (17300000, 8000000)", "not on the Earth in EPSG:8857", "beyond the outline of a world map"}, "", ""},
		// Expat's words for an XML file cut short reached the user with
		// GDAL's "ERROR parsing kml" and "XML parsing of GML file failed".
		// libtiff's "Can not read directory count" reached the user.
		{"model a TIFF cut after 8 bytes", f.withModel(f.file("cut8.tif", "II*\x00\x08\x00\x00\x00")), 2, []string{"cut8.tif", "its TIFF header cannot be read: the file is cut short"}, "", ""},
		{"region a KML file cut short", f.withRegion(f.file("cut.kml", `<?xml version="1.0" encoding="utf-8" ?>
<kml xmlns="http://www.opengis.net/kml/2.2"><Document><Placemark>`)), 2, []string{"cut.kml", "its XML is not valid at line 2", "ends before its elements are closed"}, "", ""},
		// LIBKML read a <coordinates> text up to its first word that is
		// not a number: the area was cut short, or skipped as no geometry.
		{"region a KML Placemark whose coordinates are not coordinates", f.withRegion(f.file("garbage.kml", `<?xml version="1.0" encoding="utf-8" ?>
<kml xmlns="http://www.opengis.net/kml/2.2"><Document><Placemark><name>Area</name><Polygon><outerBoundaryIs><LinearRing>
<coordinates>12.5,41.5 18.5,41.5 18.5,46.5 garbage</coordinates></LinearRing></outerBoundaryIs></Polygon></Placemark></Document></kml>`)), 2, []string{"region: ", `garbage.kml Placemark 1 ("Area")`, "line 3", `"garbage"`, "delete the Placemark"}, "", ""},
		{"region a GML file cut short", f.withRegion(f.file("cut.gml", `<?xml version="1.0" encoding="utf-8" ?>
<ogr:FeatureCollection xmlns:ogr="http://ogr.maptools.org/" xmlns:gml="http://www.opengis.net/gml">
<gml:featureMember><ogr:region>`)), 2, []string{"cut.gml", "its XML is not valid at line 3", "ends before its elements are closed"}, "", ""},
		// The HDF5 library printed its whole error stack ("HDF5-DIAG:
		// Error detected in HDF5 ...") on the terminal for a damaged HDF5
		// file, past GDAL's error handler (a sweep of malformed inputs).
		{"model a damaged HDF5 file", f.withModel(f.file("cut.h5", "\x89HDF\r\n\x1a\n"+strings.Repeat("\x00", 600))), 2, []string{"cut.h5", "begins as an HDF5 file", "no GDAL driver reads it"}, "", ""},
		{"region a damaged HDF5 file", f.withRegion(f.file("cut2.h5", "\x89HDF\r\n\x1a\n"+strings.Repeat("\x00", 600))), 2, []string{"region: ", "cut2.h5", "no GDAL driver reads it", "GeoPackage"}, "", ""},
		{"no region", []string{"run", "--model", "m=" + f.model, "--occurrences", f.occ}, 2, []string{"--region"}, "", ""},
		{"no occurrences", []string{"run", "--model", "m=" + f.model, "--region", f.region}, 2, []string{"--occurrences"}, "", ""},
		{"out empty", append(f.run("--out", ""), "--quiet"), 2, []string{"--out is empty"}, "", filepath.Join(f.outs, "never")},

		// The output folder.
		{"out is the inputs folder, force", append(f.run("--out", f.dir, "--force"), "--quiet"), 2, []string{"holds the input", "whatever --force says"}, "", f.dir},
		{"out contains the inputs folder, force", append(f.run("--out", filepath.Dir(f.dir), "--force"), "--quiet"), 2, []string{"holds the input"}, "", filepath.Dir(f.dir)},
		{"out is the current folder holding inputs", append(f.run("--out", ".", "--force"), "--quiet"), 2, []string{"holds the input"}, f.dir, f.dir},
		{"study file out: ..", []string{"run", "--study", studyOutUp, "--force", "--quiet"}, 2, []string{"holds the input"}, "", filepath.Dir(f.dir)},
		{"out is a file", append(f.run("--out", aFile), "--quiet"), 2, []string{"not a directory; name a folder for the results"}, "", aFile},
		{"out not empty without force", append(f.run("--out", nonEmpty), "--quiet"), 2, []string{"not empty", "--force"}, "", nonEmpty},
		{"force with a file of the user's in figures/", append(f.run("--out", ownFigure, "--force"), "--quiet"), 2, []string{"my_figure.png", "not written by areasweep", "--force replaces as a whole"}, "", ownFigure},
		{"out is an input file", append(f.run("--out", f.occ, "--force"), "--quiet"), 2, []string{"is the input file", "name a folder"}, "", f.occ},
		{"batch out is a file", []string{"batch", f.file("table.csv", "id,model,occurrences,region\na,m="+f.model+","+f.occ+","+f.region+"\n"), "--out", aFile}, 2, []string{"afile exists and is not a directory"}, "", aFile},
		{"out below a file", append(f.run("--out", filepath.Join(aFile, "sub")), "--quiet"), 2, []string{"afile", "cannot be used", "not a directory"}, "", filepath.Join(aFile, "sub")},

		// Occurrence tables.
		{"occurrences missing", f.withOcc(filepath.Join(f.dir, "nope.csv")), 2, []string{"nope.csv", "does not exist"}, "", ""},
		{"occurrences is a folder", f.withOcc(occDir), 2, []string{"occdir.csv", "directory"}, "", ""},
		{"occurrences is a device", f.withOcc("/dev/zero"), 2, []string{"/dev/zero", "not a regular file"}, "", ""},
		{"occurrences is a GeoTIFF", f.withOcc(f.file("occ_tif.csv", string(good))), 2, []string{"occ_tif.csv", "binary file", "GeoTIFF", "CSV"}, "", ""},
		{"occurrences empty", f.withOcc(f.file("empty.csv", "")), 2, []string{"empty.csv", "empty"}, "", ""},
		{"occurrences header only", f.withOcc(f.file("header.csv", "lon,lat,role\n")), 2, []string{"header.csv", "only a header"}, "", ""},
		{"occurrences no role column", f.withOcc(f.file("norole.csv", "lon,lat\n13,43\n")), 2, []string{"norole.csv", "role"}, "", ""},
		{"occurrences bad role", f.withOcc(f.file("badrole.csv", occHeader+"13.5,43,maybe\n")), 2, []string{"badrole.csv line 3", `column "role"`, "maybe"}, "", ""},
		{"occurrences decimal comma", f.withOcc(f.file("comma.csv", occHeader+"13,5,43,5,test\n")), 2, []string{"comma.csv line 3", "decimal comma"}, "", ""},
		{"occurrences 20 MB cell", f.withOcc(f.file("bigcell.csv", occHeader+"13.5,43,"+big+"\n")), 2, []string{"bigcell.csv", "longer than"}, "", ""},
		{"occurrences long role echoed short", f.withOcc(f.file("longrole.csv", occHeader+"13.5,43,"+strings.Repeat("r", 5000)+"\n")), 2, []string{"longrole.csv line 3", "(5000 characters)"}, "", ""},
		{"occurrences line over 1 MiB", f.withOcc(f.file("longline.csv", longLine)), 2, []string{"longline.csv line 3", "longer than"}, "", ""},
		{"occurrences bad number", f.withOcc(f.file("badnum.csv", occHeader+"13.5,abc,test\n")), 2, []string{"badnum.csv line 3", `column "lat"`, "abc"}, "", ""},
		{"occurrences latitude 95", f.withOcc(f.file("lat95.csv", occHeader+"13.5,95,test\n")), 2, []string{"lat95.csv line 3", "95"}, "", ""},
		{"occurrences swapped", f.withOcc(f.file("swapped.csv", "lon,lat,role\n43,13,train\n44,120,test\n")), 2, []string{"swapped.csv", "swapped"}, "", ""},
		{"occurrences UTF-16", f.withOcc(f.file("utf16.csv", "\xff\xfel\x00o\x00n\x00")), 2, []string{"utf16.csv line 1", "UTF-16"}, "", ""},
		{"occurrences no test", f.withOcc(f.file("notest.csv", occHeader)), 2, []string{"notest.csv", "test"}, "", ""},
		{"occurrences no train", f.withOcc(f.file("notrain.csv", "lon,lat,role\n13.5,43,test\n")), 2, []string{"notrain.csv", "train"}, "", ""},
		{"occurrences bad quote", f.withOcc(f.file("quote.csv", occHeader+"13.5,\"43,test\n")), 2, []string{"quote.csv line 3", "quote"}, "", ""},
		{"occurrences all outside", f.withOcc(f.file("outside.csv", "lon,lat,role\n100,10,train\n101,11,test\n")), 2, []string{"outside.csv", "outside the raster"}, "", ""},
		// Both in range, in each other's columns: the range check cannot
		// tell, the grid (10..22 E, 40..48 N) can.
		{"occurrences swapped within range", f.withOcc(f.file("swapped2.csv", "lon,lat,role\n43,13.5,train\n44,14,test\n")), 2, []string{"swapped2.csv", "every point lies outside the raster", "with longitude and latitude swapped, 2 of the 2 points would lie on cells with data"}, "", ""},
		{"occurrences degrees with a projected CRS", f.withOcc(f.file("degrees.csv", far.String()), "--occurrences-crs", "EPSG:3035"), 2, []string{"degrees.csv", "look like degrees", "EPSG:3035"}, "", ""},
		{"occurrences test points on no data", f.withOcc(f.file("nodata.csv", "lon,lat,role\n13.5,43,train\n21.5,40.5,test\n")), 2, []string{"nodata.csv", "no test point", "model.tif"}, "", ""},

		// Study files.
		{"study missing", []string{"run", "--study", filepath.Join(f.dir, "nope.yaml")}, 2, []string{"nope.yaml"}, "", ""},
		{"study is a folder", []string{"run", "--study", studyDir}, 2, []string{"study.d", "directory"}, "", ""},
		{"study unknown key", []string{"run", "--study", studyUnknown}, 2, []string{"study_unknown.yaml line 1", "modle"}, "", ""},
		{"study wrong type", []string{"run", "--study", studyType}, 2, []string{"study_type.yaml line 4", "iterations", "many"}, "", ""},
		{"study repeated key", []string{"run", "--study", studyDup}, 2, []string{"study_dup.yaml line 2", "occurrences"}, "", ""},
		{"study too large", []string{"run", "--study", studyBig}, 2, []string{"study_big.yaml", "larger than 1 MiB"}, "", ""},

		// Model rasters.
		{"model missing", f.withModel(filepath.Join(f.dir, "nope.tif")), 2, []string{"model m", "nope.tif", "does not exist"}, "", ""},
		{"two models in one flag", f.withModel(f.model + ",m2=" + f.model2), 2, []string{"model m", "several NAME=PATH items", "--model a=x.tif --model b=y.tif"}, "", ""},
		{"model is a folder", f.withModel(studyDir), 2, []string{"study.d", "directory"}, "", ""},
		{"model not a raster", f.withModel(notRaster), 2, []string{"notraster.tif", "not a raster GDAL can read"}, "", ""},
		{"model of 0 bytes", f.withModel(f.file("zero.tif", "")), 2, []string{"model m", "zero.tif", "empty (0 bytes)"}, "", ""},
		{"region of 0 bytes", f.withRegion(f.file("zero.gpkg", "")), 2, []string{"region", "zero.gpkg", "empty (0 bytes)"}, "", ""},
		{"model truncated", f.withModel(truncated), 2, []string{"truncated.tif"}, "", ""},
		{"model: a GeoTIFF without CRS beside its .prj", f.withModel(tifPrj), 2, []string{"tifprj.tif has no coordinate reference system of its own", "GDAL does not read the", "gdal_translate -a_srs " + filepath.Join(f.dir, "tifprj.prj") + " " + tifPrj + " " + filepath.Join(f.dir, "tifprj_crs.tif")}, "", ""},
		{"model: a GeoTIFF without CRS", f.withModel(tifNoPrj), 2, []string{"tifnoprj.tif has no coordinate reference system", "gdal_translate -a_srs EPSG:4326 " + tifNoPrj + " " + filepath.Join(f.dir, "tifnoprj_crs.tif")}, "", ""},
		{"model: an ASCII grid without .prj", f.withModel(f.file("noprj.asc", "ncols 2\nnrows 2\nxllcorner 10\nyllcorner 40\ncellsize 0.25\n1 2\n3 4\n")), 2, []string{"noprj.asc", "no coordinate reference system", "noprj.prj", "gdal_translate -a_srs"}, "", ""},
		{"model with nodata in an .aux.xml only", f.withModel(auxNoData), 2, []string{"model m", "auxnodata.tif.aux.xml", "the nodata value 0", "never reads .aux.xml", "gdal_translate " + auxNoData}, "", ""},
		{"model whose .aux.xml begins with an XML declaration", f.withModel(auxDeclared), 2, []string{"model m", "auxdecl.tif.aux.xml", "the nodata value 0", "remove its first line", "gdal_translate " + auxDeclared}, "", ""},
		// A null is named "model NAME" as in its other grid and data errors.
		{"null with nodata in an .aux.xml only", f.run("--null", "n="+auxNoData), 2, []string{"null n", "auxnodata.tif.aux.xml", "the nodata value 0"}, "", ""},
		{"extents: model with nodata in an .aux.xml only", []string{"extents", "--model", "m=" + auxNoData, "--occurrences", f.occ, "--region", f.region}, 2, []string{"model m", "auxnodata.tif.aux.xml", "the nodata value 0"}, "", ""},
		{"model rotated", f.withModel(rotated), 2, []string{"rotated.tif", "rotated"}, "", ""},
		{"model undefined CRS", f.withModel(local), 2, []string{"local.tif", "undefined"}, "", ""},
		{"model all no data", f.withModel(allNoData), 2, []string{"allnodata.tif", "every cell", "no data"}, "", ""},
		// A later pass finds it itself (no range read before the pass).
		{"null all no data", f.run("--null", "n="+allNoData), 2, []string{"null n", "allnodata.tif", "every cell", "no data"}, "", ""},
		{"null with a tile that cannot be decoded", f.run("--null", "n="+damagedNull), 2, []string{"null n", "damagednull.tif", "the block at column 0 row 0 cannot be read"}, "", ""},
		{"model with an alpha band", f.withModel(alphaModel), 2, []string{"model m", "alpha.tif", "alpha band", "gdalwarp -ot Float32 -dstnodata -9999"}, "", ""},
		{"null with an internal mask", f.run("--null", "n="+maskModel), 2, []string{"null n", "masked.tif", "by a mask", "gdalwarp"}, "", ""},
		{"model with an internal mask and a nodata value", f.run("--model", "m2="+maskNodataModel), 2, []string{"model m2", "maskednd.tif marks its cells without data by a mask", "which GDAL takes instead of its nodata value (-9999)", "the cells the mask alone marks", "gdalwarp"}, "", ""},
		{"models on different grids", f.run("--model", "s="+shifted), 2, []string{"shifted.tif", "geotransform"}, "", ""},
		{"model needing too much memory", []string{"run", "--model", "m=" + huge, "--occurrences", f.file("hugeocc.csv", "lon,lat,role\n13.01,42.6,train\n13.02,43,test\n"), "--region", f.region, "--iterations", "5", "--region-buffers=" + hundred}, 2, []string{"memory", "4096x16000000", "gdalwarp"}, "", ""},

		// Vector layers.
		{"region missing", f.withRegion(filepath.Join(f.dir, "nope.gpkg")), 2, []string{"region", "nope.gpkg", "does not exist"}, "", ""},
		{"region a File Geodatabase", f.withRegion(fakeGDB), 2, []string{"region: " + fakeGDB + " is a File Geodatabase, a folder of many files", "ogr2ogr -f GPKG OUT.gpkg " + fakeGDB + " LAYER"}, "", ""},
		// The File Geodatabase is refused with the inputs' existence,
		// before the occurrence table is read (its checksum failed after
		// the points, so the table's error came first).
		{"occurrences bad and region a File Geodatabase", []string{"run", "--model", "m=" + f.model, "--occurrences", f.file("badnum2.csv", occHeader+"13.5,abc,test\n"), "--region", fakeGDB, "--iterations", "5"}, 2, []string{"fake.gdb is a File Geodatabase"}, "", ""},
		{"region a zipped shapefile", f.withRegion(f.file("region.zip", "PK\x03\x04 not really")), 2, []string{"region.zip", "unzipped first"}, "", ""},
		{"region a GDAL virtual path", f.withRegion("/vsizip/" + filepath.Join(f.dir, "region.zip") + "/region.shp"), 2, []string{"region", "/vsizip/", "local files only", "unzip"}, "", ""},
		{"model a URL", f.withModel("https://example.invalid/model.tif"), 2, []string{"model m", "https://example.invalid/model.tif", "URL", "download"}, "", ""},
		{"region is a raster", f.withRegion(f.model), 2, []string{"region: ", "model.tif is a raster, not a vector file"}, "", ""},
		{"model is a vector file", f.withModel(f.region), 2, []string{"model m", "region.geojson is a vector file or a table", "not a raster"}, "", ""},
		{"ecoregions error names the input", f.run("--ecoregions", ecoGood, "--ecoregion-field", "zone"), 2, []string{"ecoregions: ", `no field "zone"`}, "", ""},
		{"region not a vector file", f.withRegion(notVector), 2, []string{"notvector.gpkg", "not a vector file"}, "", ""},
		{"region empty layer", f.withRegion(emptyLayer), 2, []string{`empty.geojson layer "empty" holds no features at all (a FeatureCollection whose "features" list is empty)`, "give the file that holds the area's polygons, or export them again"}, "", ""},
		{"region whose features all lack a geometry", f.withRegion(noGeometries), 2, []string{"nogeometries.geojson", "none of its 2 feature(s) has a geometry GDAL can read", "export them again"}, "", ""},
		{"region GeoJSONSeq with a geometry that cannot be decoded", f.withRegion(seqBroken), 2, []string{"region.geojsonl feature 2 has a geometry that cannot be decoded", `"Polygn"`, "set its \"geometry\" to null"}, "", ""},
		{"region TopoJSON with an arc it does not have", f.withRegion(topoBroken), 2, []string{`region.topojson layer "region" feature 2 has a geometry that cannot be decoded`, "refers to arc 5", "ogr2ogr -a_srs EPSG:4326"}, "", ""},
		{"ecoregions ArcGIS JSON with a hole that cannot be decoded", f.run("--ecoregions", esriBroken, "--ecoregion-field", "unit"), 2, []string{"ecoregions: ", "units_query.json feature 2 has a geometry that cannot be decoded", `its "rings" are not numbers`}, "", ""},
		{"region point", f.withRegion(pointLayer), 2, []string{"point.geojson feature 1", "point"}, "", ""},
		{"region line", f.withRegion(lineLayer), 2, []string{"line.geojson feature 1", "linestring"}, "", ""},
		{"region degenerate polygon", f.withRegion(degenerate), 2, []string{"degenerate.geojson feature 1", "degenerate"}, "", ""},
		{"region collection with a point", f.withRegion(mixedCollection), 2, []string{"collection.geojson feature 1", "part 2", "point"}, "", ""},
		{"region vertex beyond the pole", f.withRegion(beyondPole), 2, []string{"pole.geojson feature 1", "latitude 99"}, "", ""},
		{"region without CRS", f.withRegion(noCRSshp), 2, []string{"nocrs.shp", "no CRS"}, "", ""},
		{"region whose .prj is no CRS", f.withRegion(badPRJshp), 2, []string{"region: ", "badprj.shp has no CRS: its CRS file", `badprj.prj could not be read as a CRS (it holds "WGS84 lon/lat")`, "gdalsrsinfo -o wkt_esri --single-line EPSG:4326 >"}, "", ""},
		{"region undefined CRS", f.withRegion(undefGPKG), 2, []string{"undefined.gpkg", "undefined CRS", "Undefined geographic SRS"}, "", ""},
		{"region outside the raster", f.withRegion(f.far), 2, []string{"far.geojson", "covers no cell"}, "", ""},
		{"region across the antimeridian", f.withRegion(antimeridian), 2, []string{"antimeridian.geojson", "from lon 170.0000 to -170.0000"}, "", ""},
		{"extents: region point", append([]string{"extents"}, f.withRegion(pointLayer)[1:]...), 2, []string{"point.geojson feature 1", "point"}, "", ""},
		{"ecoregions NULL id", f.run("--ecoregions", ecoNull, "--ecoregion-field", "unit"), 2, []string{"eco_null.geojson", "NULL", `"unit"`}, "", ""},
		{"ecoregions empty id", f.run("--ecoregions", ecoEmpty, "--ecoregion-field", "unit"), 2, []string{"eco_empty.geojson feature 1", "no value", `"unit"`}, "", ""},
		{"ecoregions missing field", f.run("--ecoregions", ecoGood, "--ecoregion-field", "zone"), 2, []string{"eco_good.geojson", `no field "zone"`, "unit"}, "", ""},
		{"ecoregions point", f.run("--ecoregions", ecoPoint, "--ecoregion-field", "unit"), 2, []string{"eco_point.geojson feature 1", "point"}, "", ""},
		{"extents: ecoregions missing field", append([]string{"extents"}, f.run("--ecoregions", ecoGood, "--ecoregion-field", "zone")[1:]...), 2, []string{`no field "zone"`}, "", ""},
		{"extra unreadable", f.run("--extra", "x="+notVector), 2, []string{"notvector.gpkg", "not a vector file"}, "", ""},
		{"extra line", f.run("--extra", "x="+lineLayer), 2, []string{"line.geojson feature 1", "linestring"}, "", ""},

		// report DIR.
		{"report without results", []string{"report", rdNone}, 2, []string{"results.json not found"}, "", rdNone},
		{"report AUC -5", []string{"report", rdAUC}, 2, []string{"results.json", ".auc: -5 is outside [0, 1]"}, "", rdAUC},
		{"report broken JSON", []string{"report", rdBroken}, 2, []string{"results.json", "not a results file"}, "", rdBroken},
		{"report other schema", []string{"report", rdSchema}, 2, []string{"schema_version 99"}, "", rdSchema},
		{"report older schema", []string{"report", rdOldSchema}, 2, []string{"schema_version 3, written by an earlier areasweep (0.1.0-dev)", "run the study again with this build"}, "", rdOldSchema},
		{"report where figures is a file", []string{"report", rdFigFile, "--force"}, 2, []string{"figures is a file", "move the file"}, "", rdFigFile},
		{"report on a shard's folder", []string{"report", rdShard}, 2, []string{"shard-1-of-2.aspf", "merge the shards first"}, "", rdShard},
		{"report on a file", []string{"report", rdFile}, 2, []string{"notes.txt is a file", "folder holding results.json"}, "", filepath.Dir(rdFile)},
		{"report on an empty object", []string{"report", rdEmptyObject}, 2, []string{"results.json", "not a results file written by areasweep", "no schema_version"}, "", rdEmptyObject},
		{"report on a JSON array", []string{"report", rdArray}, 2, []string{"results.json", "holds a JSON array, not an object"}, "", rdArray},
		{"demo workers huge", []string{"demo", "--workers", "100000"}, 2, []string{"--workers is 100000"}, "", ""},
	}
}

// checkRefusal checks a command's exit code against want, that its stderr
// says each of words, and that it holds nothing of forbidden (a Go panic,
// a raw library message).
func checkRefusal(t *testing.T, code, want int, stderr string, words []string) {
	t.Helper()
	if code != want {
		t.Errorf("exit %d, want %d; stderr: %s", code, want, stderr)
	}
	for _, w := range words {
		if !strings.Contains(stderr, w) {
			t.Errorf("stderr does not say %q: %s", w, stderr)
		}
	}
	if m := forbidden.FindString(stderr); m != "" {
		t.Errorf("stderr holds %q: %s", m, stderr)
	}
}
