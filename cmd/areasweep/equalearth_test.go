package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestEqualEarth runs a study whose model is in Equal Earth (EPSG:8857),
// a CRS that GDAL 3.6 can write neither into GeoTIFF keys nor as WKT1.
// gdalwarp -t_srs EPSG:8857 to a GeoTIFF leaves the CRS in an .aux.xml
// beside it, which areasweep refuses; its advice used to be a GeoTIFF copy
// (gdal_translate IN OUT.tif), which gets an .aux.xml again, so the advice
// now names a virtual raster too (gdal_translate -of VRT), and the run on
// that VRT must succeed, writing extents.gpkg in Equal Earth (before, the
// GeoPackage writer took GDAL's "Unsupported conversion method" for a
// failure: exit 1 after scoring everything).
func TestEqualEarth(t *testing.T) {
	s := newSmallStudy(t)
	src, err := godal.Open(s.model)
	if err != nil {
		t.Fatal(err)
	}
	pam := godal.ConfigOption("GDAL_PAM_ENABLED=YES")
	tif := filepath.Join(s.dir, "ee.tif")
	ds, err := src.Warp(tif, []string{"-t_srs", "EPSG:8857", "-r", "near"}, pam)
	if err != nil {
		t.Fatal(err)
	}
	ds.Close()
	if _, err := os.Stat(tif + ".aux.xml"); err != nil {
		t.Skipf("this GDAL holds Equal Earth in the GeoTIFF itself (no .aux.xml): %v", err)
	}
	_, se, code := runBin(t, "run", "--model", "m="+tif, "--occurrences", s.occ, "--region", s.region, "--quiet", "--out", filepath.Join(s.dir, "refused"))
	if code != 2 || !strings.Contains(se, "sets the CRS") || !strings.Contains(se, "gdal_translate -of VRT "+tif+" "+filepath.Join(s.dir, "ee_own.vrt")) {
		t.Fatalf("exit %d, want 2 with the VRT advice: %s", code, se)
	}
	// The advice, as gdal_translate -of VRT (which reads the .aux.xml)
	// follows it: a VRT of the raster holding its CRS.
	in, err := godal.Open(tif)
	if err != nil {
		t.Fatal(err)
	}
	vrt := filepath.Join(s.dir, "ee_own.vrt")
	v, err := in.Translate(vrt, []string{"-of", "VRT"})
	if err != nil {
		t.Fatal(err)
	}
	ee, err := godal.NewSpatialRefFromEPSG(8857)
	if err != nil {
		t.Fatal(err)
	}
	if err := v.SetSpatialRef(ee); err != nil {
		t.Fatal(err)
	}
	if err := v.Close(); err != nil {
		t.Fatal(err)
	}
	ee.Close()
	in.Close()
	src.Close()
	out := filepath.Join(s.dir, "out")
	smallRunScores(t, out, "--model", "m="+vrt, "--occurrences", s.occ, "--region", s.region)
	// extents.tif cannot hold Equal Earth (GeoTIFF keys, GDAL 3.6): the
	// run says so, and does not for the latitude-longitude study.
	const noCRS = "extents.tif will hold the grid of"
	for _, c := range []struct {
		model string
		warn  bool
	}{{vrt, true}, {s.model, false}} {
		_, se, code := runBin(t, "run", "--model", "m="+c.model, "--occurrences", s.occ, "--region", s.region, "--iterations", "5",
			"--membership-tif", "--out", filepath.Join(t.TempDir(), "tif"))
		if code != 0 || strings.Contains(se, noCRS) != c.warn {
			t.Errorf("%s with --membership-tif: exit %d, warning given %v, want %v:\n%s", c.model, code, !c.warn, c.warn, se)
		}
	}
	var res struct {
		Grid struct {
			CRS string `json:"crs"`
		} `json:"grid"`
	}
	b, err := os.ReadFile(filepath.Join(out, "results.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &res); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(res.Grid.CRS, "8857") && !strings.Contains(res.Grid.CRS, "Equal Earth") {
		t.Errorf("grid CRS %q, want Equal Earth", res.Grid.CRS)
	}
	g, err := godal.Open(filepath.Join(out, "extents.gpkg"), godal.VectorOnly())
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	wkt, _ := g.Layers()[0].SpatialRef().WKT()
	if !strings.Contains(wkt, "Equal Earth") {
		t.Errorf("extents.gpkg CRS %q, want Equal Earth", wkt)
	}
}
