package main

import (
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestSuspectInputsWarned: inputs that run but most likely do not say
// what the user meant are warned about, on the terminal and in
// results.json, each with what to do:
//   - a latitude-longitude raster on ED50, whose coordinates are read as
//     WGS84's (about 120 m off in Italy, the ED50 to WGS84 shift);
//   - a model without a nodata value whose cells without data hold -9999
//     (scored as data: the whole raster's lowest value), or one whose
//     cells without data hold the lowest float32 under another declared
//     nodata value;
//   - one file given as two models (they score alike);
//   - occurrences whose test points all lie outside the base region (the
//     base extent, the study's own, goes unscored);
//   - a Byte model that declares the nodata value -9999, which no byte
//     holds (as gdal_translate -ot Byte leaves it, its cells without data
//     turned into 0): no cell is no data;
//   - a second model without data on some cells of the extents (where the
//     first model has data): it is scored there against a smaller
//     background, so its scores and its differences from the first model
//     compare unlike backgrounds;
//   - a Byte model with a colour table (a classified map): scored on its
//     palette indexes, right only if they are the suitability scale.
//
// The plain study warns about none of these.
func TestSuspectInputsWarned(t *testing.T) {
	s := newSmallStudy(t)
	noNoData := filepath.Join(s.dir, "nonodata.tif")
	{
		ds, err := godal.Create(godal.GTiff, noNoData, 1, godal.Float32, s.w, s.h)
		if err != nil {
			t.Fatal(err)
		}
		ds.SetGeoTransform(s.gt)
		ds.SetProjection(wgs84WKT)
		buf := make([]float32, len(s.vals))
		for i, v := range s.vals {
			buf[i] = float32(v)
			if math.IsNaN(v) {
				buf[i] = -9999
			}
		}
		if err := ds.Bands()[0].Write(0, 0, buf, s.w, s.h); err != nil {
			t.Fatal(err)
		}
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
	}
	// Test points in the raster's north-east, outside the region
	// (12.5..18.5 E, 41.5..46.5 N).
	outsideOcc := filepath.Join(s.dir, "outside.csv")
	os.WriteFile(outsideOcc, []byte("lon,lat,role\n13.1,42.6,train\n14.1,43.6,train\n20.5,47.5,test\n21.2,47.1,test\n"), 0o644)

	run := func(t *testing.T, args ...string) (stderr string, warnings []string) {
		t.Helper()
		out := filepath.Join(t.TempDir(), "out")
		base := []string{"run", "--region", s.region, "--iterations", "5", "--region-buffers", "60", "--point-buffers", "40", "--hull-buffers", "0", "--out", out}
		_, se, code := runBin(t, append(base, args...)...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, se)
		}
		return se, loadResults(t, out).Warnings
	}
	says := func(t *testing.T, stderr string, warnings []string, words ...string) {
		t.Helper()
		for _, list := range [][]string{{stderr}, warnings} {
			found := false
			for _, w := range list {
				found = found || strings.Contains(w, words[0])
			}
			if !found {
				t.Errorf("no warning %q in %q", words[0], list)
				return
			}
		}
		for _, w := range warnings {
			if strings.Contains(w, words[0]) {
				for _, x := range words[1:] {
					if !strings.Contains(w, x) {
						t.Errorf("warning %q does not say %q", w, x)
					}
				}
			}
		}
	}
	suspect := []string{"declares no nodata value", "holds the same bytes", "no scored test point lies in the base region", "on another datum than WGS84", "has no data on cells where the first model", "which its Byte band (whole numbers from 0 to 255) cannot hold", "has a colour table"}

	t.Run("plain study", func(t *testing.T) {
		se, ws := run(t, "--model", "m="+s.model, "--model", "sq="+s.model2, "--occurrences", s.occ)
		for _, w := range suspect {
			if strings.Contains(se, w) || strings.Contains(strings.Join(ws, "\n"), w) {
				t.Errorf("the plain study is warned %q:\n%s", w, se)
			}
		}
	})
	t.Run("latitude and longitude on ED50", func(t *testing.T) {
		ed50 := writeRasterCRS(t, s, "ed50.tif", 4230)
		se, ws := run(t, "--model", "m="+ed50, "--occurrences", s.occ)
		says(t, se, ws, suspect[3], "model m", "ed50.tif", "EPSG:4230", " m (", "gdalwarp -t_srs EPSG:4326")
	})
	t.Run("a null whose .aux.xml is cut short", func(t *testing.T) {
		// The nodata value it was meant to set is not applied (GDAL skips
		// a file that is not well-formed XML): warned, and the run goes on.
		cut := filepath.Join(s.dir, "cutaux.tif")
		data, err := os.ReadFile(noNoData)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(cut, data, 0o644); err != nil {
			t.Fatal(err)
		}
		os.WriteFile(cut+".aux.xml", []byte(`<PAMDataset><PAMRasterBand band="1"><NoDataValue>-9999</NoDataValue`), 0o644)
		se, ws := run(t, "--model", "m="+s.model, "--null", "n="+cut, "--occurrences", s.occ)
		says(t, se, ws, "cutaux.tif.aux.xml appears to set a nodata value", "null n:", "not well-formed XML", "gdal_translate "+cut)
	})
	t.Run("-9999 without a nodata value", func(t *testing.T) {
		se, ws := run(t, "--model", "m="+noNoData, "--occurrences", s.occ)
		says(t, se, ws, suspect[0], "model m", "nonodata.tif", "-9999", "scored as data", "gdal_translate -a_nodata -9999 "+noNoData)
	})
	t.Run("lowest float32 under another nodata value", func(t *testing.T) {
		f := &badFixture{smallStudy: s}
		// rasterWith declares smallNoData (-1); the cells without data
		// hold the lowest float32 instead.
		other := f.rasterWith(t, "othernodata.tif", s.gt, wgs84WKT, func(i int) float64 {
			if math.IsNaN(s.vals[i]) {
				return -math.MaxFloat32
			}
			return s.vals[i]
		})
		se, ws := run(t, "--model", "m="+other, "--occurrences", s.occ)
		says(t, se, ws, "declares the nodata value -1, and its lowest value, -3.4028234663852886e+38", "model m", "scored as data")
	})
	t.Run("nodata 1e40 beyond a Float32 band's range", func(t *testing.T) {
		// A GeoTIFF written by GDAL's Python bindings declaring 1e40
		// (SetNoDataValue; GDAL holds it as inf on a Float32 band, where
		// gdal_translate -a_nodata would have clamped it to the largest
		// float32), its cells without
		// data holding the lowest float32: the warning gives the value as
		// GDAL holds it, in words, not as Go's "+Inf".
		f := &badFixture{smallStudy: s}
		low := f.rasterWith(t, "low.tif", s.gt, wgs84WKT, func(i int) float64 {
			if math.IsNaN(s.vals[i]) {
				return -math.MaxFloat32
			}
			return s.vals[i]
		})
		p := filepath.Join(s.dir, "nodata1e40.tif")
		script := "import sys\nfrom osgeo import gdal\ngdal.UseExceptions()\nd = gdal.Translate(sys.argv[2], sys.argv[1])\nd.GetRasterBand(1).SetNoDataValue(1e40)\nd = None\n"
		if out, err := exec.Command("/usr/bin/python3", "-c", script, low, p).CombinedOutput(); err != nil {
			if os.Getenv("CI") == "true" {
				t.Fatalf("python3 osgeo: %v: %s", err, out)
			}
			t.Skipf("python3 with osgeo (Debian's python3-gdal) cannot write the GeoTIFF: %v: %s", err, out)
		}
		se, ws := run(t, "--model", "m="+p, "--occurrences", s.occ)
		says(t, se, ws, "declares the nodata value inf (as GDAL holds it: a value written beyond the range of the Float32 band, such as 1e40", "model m", "scored as data")
		if strings.Contains(se, "Inf") {
			t.Errorf("Go's Inf printed: %s", se)
		}
	})
	t.Run("one file as two models", func(t *testing.T) {
		se, ws := run(t, "--model", "m="+s.model, "--model", "again="+s.model, "--occurrences", s.occ)
		says(t, se, ws, suspect[1], "model again", "as model m")
	})
	t.Run("a second model without data on part of the extents", func(t *testing.T) {
		// The same values, with no data in the raster's south-west corner
		// (10 to 12 E, 40 to 41 N), which holds no point and lies outside
		// the region and its 60 km buffer but inside whole_raster.
		f := &badFixture{smallStudy: s}
		holes := f.rasterWith(t, "holes.tif", s.gt, wgs84WKT, func(i int) float64 {
			if r, c := i/s.w, i%s.w; r >= 28 && c < 8 {
				return math.NaN()
			}
			return s.vals[i]
		})
		se, ws := run(t, "--model", "m="+s.model, "--model", "holes="+holes, "--occurrences", s.occ)
		says(t, se, ws, suspect[4], "model holes", "(m)", "whole_raster", "--model")
		if strings.Contains(strings.Join(ws, "\n"), "model m has no data on cells") {
			t.Errorf("the first model is warned: %q", ws)
		}
	})
	t.Run("a Byte model declaring -9999", func(t *testing.T) {
		p := filepath.Join(s.dir, "byte9999.tif")
		ds, err := godal.Create(godal.GTiff, p, 1, godal.Byte, s.w, s.h)
		if err != nil {
			t.Fatal(err)
		}
		ds.SetGeoTransform(s.gt)
		ds.SetProjection(wgs84WKT)
		if err := ds.Bands()[0].SetNoData(-9999); err != nil {
			t.Fatal(err)
		}
		buf := make([]uint8, len(s.vals))
		for i, v := range s.vals {
			if !math.IsNaN(v) {
				buf[i] = uint8(math.Round(200 * v))
			}
		}
		if err := ds.Bands()[0].Write(0, 0, buf, s.w, s.h); err != nil {
			t.Fatal(err)
		}
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
		se, ws := run(t, "--model", "m="+p, "--occurrences", s.occ)
		says(t, se, ws, suspect[5], "model m", "byte9999.tif", "nodata value -9999", "no cell is no data", "gdal_translate -a_nodata 0 "+p)
	})
	t.Run("a Byte model with a colour table", func(t *testing.T) {
		// A paletted GeoTIFF (as a classified map is saved): scored on
		// its palette indexes, which the user is told, with what to do.
		p := filepath.Join(s.dir, "paletted.tif")
		ds, err := godal.Create(godal.GTiff, p, 1, godal.Byte, s.w, s.h)
		if err != nil {
			t.Fatal(err)
		}
		ds.SetGeoTransform(s.gt)
		ds.SetProjection(wgs84WKT)
		b := ds.Bands()[0]
		if err := b.SetNoData(255); err != nil {
			t.Fatal(err)
		}
		buf := make([]uint8, len(s.vals))
		for i, v := range s.vals {
			buf[i] = 255
			if !math.IsNaN(v) {
				buf[i] = uint8(math.Round(200 * v))
			}
		}
		if err := b.Write(0, 0, buf, s.w, s.h); err != nil {
			t.Fatal(err)
		}
		entries := make([][4]int16, 256)
		for i := range entries {
			entries[i] = [4]int16{int16(255 - i), int16(i), 0, 255}
		}
		if err := b.SetColorTable(godal.ColorTable{PaletteInterp: godal.RGBPalette, Entries: entries}); err != nil {
			t.Fatal(err)
		}
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
		se, ws := run(t, "--model", "m="+p, "--occurrences", s.occ)
		says(t, se, ws, suspect[6], "model m", "paletted.tif", "256 colours", "palette indexes", "gdal_translate -expand gray "+p)
	})
	t.Run("no test point in the base region", func(t *testing.T) {
		se, ws := run(t, "--model", "m="+s.model, "--occurrences", outsideOcc)
		says(t, se, ws, suspect[2], s.region, "not scored")
	})
}

