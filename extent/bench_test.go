package extent

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"

	"areasweep/extent/benchfamily"
)

// benchRegion writes BenchmarkBuild's region into a temporary folder and
// returns it with its 500 training points.
func benchRegion(b *testing.B) (string, []LonLat) {
	region := writeGeoJSON(&testing.T{}, b.TempDir(), "r.geojson", []string{"r"}, [][][2]float64{{{4, 40}, {14, 40}, {14, 48}, {9, 45}, {4, 48}, {4, 40}}})
	r := rand.New(rand.NewPCG(1, 2))
	var pts []LonLat
	for i := 0; i < 500; i++ {
		pts = append(pts, LonLat{Lon: 5 + 8*r.Float64(), Lat: 41 + 6*r.Float64()})
	}
	return region, pts
}

// BenchmarkBuild measures building a family of 10 members (base, four
// region buffers, three point buffers around 500 points, hull, whole
// raster) on latitude-longitude grids of 1 and 12 million cells.
func BenchmarkBuild(b *testing.B) {
	region, pts := benchRegion(b)
	for _, size := range []struct{ w, h int }{{1000, 1000}, {4000, 3000}} {
		step := 20.0 / float64(size.w)
		g, err := NewGrid(size.w, size.h, [6]float64{0, step, 0, 52, 0, -step}, "EPSG:4326")
		if err != nil {
			b.Fatal(err)
		}
		v := NewValidFunc(g.Width, g.Height, func(int) bool { return true })
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

// BenchmarkBuildGlobal is BenchmarkBuild's family on a whole-world grid
// of 0.05 degrees (26 million cells): a region, its training points and
// their buffers in one corner of it, where the cost should follow the
// buffers' area, not the grid's (the distance fields skip the bands of
// rows beyond their reach, the hull finds once for all rows that the
// longitudes increase along them; before both, on a global 30
// arc-second grid, the family took 5.9 s against 1.0 s after).
func BenchmarkBuildGlobal(b *testing.B) {
	region, pts := benchRegion(b)
	g, err := NewGrid(7200, 3600, [6]float64{-180, 0.05, 0, 90, 0, -0.05}, "EPSG:4326")
	if err != nil {
		b.Fatal(err)
	}
	v := NewValidFunc(g.Width, g.Height, func(int) bool { return true })
	spec := Spec{Region: region, RegionBuffersKm: []float64{-50, 100, 250, 500}, Train: pts, PointBuffersKm: []float64{25, 50, 100}, HullBuffersKm: []float64{0, 100}}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Build(g, v, spec, nil, nil); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(g.Cells())*float64(b.N)/b.Elapsed().Seconds(), "cells/s")
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

// BenchmarkRegionBuffersFar measures building region buffers every 20 km
// in and out to 300 km around a region with a ragged edge, on a
// 6-million-cell latitude-longitude grid (cells of about 0.7 by 0.9 km):
// the region buffers of a 60-extent family. The walked tiles of its
// distance field far from the boundary (a site every cell side) have
// more than a hundred sites near them (maxWalkNear). It reports the
// process CPU time per build.
func BenchmarkRegionBuffersFar(b *testing.B) {
	dir := b.TempDir()
	t := &testing.T{}
	// A ragged coast: the north edge zigzags 0.4 degrees every 0.1 degree,
	// so the boundary is long and its sites many.
	ring := [][2]float64{{4, 40}, {14, 40}}
	for i := 100; i >= 0; i-- {
		ring = append(ring, [2]float64{4 + 0.1*float64(i), 47 + 0.4*float64(i%2)})
	}
	ring = append(ring, [2]float64{4, 40})
	region := writeGeoJSON(t, dir, "r.geojson", []string{"r"}, [][][2]float64{ring})
	step := 24.0 / 3000
	g, err := NewGrid(3000, 2000, [6]float64{-3, step, 0, 52, 0, -step}, "EPSG:4326")
	if err != nil {
		b.Fatal(err)
	}
	var ds []float64
	for d := 20.0; d <= 300; d += 20 {
		ds = append(ds, d, -d)
	}
	spec := Spec{Region: region, RegionBuffersKm: ds}
	b.ReportAllocs()
	c0 := processCPU()
	for i := 0; i < b.N; i++ {
		if _, err := Build(g, nil, spec, nil, nil); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric((processCPU()-c0)/float64(b.N), "cpu-s/op")
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
		if len(f.Outline(1)) == 0 {
			b.Fatal("member 1 has no outline")
		}
	}
}

// BenchmarkBuildStudy measures building the families of 13, 20 and 60
// extents of `cmd/sweepbench` on the study it generated, named by
// AREASWEEP_BENCH_STUDY (a folder holding model1.tif, occurrences.csv and
// region.geojson, e.g. /tmp/areasweep-bench/cells27000000 after
// `go run ./cmd/sweepbench -cells 27e6`); skipped when unset. The family is
// sweepbench's (familyFlags): base, hull and whole raster, then region
// buffers every 20 km in and out and point buffers every 25 km, built
// unclipped as a run builds it. It reports the process CPU time (user +
// system) per build, steadier than wall time on a shared machine.
func BenchmarkBuildStudy(b *testing.B) {
	st := openBenchStudy(b)
	defer st.g.Close()
	g, trainCells, testCells := st.g, st.trainCells, st.testCells
	for _, n := range []int{13, 20, 60} {
		spec := st.spec(n)
		b.Run(fmt.Sprintf("extents=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			c0 := processCPU()
			for i := 0; i < b.N; i++ {
				if _, err := Build(g, nil, spec, trainCells, testCells); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric((processCPU()-c0)/float64(b.N), "cpu-s/op")
		})
	}
}

// BenchmarkWriteGeoPackageStudy measures writing extents.gpkg
// (WriteGeoPackage: outlines traced from the runs, then the GeoPackage)
// for the families of 13 and 60 extents of BenchmarkBuildStudy, on the
// study named by AREASWEEP_BENCH_STUDY (skipped when unset), in process
// CPU time per write.
func BenchmarkWriteGeoPackageStudy(b *testing.B) {
	st := openBenchStudy(b)
	defer st.g.Close()
	for _, n := range []int{13, 60} {
		f, err := Build(st.g, nil, st.spec(n), st.trainCells, st.testCells)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("extents=%d", n), func(b *testing.B) {
			// A folder per run: -count runs it again, with the same names.
			tmp := b.TempDir()
			c0 := processCPU()
			for i := 0; i < b.N; i++ {
				if err := f.WriteGeoPackage(filepath.Join(tmp, fmt.Sprintf("%d-%d.gpkg", b.N, i))); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric((processCPU()-c0)/float64(b.N), "cpu-s/op")
		})
	}
}

// benchStudy is the sweepbench study named by AREASWEEP_BENCH_STUDY: its
// grid (the caller closes it), training points and the cells of both
// roles.
type benchStudy struct {
	dir                   string
	g                     *Grid
	train                 []LonLat
	trainCells, testCells []int
}

// openBenchStudy opens the study named by AREASWEEP_BENCH_STUDY, skipping
// the benchmark when it is unset.
func openBenchStudy(b *testing.B) benchStudy {
	dir := os.Getenv("AREASWEEP_BENCH_STUDY")
	if dir == "" {
		b.Skip("AREASWEEP_BENCH_STUDY names no study folder")
	}
	Configure()
	g, err := OpenGrid(filepath.Join(dir, "model1.tif"))
	if err != nil {
		b.Fatal(err)
	}
	train, trainCells, testCells := benchPoints(b, g, filepath.Join(dir, "occurrences.csv"))
	return benchStudy{dir: dir, g: g, train: train, trainCells: trainCells, testCells: testCells}
}

// spec is the Spec of sweepbench's family of about n extents (familyFlags):
// region buffers every 20 km in and out, point buffers every 25 km, the
// hull, the base and the whole raster.
func (st benchStudy) spec(n int) Spec {
	region, points := benchfamily.Buffers(n)
	return Spec{Region: filepath.Join(st.dir, "region.geojson"), RegionBuffersKm: region, Train: st.train, PointBuffersKm: points, HullBuffersKm: []float64{0}}
}

// benchPoints reads a sweepbench occurrence file (longitude,latitude,role
// with a header): the training points and the grid cells of both roles.
func benchPoints(b *testing.B, g *Grid, path string) (train []LonLat, trainCells, testCells []int) {
	data, err := os.ReadFile(path)
	if err != nil {
		b.Fatal(err)
	}
	for _, line := range strings.Split(strings.TrimSpace(string(data)), "\n")[1:] {
		f := strings.Split(line, ",")
		lon, err1 := strconv.ParseFloat(f[0], 64)
		lat, err2 := strconv.ParseFloat(f[1], 64)
		if err1 != nil || err2 != nil || len(f) < 3 {
			b.Fatalf("%s: bad line %q", path, line)
		}
		cell := -1
		if c, r, ok := g.CellOf(lon, lat); ok {
			cell = r*g.Width + c
		}
		if f[2] == "train" {
			train = append(train, LonLat{Lon: lon, Lat: lat})
			trainCells = append(trainCells, cell)
		} else {
			testCells = append(testCells, cell)
		}
	}
	return train, trainCells, testCells
}

// processCPU is the process's CPU time so far (user + system), seconds.
func processCPU() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return math.NaN()
	}
	return float64(ru.Utime.Nano()+ru.Stime.Nano()) / 1e9
}

// BenchmarkEcoregionUnits builds a family of the base region and the
// ecoregion extents of a layer of 1,000 units (a 40 x 25 tiling of
// 0.5-degree squares, each edge cut into 25 pieces: 100 vertices a unit)
// with 5,000 training points, on a 400 x 300 grid of 0.05 degrees. It
// measures the unit counts (an envelope test before each point's walk of
// a unit's edges) and the touching test (each unit against the selected
// units whose envelopes meet its own): a layer of 2,000 units of 500
// vertices and 17,000 points took over 300 s before those, 3 s after.
func BenchmarkEcoregionUnits(b *testing.B) {
	dir := b.TempDir()
	var feats []string
	for i := range 40 {
		for j := range 25 {
			x0, y0 := 10+0.5*float64(i), 40+0.5*float64(j)
			var pts []string
			corners := [][2]float64{{x0, y0}, {x0 + 0.5, y0}, {x0 + 0.5, y0 + 0.5}, {x0, y0 + 0.5}, {x0, y0}}
			for k := range 4 {
				a, c := corners[k], corners[k+1]
				for s := range 25 {
					t := float64(s) / 25
					pts = append(pts, fmt.Sprintf("[%.6f,%.6f]", a[0]+(c[0]-a[0])*t, a[1]+(c[1]-a[1])*t))
				}
			}
			pts = append(pts, pts[0])
			feats = append(feats, fmt.Sprintf(`{"type":"Feature","properties":{"id":"u%d_%d"},"geometry":{"type":"Polygon","coordinates":[[%s]]}}`, i, j, strings.Join(pts, ",")))
		}
	}
	units := filepath.Join(dir, "units.geojson")
	region := filepath.Join(dir, "region.geojson")
	write := func(path, body string) {
		if err := os.WriteFile(path, []byte(body), 0o644); err != nil {
			b.Fatal(err)
		}
	}
	write(units, `{"type":"FeatureCollection","features":[`+strings.Join(feats, ",")+`]}`)
	write(region, `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[14,43],[26,43],[26,52],[14,52],[14,43]]]}}]}`)
	g, err := NewGrid(400, 300, [6]float64{10, 0.05, 0, 55, 0, -0.05}, "EPSG:4326")
	if err != nil {
		b.Fatal(err)
	}
	defer g.Close()
	rng := rand.New(rand.NewPCG(5, 6))
	train := make([]LonLat, 5000)
	for i := range train {
		train[i] = LonLat{Lon: 15 + 10*rng.Float64(), Lat: 44 + 7*rng.Float64()}
	}
	spec := Spec{Region: region, Train: train, Ecoregions: units, EcoregionField: "id", EcoregionMinPoints: 3}
	b.ResetTimer()
	for b.Loop() {
		f, err := Build(g, nil, spec, nil, nil)
		if err != nil {
			b.Fatal(err)
		}
		if len(f.Members) < 3 {
			b.Fatalf("%d members", len(f.Members))
		}
	}
}
