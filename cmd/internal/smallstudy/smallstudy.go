// Package smallstudy writes the tiny generated study that the command's
// end-to-end tests and the batch package's tests run on, and the study
// tables built on it, so that both test the same inputs from one place.
// It is for tests only.
package smallstudy

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// NoData is the no-data value of the study's rasters.
const NoData = -1

// Study is a tiny generated study on a latitude-longitude grid: 48 x 32
// cells of 0.25 degrees between 40 and 48 N, so cell areas differ by row.
// Values: a smooth ridge in [0,1] rounded to 1/50 (ties on purpose),
// no-data in one corner. Model2 holds the values squared (the same
// ranking, so the same AUC); Occ has training points on a lattice near
// the ridge, test points between them, one far test point and one outside
// the raster; Region covers the ridge; Far is a polygon far from the
// raster.
type Study struct {
	Dir, Model, Model2, Occ, Region, Far string
	Vals                                 []float64 // row-major, NaN = no data
	W, H                                 int
	GT                                   [6]float64
}

// WriteRaster writes vals (row-major, NaN = no data) as a tiled Float32
// GeoTIFF of w x h cells with geotransform gt, in EPSG:4326 when withCRS.
func WriteRaster(t testing.TB, path string, w, h int, gt [6]float64, vals []float64, withCRS bool) {
	t.Helper()
	ds, err := godal.Create(godal.GTiff, path, 1, godal.Float32, w, h, godal.CreationOption("TILED=YES", "BLOCKXSIZE=16", "BLOCKYSIZE=16"))
	if err != nil {
		t.Fatal(err)
	}
	if err := ds.SetGeoTransform(gt); err != nil {
		t.Fatal(err)
	}
	if withCRS {
		sr, _ := godal.NewSpatialRefFromEPSG(4326)
		if err := ds.SetSpatialRef(sr); err != nil {
			t.Fatal(err)
		}
	}
	b := ds.Bands()[0]
	b.SetNoData(NoData)
	buf := make([]float32, len(vals))
	for i, v := range vals {
		if math.IsNaN(v) {
			buf[i] = NoData
		} else {
			buf[i] = float32(v)
		}
	}
	if err := b.Write(0, 0, buf, w, h); err != nil {
		t.Fatal(err)
	}
	if err := ds.Close(); err != nil {
		t.Fatal(err)
	}
}

// New writes the study into dir.
func New(t testing.TB, dir string) *Study {
	t.Helper()
	s := &Study{Dir: dir, W: 48, H: 32, GT: [6]float64{10, 0.25, 0, 48, 0, -0.25}}
	s.Vals = make([]float64, s.W*s.H)
	for r := 0; r < s.H; r++ {
		for c := 0; c < s.W; c++ {
			lon, lat := 10+(float64(c)+0.5)*0.25, 48-(float64(r)+0.5)*0.25
			v := math.Exp(-((lon-15)*(lon-15)/8 + (lat-44)*(lat-44)/4))
			v = math.Round(v*50) / 50
			if c >= 44 && r >= 28 {
				v = math.NaN()
			}
			// As stored in the Float32 raster.
			s.Vals[r*s.W+c] = float64(float32(v))
		}
	}
	s.Model = filepath.Join(s.Dir, "model.tif")
	WriteRaster(t, s.Model, s.W, s.H, s.GT, s.Vals, true)
	v2 := make([]float64, len(s.Vals))
	for i, v := range s.Vals {
		v2[i] = v * v
	}
	s.Model2 = filepath.Join(s.Dir, "model2.tif")
	WriteRaster(t, s.Model2, s.W, s.H, s.GT, v2, true)
	// Occurrences near the ridge: train on a lattice, test between.
	var sb strings.Builder
	sb.WriteString("lon,lat,role\n")
	for i := 0; i < 6; i++ {
		for j := 0; j < 4; j++ {
			sb.WriteString(fmt.Sprintf("%.3f,%.3f,train\n", 13.1+float64(i)*0.8, 42.6+float64(j)*0.9))
			sb.WriteString(fmt.Sprintf("%.3f,%.3f,test\n", 13.5+float64(i)*0.8, 43.0+float64(j)*0.9))
		}
	}
	// One far test point and one point outside the raster.
	sb.WriteString("10.6,47.6,test\n")
	sb.WriteString("30.0,47.0,test\n")
	s.Occ = filepath.Join(s.Dir, "occ.csv")
	write(t, s.Occ, sb.String())
	s.Region = filepath.Join(s.Dir, "region.geojson")
	write(t, s.Region, `{"type":"FeatureCollection","crs":{"type":"name","properties":{"name":"urn:ogc:def:crs:OGC:1.3:CRS84"}},"features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[12.5,41.5],[18.5,41.5],[18.5,46.5],[12.5,46.5],[12.5,41.5]]]}}]}`)
	s.Far = filepath.Join(s.Dir, "far.geojson")
	write(t, s.Far, `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[100,10],[101,10],[101,11],[100,11],[100,10]]]}}]}`)
	return s
}

// BatchTable writes into dir, which holds a study's model.tif,
// model2.tif, occ.csv and region.geojson, a study table of three studies
// on them and returns its path: alpha (two models), beta (one model,
// another seed) and broken, whose occurrences (occ_far.csv, written too)
// all lie outside the raster, so it passes every check of the table and
// fails when it runs.
func BatchTable(t testing.TB, dir string) string {
	t.Helper()
	write(t, filepath.Join(dir, "occ_far.csv"), "lon,lat,role\n100.5,10.5,train\n100.6,10.4,test\n")
	table := filepath.Join(dir, "studies.csv")
	write(t, table, `# region-buffers: -40,60
# point-buffers: 40
# hull-buffers: 0
# e: 0.05
# iterations: 30
# seed: 9
id,model,occurrences,region,seed
alpha,m=model.tif;sq=model2.tif,occ.csv,region.geojson,9
beta,m=model.tif,occ.csv,region.geojson,11
broken,m=model.tif,occ_far.csv,region.geojson,9
`)
	return table
}

// Inputs copies a study's model, region and occurrences (their paths)
// into dir, with a second copy of the occurrences (occ_b.csv) for a study
// that changes to the first must not touch and an .aux.xml beside the
// model (a sidecar file a run records with it), and writes a table of two
// studies on them: "a" (occ.csv) and "b" (occ_b.csv). It returns the
// table's path.
func Inputs(t testing.TB, dir, model, region, occ string) string {
	t.Helper()
	for src, name := range map[string]string{model: "model.tif", region: "region.geojson", occ: "occ.csv"} {
		b, err := os.ReadFile(src)
		if err != nil {
			t.Fatal(err)
		}
		write(t, filepath.Join(dir, name), string(b))
		if name == "occ.csv" {
			write(t, filepath.Join(dir, "occ_b.csv"), string(b))
		}
	}
	write(t, filepath.Join(dir, "model.tif.aux.xml"), `<PAMDataset><Metadata><MDI key="note">made by hand</MDI></Metadata></PAMDataset>`+"\n")
	table := filepath.Join(dir, "studies.csv")
	write(t, table, "# region-buffers: 60\n# point-buffers: 40\n# hull-buffers: 0\n# e: 0.05\n# iterations: 30\n"+
		"id,model,occurrences,region\n"+
		"a,m=model.tif,occ.csv,region.geojson\n"+
		"b,m=model.tif,occ_b.csv,region.geojson\n")
	return table
}

func write(t testing.TB, path, body string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
}
