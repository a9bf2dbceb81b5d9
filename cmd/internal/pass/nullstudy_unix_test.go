//go:build unix

package pass

import (
	"fmt"
	"path/filepath"
	"testing"

	"areasweep/extent"
	"areasweep/extent/benchfamily"
	"areasweep/extent/geodesy"
	"areasweep/extent/nullmodel"
	"areasweep/metrics"
)

// BenchmarkNullStudy times the distance-only null's pass as a run makes
// it on the study named by AREASWEEP_BENCH_STUDY (skipped when unset; a
// folder of cmd/sweepbench): the 13-extent family of extent/benchfamily,
// the layout of the null's values at every occurrence with a histogram
// floor, the sorting-bias tally, 2 workers; process CPU time per cell.
func BenchmarkNullStudy(b *testing.B) {
	dir, g := benchStudy(b)
	train := studyTrain(b, filepath.Join(dir, "occurrences.csv"))
	all := studyAll(b, filepath.Join(dir, "occurrences.csv"))
	lats, lons := make([]float64, len(train)), make([]float64, len(train))
	for j, p := range train {
		lats[j], lons[j] = p.Lat, p.Lon
	}
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		b.Fatal(err)
	}
	f := DistanceNull(g, ix)
	v := NewVirtual(g, f)
	xs, ys := make([]float64, len(all)), make([]float64, len(all))
	plons, plats := make([]float64, len(all)), make([]float64, len(all))
	for j, p := range all {
		plons[j], plats[j] = p.Lon, p.Lat
	}
	g.FromLonLat(plons, plats, xs, ys)
	var pc []int
	for i := range all {
		if c, row, ok := g.CellOf(xs[i], ys[i]); ok {
			pc = append(pc, row*g.Width+c)
		}
	}
	vals, _, err := v.Sample(g, pc)
	if err != nil {
		b.Fatal(err)
	}
	layout, err := metrics.NewLayout(vals, 4096, metrics.WithHistFloor(DistanceNullFloor(f, g, 4096)))
	if err != nil {
		b.Fatal(err)
	}
	region, points := benchfamily.Buffers(13)
	spec := extent.Spec{Region: filepath.Join(dir, "region.geojson"), RegionBuffersKm: region, Train: train, PointBuffersKm: points, HullBuffersKm: []float64{0}}
	fam, err := extent.Build(g, nil, spec, nil, nil)
	if err != nil {
		b.Fatal(err)
	}
	b.Run(fmt.Sprintf("extents=%d,workers=2", len(fam.Members)), func(b *testing.B) {
		var cpu int64
		for b.Loop() {
			t0 := cpuNow(b)
			var bg nullmodel.Background
			vt := NewVirtual(g, f)
			vt.Tally(fam, &bg)
			if _, _, err := vt.Score(g, fam, layout, Options{Workers: 2}); err != nil {
				b.Fatal(err)
			}
			cpu += cpuNow(b) - t0
		}
		b.ReportMetric(float64(cpu)/float64(b.N)/float64(g.Cells()), "cpu-ns/cell")
	})
}