// writeRasterCRS writes the small study's values as a Float32 GeoTIFF
// with nodata, on the study's grid in the CRS EPSG:code.
func writeRasterCRS(t *testing.T, s *smallStudy, name string, code int) string {
	t.Helper()
	p := filepath.Join(s.dir, name)
	ds, err := godal.Create(godal.GTiff, p, 1, godal.Float32, s.w, s.h)
	if err != nil {
		t.Fatal(err)
	}
	sr, err := godal.NewSpatialRefFromEPSG(code)
	if err != nil {
		t.Fatal(err)
	}
	ds.SetGeoTransform(s.gt)
	ds.SetSpatialRef(sr)
	b := ds.Bands()[0]
	b.SetNoData(smallNoData)
	buf := make([]float32, len(s.vals))
	for i, v := range s.vals {
		buf[i] = float32(v)
		if math.IsNaN(v) {
			buf[i] = smallNoData
		}
	}
	if err := b.Write(0, 0, buf, s.w, s.h); err != nil {
		t.Fatal(err)
	}
	if err := ds.Close(); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestFeatureWarningsSummedUp: a layer with many features without
// geometry or with invalid geometry is warned about in one line per kind,
// listing ten features and how many more, not in one line per feature
// (thousands of lines on the terminal and in results.json).
func TestFeatureWarningsSummedUp(t *testing.T) {
	s := newSmallStudy(t)
	var feats []string
	for i := 0; i < 30; i++ {
		feats = append(feats, `{"type":"Feature","properties":{},"geometry":null}`)
	}
	for i := 0; i < 25; i++ { // bow-ties: each repaired
		x := 12.5 + 0.01*float64(i)
		feats = append(feats, `{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[`+
			strconvF(x)+`,41.5],[18.5,46.5],[18.5,41.5],[`+strconvF(x)+`,46.5],[`+strconvF(x)+`,41.5]]]}}`)
	}
	region := filepath.Join(s.dir, "many.geojson")
	os.WriteFile(region, []byte(`{"type":"FeatureCollection","features":[`+strings.Join(feats, ",")+`]}`), 0o644)
	out := filepath.Join(t.TempDir(), "out")
	_, se, code := runBin(t, "run", "--model", "m="+s.model, "--occurrences", s.occ, "--region", region, "--iterations", "5", "--out", out)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	for _, want := range []string{
		"many.geojson features 1, 2, 3, 4, 5, 6, 7, 8, 9, 10 and 20 more have no geometry; skipped",
		"many.geojson features 31, 32, 33, 34, 35, 36, 37, 38, 39, 40 and 15 more had invalid geometry",
	} {
		if n := strings.Count(se, want); n != 1 {
			t.Errorf("stderr says %q %d times, want once:\n%s", want, n, se)
		}
	}
	if n := strings.Count(se, "many.geojson feature"); n != 2 {
		t.Errorf("%d lines about many.geojson's features, want 2", n)
	}
	if n := len(loadResults(t, out).Warnings); n > 5 {
		t.Errorf("results.json holds %d warnings", n)
	}
}

func strconvF(x float64) string { return strconv.FormatFloat(x, 'f', -1, 64) }
