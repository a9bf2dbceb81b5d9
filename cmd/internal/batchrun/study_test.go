package batchrun

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/extent"
)

func TestMain(m *testing.M) {
	extent.Configure()
	os.Exit(m.Run())
}

// runBatch runs the batch of o in this process, as the batch command does
// with its defaults (--jobs 1, --shards 1) and without run's checks of
// each row (the tables here are valid).
func runBatch(o *Options) error {
	o.Jobs, o.Shards, o.Version = max(o.Jobs, 1), max(o.Shards, 1), "test"
	var out, errOut bytes.Buffer
	if err := Run(context.Background(), o, IO{Out: &out, ErrOut: &errOut}); err != nil {
		return fmt.Errorf("%w\n%s", err, errOut.String())
	}
	return nil
}

// The study and tables below are the command's end-to-end tests' own
// (cmd/areasweep: e2e_test.go, batch_test.go, batchinputs_test.go).

// smallStudy is a tiny generated study on a latitude-longitude grid: 48 x
// 32 cells of 0.25 degrees between 40 and 48 N, so cell areas differ by
// row. Values: a smooth ridge in [0,1] rounded to 1/50 (ties on purpose),
// no-data in one corner.
type smallStudy struct {
	dir, model, model2, occ, region, far string
	vals                                 []float64 // row-major, NaN = no data
	w, h                                 int
	gt                                   [6]float64
}

const smallNoData = -1

func writeRaster(t *testing.T, path string, w, h int, gt [6]float64, vals []float64, withCRS bool) {
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
	b.SetNoData(smallNoData)
	buf := make([]float32, len(vals))
	for i, v := range vals {
		if math.IsNaN(v) {
			buf[i] = smallNoData
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

func newSmallStudy(t *testing.T) *smallStudy {
	t.Helper()
	s := &smallStudy{dir: t.TempDir(), w: 48, h: 32, gt: [6]float64{10, 0.25, 0, 48, 0, -0.25}}
	s.vals = make([]float64, s.w*s.h)
	for r := 0; r < s.h; r++ {
		for c := 0; c < s.w; c++ {
			lon, lat := 10+(float64(c)+0.5)*0.25, 48-(float64(r)+0.5)*0.25
			v := math.Exp(-((lon-15)*(lon-15)/8 + (lat-44)*(lat-44)/4))
			v = math.Round(v*50) / 50
			if c >= 44 && r >= 28 {
				v = math.NaN()
			}
			// As stored in the Float32 raster.
			s.vals[r*s.w+c] = float64(float32(v))
		}
	}
	s.model = filepath.Join(s.dir, "model.tif")
	writeRaster(t, s.model, s.w, s.h, s.gt, s.vals, true)
	// A second model: same grid, values squared (same ranking: same AUC).
	v2 := make([]float64, len(s.vals))
	for i, v := range s.vals {
		v2[i] = v * v
	}
	s.model2 = filepath.Join(s.dir, "model2.tif")
	writeRaster(t, s.model2, s.w, s.h, s.gt, v2, true)
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
	s.occ = filepath.Join(s.dir, "occ.csv")
	os.WriteFile(s.occ, []byte(sb.String()), 0o644)
	s.region = filepath.Join(s.dir, "region.geojson")
	os.WriteFile(s.region, []byte(`{"type":"FeatureCollection","crs":{"type":"name","properties":{"name":"urn:ogc:def:crs:OGC:1.3:CRS84"}},"features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[12.5,41.5],[18.5,41.5],[18.5,46.5],[12.5,46.5],[12.5,41.5]]]}}]}`), 0o644)
	s.far = filepath.Join(s.dir, "far.geojson")
	os.WriteFile(s.far, []byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[100,10],[101,10],[101,11],[100,11],[100,10]]]}}]}`), 0o644)
	return s
}

// batchTable writes a study table of three small studies on s's inputs
// and returns its path: alpha (two models), beta (one model, another
// seed) and broken, whose occurrences all lie outside the raster, so it
// passes every check of the table and fails when it runs.
func batchTable(t *testing.T, s *smallStudy) string {
	t.Helper()
	far := filepath.Join(s.dir, "occ_far.csv")
	if err := os.WriteFile(far, []byte("lon,lat,role\n100.5,10.5,train\n100.6,10.4,test\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	table := filepath.Join(s.dir, "studies.csv")
	body := `# region-buffers: -40,60
# point-buffers: 40
# hull-buffers: 0
# e: 0.05
# iterations: 30
# seed: 9
id,model,occurrences,region,seed
alpha,m=model.tif;sq=model2.tif,occ.csv,region.geojson,9
beta,m=model.tif,occ.csv,region.geojson,11
broken,m=model.tif,occ_far.csv,region.geojson,9
`
	if err := os.WriteFile(table, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	return table
}

// inputsStudy copies the shared small study's model, region and
// occurrences into a folder of the test's own (the test changes them),
// with a second copy of the occurrences for a study the changes must not
// touch and an .aux.xml beside the model (a sidecar file the run records
// with it), and writes a table of two studies on them: "a" (occ.csv) and
// "b" (occ_b.csv). It returns the folder and the table's path.
func inputsStudy(t *testing.T) (dir, table string) {
	t.Helper()
	s := newSmallStudy(t)
	dir = t.TempDir()
	for src, name := range map[string]string{s.model: "model.tif", s.region: "region.geojson", s.occ: "occ.csv"} {
		b, err := os.ReadFile(src)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, name), b, 0o644); err != nil {
			t.Fatal(err)
		}
		if name == "occ.csv" {
			if err := os.WriteFile(filepath.Join(dir, "occ_b.csv"), b, 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
	aux := `<PAMDataset><Metadata><MDI key="note">made by hand</MDI></Metadata></PAMDataset>` + "\n"
	if err := os.WriteFile(filepath.Join(dir, "model.tif.aux.xml"), []byte(aux), 0o644); err != nil {
		t.Fatal(err)
	}
	table = filepath.Join(dir, "studies.csv")
	body := "# region-buffers: 60\n# point-buffers: 40\n# hull-buffers: 0\n# e: 0.05\n# iterations: 30\n" +
		"id,model,occurrences,region\n" +
		"a,m=model.tif,occ.csv,region.geojson\n" +
		"b,m=model.tif,occ_b.csv,region.geojson\n"
	if err := os.WriteFile(table, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	return dir, table
}
