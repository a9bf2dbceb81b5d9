package main

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/cmd/internal/pass"
)

// tallStudy writes a study on a grid of 40 x 600 cells, taller than two of
// the distance-only null's 240-row blocks, into dir and returns its study
// file: latitude-longitude cells of 0.02 degrees from 52 N down (the null's
// bounded path) when crs is "EPSG:4326", else cells of 2 km of UTM zone 33N
// (EPSG:32633, its projected path). Training and test points lie all along
// the strip, so every null block has sites near it and far from it.
func tallStudy(t *testing.T, dir, crs string) string {
	t.Helper()
	const w, h = 40, 600
	gt := [6]float64{10, 0.02, 0, 52, 0, -0.02}
	if crs != "EPSG:4326" {
		gt = [6]float64{400000, 2000, 0, 5400000, 0, -2000}
	}
	sr, err := godal.NewSpatialRef(crs)
	if err != nil {
		t.Fatal(err)
	}
	defer sr.Close()
	centre := func(r, c float64) (x, y float64) { return gt[0] + (c+0.5)*gt[1], gt[3] + (r+0.5)*gt[5] }
	ds, err := godal.Create(godal.GTiff, filepath.Join(dir, "m.tif"), 1, godal.Float32, w, h, godal.CreationOption("TILED=YES", "BLOCKXSIZE=32", "BLOCKYSIZE=32"))
	if err != nil {
		t.Fatal(err)
	}
	ds.SetGeoTransform(gt)
	ds.SetSpatialRef(sr)
	buf := make([]float32, w*h)
	for r := 0; r < h; r++ {
		for c := 0; c < w; c++ {
			// A wave along the strip, rounded to 1/100 (ties on purpose).
			buf[r*w+c] = float32(math.Round(100*(0.5+0.4*math.Sin(float64(r)/37)*math.Cos(float64(c)/9))) / 100)
		}
	}
	b := ds.Bands()[0]
	if err := b.Write(0, 0, buf, w, h); err != nil {
		t.Fatal(err)
	}
	if err := ds.Close(); err != nil {
		t.Fatal(err)
	}
	// Our choice of seed: fixed points, the same on every run.
	rng := rand.New(rand.NewPCG(7, 11))
	var occ strings.Builder
	occ.WriteString("x,y,role\n")
	for i := 0; i < 80; i++ {
		x, y := centre(float64(h)*rng.Float64()-0.5, float64(w)*rng.Float64()-0.5)
		fmt.Fprintf(&occ, "%.6f,%.6f,%s\n", x, y, []string{"train", "test"}[i%2])
	}
	x0, y0 := centre(20, 4)
	x1, y1 := centre(h-20, w-4)
	ring := fmt.Sprintf("[[%g,%g],[%g,%g],[%g,%g],[%g,%g],[%g,%g]]", x0, y0, x1, y0, x1, y1, x0, y1, x0, y0)
	region := `{"type":"FeatureCollection","crs":{"type":"name","properties":{"name":"urn:ogc:def:crs:EPSG::` + strings.TrimPrefix(crs, "EPSG:") +
		`"}},"features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[` + ring + `]}}]}`
	files := map[string]string{
		"occ.csv":        occ.String(),
		"region.geojson": region,
		"study.yaml": "model: [m=m.tif]\noccurrences: occ.csv\noccurrences-crs: " + crs + "\nregion: region.geojson\n" +
			"region-buffers: [-30, 40]\npoint-buffers: [25, 60]\nhull-buffers: [0]\ne: [0.05]\niterations: 60\nseed: 5\nmembership-tif: true\n",
	}
	for name, body := range files {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return filepath.Join(dir, "study.yaml")
}

// TestTallShardsAcrossNullBlocks: on grids of 600 rows, taller than two of
// the distance-only null's 240-row blocks (TestEndToEndShardsAndWorkers'
// studies are one block high), a run split into 3 shards (edges at rows 200
// and 400, inside the null's first and second blocks) and into 5 (120, 240
// on a block edge, 360, 480 on the next) and merged in a shuffled order, and
// a run with --workers 1, give the single run's outputs byte for byte, on
// a latitude-longitude grid (the null's bounded path) and on a UTM grid (its
// projected path).
func TestTallShardsAcrossNullBlocks(t *testing.T) {
	for _, crs := range []string{"EPSG:4326", "EPSG:32633"} {
		t.Run(strings.Replace(crs, ":", "_", 1), func(t *testing.T) {
			dir := t.TempDir()
			study := tallStudy(t, dir, crs)
			if !cutsInside(600, []int{3}, pass.VirtualBlock) {
				t.Fatal("3 shards of 600 rows no longer cut inside a null block")
			}
			single := sameAcrossSplits(t, dir, study, []int{1}, []int{3, 5}, 3)
			res := loadResults(t, single)
			if len(res.Models) < 2 {
				t.Fatalf("results.json lists %d models; want the model and the distance-only null", len(res.Models))
			}
			if res.PointCounts.Test < 30 || len(res.Extents) < 6 {
				t.Fatalf("%d test points and %d extents scored; the study was meant to place 40 and build 7", res.PointCounts.Test, len(res.Extents))
			}
		})
	}
}
