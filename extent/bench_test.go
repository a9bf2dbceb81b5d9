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

// BenchmarkBuildExtents measures building families of about 13 and 60
// members (region buffers every 20 km in and out, point buffers every
// 25 km, hull) on a 1-million-cell latitude-longitude grid: the cost
// should grow far less than the number of members.
func BenchmarkBuildExtents(b *testing.B) {
	dir := b.TempDir()
	t := &testing.T{}
	regionFile := writeGeoJSON(t, dir, "r.geojson", []string{"r"}, [][][2]float64{{{4, 40}, {14, 40}, {14, 48}, {9, 45}, {4, 48}, {4, 40}}})
	r := rand.New(rand.NewPCG(1, 2))
	var pts []LonLat
	for i := 0; i < 500; i++ {
		pts = append(pts, LonLat{Lon: 5 + 8*r.Float64(), Lat: 41 + 6*r.Float64()})
	}
	step := 20.0 / 1000
	g, err := NewGrid(1000, 1000, [6]float64{0, step, 0, 52, 0, -step}, "EPSG:4326")
	if err != nil {
		b.Fatal(err)
	}
	for _, n := range []int{13, 60} {
		var region, points []float64
		for i := 0; i < n-3; i++ {
			if i%2 == 0 {
				d := 20 * float64(i/4+1)
				if (i/2)%2 == 1 {
					d = -d
				}
				region = append(region, d)
			} else {
				points = append(points, 25*float64(i/2+1))
			}
		}
		spec := Spec{Region: regionFile, RegionBuffersKm: region, Train: pts, PointBuffersKm: points, HullBuffersKm: []float64{0}}
		b.Run(fmt.Sprintf("extents=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				if _, err := Build(g, nil, spec, nil, nil); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkOutline measures tracing the outline of a 300 km region buffer
// on a 4-million-cell grid from its runs.
func BenchmarkOutline(b *testing.B) {
	dir := b.TempDir()
	t := &testing.T{}
	region := writeGeoJSON(t, dir, "r.geojson", []string{"r"}, [][][2]float64{{{4, 40}, {14, 40}, {14, 48}, {9, 45}, {4, 48}, {4, 40}}})
	step := 20.0 / 2000
	g, err := NewGrid(2000, 2000, [6]float64{0, step, 0, 52, 0, -step}, "EPSG:4326")
	if err != nil {
		b.Fatal(err)
	}
	f, err := Build(g, nil, Spec{Region: region, RegionBuffersKm: []float64{300}}, nil, nil)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := f.Outline(1); err != nil {
			b.Fatal(err)
		}
	}
}
