package main

import (
	"fmt"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestRegionBuffersOfRegionReachingFarPole: cases found by randomized
// runs of `areasweep batch` and `extents` on small generated studies. A base
// region holding both poles, on a raster in the north polar stereographic
// EPSG:3413, takes its south pole to about 4e23 m in the raster's CRS; the
// region buffers densified that edge every cell side (8e18 points), and the
// run never finished (memory grew until it was killed). Without buffers the
// same study runs; with them it is refused at once (exit 2) naming the
// region buffers and what to do, for run and extents alike.
func TestRegionBuffersOfRegionReachingFarPole(t *testing.T) {
	outs := t.TempDir()
	f := &badFixture{smallStudy: newSmallStudy(t), outs: outs}
	// 48 x 32 cells of 50 km around the North Pole.
	model := filepath.Join(f.dir, "polar.tif")
	{
		ds, err := godal.Create(godal.GTiff, model, 1, godal.Float32, 48, 32)
		if err != nil {
			t.Fatal(err)
		}
		ds.SetGeoTransform([6]float64{-1200000, 50000, 0, 800000, 0, -50000})
		sr, err := godal.NewSpatialRefFromEPSG(3413)
		if err != nil {
			t.Fatal(err)
		}
		ds.SetSpatialRef(sr)
		buf := make([]float32, 48*32)
		for i := range buf {
			buf[i] = float32(i%97) / 97
		}
		if err := ds.Bands()[0].Write(0, 0, buf, 48, 32); err != nil {
			t.Fatal(err)
		}
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
	}
	var occ strings.Builder
	occ.WriteString("lon,lat,role\n")
	for i := 0; i < 12; i++ {
		fmt.Fprintf(&occ, "%d,%d,train\n%d,%d,test\n", -175+i*30, 84+i%4, -160+i*30, 85+i%3)
	}
	occPath := f.file("polar_occ.csv", occ.String())
	// The generated case's region (batch fuzz case c6093): from 80.8 N
	// over the North Pole, down the antimeridian to the South Pole and back.
	region := f.file("both_poles.geojson", polygonJSON(`{"type":"Polygon","coordinates":[[[78.54878372135744,80.78781297112508],[16.001793083511274,90],[-135.0,90],[-180,90],[-180,80.7878129711251],[-180,-70.21398011238617],[-135.00000000000003,-90],[16.001793083511217,-70.21398011238622],[78.54878372135744,80.78781297112508]]]}`, ""))
	study := func(cmd string, extra ...string) []string {
		return append([]string{cmd, "--model", "m=" + model, "--occurrences", occPath, "--region", region, "--iterations", "5",
			"--point-buffers", "100", "--hull-buffers", "0"}, extra...)
	}
	words := []string{"region buffers", "boundary", "reaches far outside the raster", "clip the region", "--region-buffers"}
	runBadCasesH26(t, f, []badCase{
		{name: "run, region buffer 50 km (batch fuzz c6093)", args: study("run", "--region-buffers=50"), code: 2, words: words},
		{name: "run, region buffer -50 km", args: study("run", "--region-buffers=-50"), code: 2, words: words},
		// The fuzz case gave 5000,100000; 100000 km is now refused before
		// the region is read (TestBufferBeyondEarth), so 20000 here.
		{name: "extents, region buffers 5000 and 20000 km (batch fuzz c6093)", args: study("extents", "--region-buffers=5000,20000"), code: 2, words: words},
	})
	// The same study without region buffers runs.
	out := filepath.Join(outs, "nobuffers")
	if _, stderr, code := runBin(t, append(study("run", "--region-buffers="), "--out", out, "--quiet")...); code != 0 {
		t.Fatalf("without region buffers: exit %d: %s", code, stderr)
	}
	if res := loadResults(t, out); res.Extents[0].Cells == 0 {
		t.Errorf("base extent holds no cell: %+v", res.Extents[0])
	}
}
