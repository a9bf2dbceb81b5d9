package extent

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

// BenchmarkBuild measures building a family of 10 members (base, four
// region buffers, three point buffers around 500 points, hull, whole
// raster) on latitude-longitude grids of 1 and 12 million cells.
func BenchmarkBuild(b *testing.B) {
	dir := b.TempDir()
	t := &testing.T{}
	region := writeGeoJSON(t, dir, "r.geojson", []string{"r"}, [][][2]float64{{{4, 40}, {14, 40}, {14, 48}, {9, 45}, {4, 48}, {4, 40}}})
	r := rand.New(rand.NewPCG(1, 2))
	var pts []LonLat
	for i := 0; i < 500; i++ {
		pts = append(pts, LonLat{Lon: 5 + 8*r.Float64(), Lat: 41 + 6*r.Float64()})
	}
	for _, size := range []struct{ w, h int }{{1000, 1000}, {4000, 3000}} {
		step := 20.0 / float64(size.w)
		g, err := NewGrid(size.w, size.h, [6]float64{0, step, 0, 52, 0, -step}, "EPSG:4326")
		if err != nil {
			b.Fatal(err)
		}
		v := NewValid(g.Cells())
		for i := 0; i < g.Cells(); i++ {
			v.Set(i)
		}
		spec := Spec{Region: region, RegionBuffersKm: []float64{-50, 100, 250, 500}, Train: pts, PointBuffersKm: []float64{25, 50, 100}, HullBuffersKm: []float64{0}}
		b.Run(fmt.Sprintf("cells=%d", g.Cells()), func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				if _, err := Build(g, v, spec, nil, nil); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(g.Cells())*float64(b.N)/b.Elapsed().Seconds(), "cells/s")
		})
	}
}
