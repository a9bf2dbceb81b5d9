//go:build unix

package pass

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"testing"

	"areasweep/extent"
	"areasweep/extent/vocab"
)

// BenchmarkScoreMem measures the pass's own scoring cost, without GDAL:
// the 256 x 256 blocks of a 3600 x 2400 grid come from memory (Float32
// values converted to float64, no-data decoded), on one worker, with the
// layout of BenchmarkNullVsRaster (1000 values, 4096 histogram bins). It
// reports the process CPU time (user + system) per cell. family=none has
// no member, so it is the floor: reading and decoding the blocks;
// chains13 and chains60 are BenchmarkPlan's families of a run's shape
// (two nested chains, planFamily), where the cost per extent shows.
func BenchmarkScoreMem(b *testing.B) {
	w, h := 3600, 2400
	g, err := extent.NewGrid(w, h, [6]float64{-20, 60.0 / float64(w), 0, 70, 0, -40.0 / float64(h)}, "EPSG:4326")
	if err != nil {
		b.Fatal(err)
	}
	defer g.Close()
	vals := make([]float32, w*h)
	for r := 0; r < h; r++ {
		for c := 0; c < w; c++ {
			x, y := float64(c)/float64(w)-0.5, float64(r)/float64(h)-0.5
			v := float32(math.Exp(-(x*x+y*y)*8) + 0.02*math.Sin(float64(c)/37)*math.Cos(float64(r)/53))
			if math.Hypot(x+0.4, y-0.4) < 0.05 {
				v = -9999
			}
			vals[r*w+c] = v
		}
	}
	raster := &Raster{nodata: -9999, hasNodata: true, scale: 1}
	p := plan{width: w, height: h, blockW: 256, blockH: 256, decode: raster.decode,
		open: func() (Source, error) { return memSource{w: w, vals: vals}, nil }}
	layout := mustLayout(b, 0, 1)
	fams := benchFamilies(g)
	fams["none"] = extent.NewFamilyFromRuns(g, []extent.Member{{ID: "0", Status: vocab.StatusOK}}, func(k, row int) []int32 { return nil })
	fams["chains13"], fams["chains60"] = planFamily(g, 13), planFamily(g, 60)
	for _, name := range []string{"none", "full8", "run8", "discs60", "chains13", "chains60"} {
		fam := fams[name]
		b.Run("family="+name, func(b *testing.B) {
			b.ReportAllocs()
			var cpu int64
			for b.Loop() {
				t0 := cpuNow(b)
				if _, _, err := score(p, g, fam, fam.Groups(), layout, Options{Workers: 1}); err != nil {
					b.Fatal(err)
				}
				cpu += cpuNow(b) - t0
			}
			b.ReportMetric(float64(cpu)/(float64(b.N)*float64(w*h)), "cpu-ns/cell")
		})
	}
}

// BenchmarkRasterScore is BenchmarkScoreMem on BenchmarkNullVsRaster's
// raster (27 million cells, Float32, deflate, 256 x 256 tiles), through
// GDAL, on 2 workers: process CPU time (user + system) per cell of
// Raster.Score for each family. family=none is the bare read (GDAL's
// decompression and decoding), so a family's cost minus none's is the
// pass's own scoring. The raster is written once into the system's
// temporary folder and reused.
func BenchmarkRasterScore(b *testing.B) {
	g, r := openPath(b, rasterScorePath(b))
	defer g.Close()
	defer r.Close()
	w, h := g.Width, g.Height
	layout := mustLayout(b, 0, 1)
	fams := benchFamilies(g)
	fams["none"] = extent.NewFamilyFromRuns(g, []extent.Member{{ID: "0", Status: vocab.StatusOK}}, func(k, row int) []int32 { return nil })
	for _, name := range []string{"none", "full8", "run8"} {
		fam := fams[name]
		b.Run(fmt.Sprintf("cells=%d,family=%s,workers=2", w*h, name), func(b *testing.B) {
			var cpu int64
			for b.Loop() {
				t0 := cpuNow(b)
				if _, _, err := r.Score(g, fam, layout, Options{Workers: 2}); err != nil {
					b.Fatal(err)
				}
				cpu += cpuNow(b) - t0
			}
			b.ReportMetric(float64(cpu)/(float64(b.N)*float64(w*h)), "cpu-ns/cell")
		})
	}
}

// rasterScorePath writes BenchmarkRasterScore's raster of 27 million
// cells (6365 x 4243, Float32, deflate, 256 x 256 tiles) into the
// system's temporary folder unless it is there, and returns its path.
func rasterScorePath(b *testing.B) string {
	h := int(math.Round(math.Sqrt(27e6 / 1.5)))
	w := int(math.Round(float64(h) * 1.5))
	path := filepath.Join(os.TempDir(), fmt.Sprintf("areasweep-rasterscore-%dx%d.tif", w, h))
	if _, err := os.Stat(path); err != nil {
		tmp := path + ".part"
		writeGridRaster(b, tmp, w, h, false, func(r, c int) float32 {
			x, y := float64(c)/float64(w)-0.5, float64(r)/float64(h)-0.5
			return float32(math.Exp(-(x*x+y*y)*8) + 0.02*math.Sin(float64(c)/37)*math.Cos(float64(r)/53))
		}, "TILED=YES", "BLOCKXSIZE=256", "BLOCKYSIZE=256", "COMPRESS=DEFLATE")
		if err := os.Rename(tmp, path); err != nil {
			b.Fatal(err)
		}
	}
	return path
}

// BenchmarkSample opens a model raster and reads it at 1000 points spread
// over a 3600 x 2400 deflate GeoTIFF of 256 x 256 tiles (every tile holds
// some), as a run does before each model's pass. It reports CPU time
// (user + system) per call beside the wall time.
func BenchmarkSample(b *testing.B) {
	w, h := 3600, 2400
	path := filepath.Join(b.TempDir(), "model.tif")
	writeGridRaster(b, path, w, h, false, func(r, c int) float32 {
		return float32(math.Sin(float64(c)/37) * math.Cos(float64(r)/53))
	}, "TILED=YES", "BLOCKXSIZE=256", "BLOCKYSIZE=256", "COMPRESS=DEFLATE")
	g, r0 := openPath(b, path)
	defer g.Close()
	r0.Close()
	cells := make([]int, 1000)
	for i := range cells {
		cells[i] = (i*7919%h)*w + i*104729%w
	}
	var cpu int64
	for b.Loop() {
		t0 := cpuNow(b)
		r, err := Open(path)
		if err != nil {
			b.Fatal(err)
		}
		if _, _, err := r.Sample(g, cells); err != nil {
			b.Fatal(err)
		}
		r.Close()
		cpu += cpuNow(b) - t0
	}
	b.ReportMetric(float64(cpu)/float64(b.N)/1e6, "cpu-ms/op")
}
