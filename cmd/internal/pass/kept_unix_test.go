//go:build unix

package pass

import (
	"fmt"
	"testing"

	"areasweep/extent"
	"areasweep/extent/vocab"
)

// BenchmarkSampleThenPass is a model's share of a run that reads its
// raster: Sample at 1,000 points, then a pass (on 2 workers) over every
// block, on BenchmarkRasterScore's 27-million-cell raster (Float32,
// deflate, 256 x 256 tiles, written once into the temporary folder). The
// points lie in the central quarter of the grid (117 of the 425 blocks
// hold some). keep=0 decodes those blocks twice, keep=128MiB hands them
// from Sample to the pass. The pass scores an empty family, so what is
// timed is reading and decoding: process CPU time (user + system) per
// Sample + pass, in ms.
func BenchmarkSampleThenPass(b *testing.B) {
	path := rasterScorePath(b)
	g, r0 := openPath(b, path)
	defer g.Close()
	r0.Close()
	w, h := g.Width, g.Height
	cells := make([]int, 1000)
	for i := range cells {
		cells[i] = (h/4+i*7919%(h/2))*w + w/4 + i*104729%(w/2)
	}
	fam := extent.NewFamilyFromRuns(g, []extent.Member{{ID: "0", Status: vocab.StatusOK}}, func(k, row int) []int32 { return nil })
	layout := mustLayout(b, 0, 1)
	for _, keep := range []int64{0, 128 << 20} {
		b.Run(fmt.Sprintf("cells=%d,keep=%dMiB", w*h, keep>>20), func(b *testing.B) {
			var cpu int64
			reused := 0
			for b.Loop() {
				t0 := cpuNow(b)
				r, err := Open(path)
				if err != nil {
					b.Fatal(err)
				}
				r.KeepBlocks(keep, nil)
				if _, _, err := r.Sample(g, cells); err != nil {
					b.Fatal(err)
				}
				if _, _, err := r.Score(g, fam, layout, Options{Workers: 2}); err != nil {
					b.Fatal(err)
				}
				reused = r.Reused()
				r.Close()
				cpu += cpuNow(b) - t0
			}
			b.ReportMetric(float64(cpu)/float64(b.N)/1e6, "cpu-ms/op")
			b.ReportMetric(float64(reused), "blocks-reused")
		})
	}
}
