//go:build unix

package pass

import (
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"areasweep/extent"
	"areasweep/extent/geodesy"
	"areasweep/extent/nullmodel"
	"areasweep/metrics"
)

// cpuNow returns the process's user plus system CPU time in nanoseconds.
func cpuNow(tb testing.TB) int64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		tb.Fatal(err)
	}
	return ru.Utime.Nano() + ru.Stime.Nano()
}

// BenchmarkNullVsRaster is the cost criterion of the distance-only null:
// on the whole-sweep benchmark's study (see BenchmarkNullPass) at 4 and 27
// million cells, it alternates a pass over a model raster of the same size
// (Float32, deflate, 256 x 256 tiles, as cmd/sweepbench writes) and the
// null's pass (bounds, scoring, the sorting-bias tally on every row), both
// with 2 workers and the same 8 extents, and reports each one's process
// CPU time (user + system, from getrusage) per cell and their ratio, so
// that other load on the machine does not enter the comparison.
//
// The projected case (crs=EPSG:3035) is the same study on a Lambert
// azimuthal equal-area grid (nullBenchStudyOn), against the same raster.
func BenchmarkNullVsRaster(b *testing.B) {
	for _, cells := range []float64{4e6, 27e6} {
		h := int(math.Round(math.Sqrt(cells / 1.5)))
		w := int(math.Round(float64(h) * 1.5))
		path := filepath.Join(b.TempDir(), "model.tif")
		writeGridRaster(b, path, w, h, false, func(r, c int) float32 {
			x, y := float64(c)/float64(w)-0.5, float64(r)/float64(h)-0.5
			return float32(math.Exp(-(x*x+y*y)*8) + 0.02*math.Sin(float64(c)/37)*math.Cos(float64(r)/53))
		}, "TILED=YES", "BLOCKXSIZE=256", "BLOCKYSIZE=256", "COMPRESS=DEFLATE")
		rg, r := openPath(b, path)
		rfam := fullFamily(rg, 8)
		rlayout := mustLayout(b, 0, 1)
		for _, crs := range []string{"EPSG:4326", "EPSG:3035"} {
			g, v, layout, fam := nullBenchStudyOn(b, cells, crs)
			name := fmt.Sprintf("cells=%d,extents=8,workers=2", w*h)
			if crs != "EPSG:4326" {
				name = fmt.Sprintf("crs=%s,cells=%d,extents=8,workers=2", strings.TrimPrefix(crs, "EPSG:"), w*h)
			}
			b.Run(name, func(b *testing.B) {
				var rasterCPU, nullCPU int64
				for b.Loop() {
					t0 := cpuNow(b)
					if _, _, err := r.Score(rg, rfam, rlayout, Options{Workers: 2}); err != nil {
						b.Fatal(err)
					}
					t1 := cpuNow(b)
					var bg nullmodel.Background
					vt := NewVirtual(g, v.field)
					vt.Tally(fam, &bg)
					if _, _, err := vt.Score(g, fam, layout, Options{Workers: 2}); err != nil {
						b.Fatal(err)
					}
					t2 := cpuNow(b)
					rasterCPU += t1 - t0
					nullCPU += t2 - t1
				}
				n := float64(b.N) * float64(w*h)
				b.ReportMetric(float64(rasterCPU)/n, "raster-cpu-ns/cell")
				b.ReportMetric(float64(nullCPU)/n, "null-cpu-ns/cell")
				b.ReportMetric(float64(nullCPU)/float64(rasterCPU), "null/raster")
			})
			g.Close()
		}
		r.Close()
		rg.Close()
	}
}

// BenchmarkNullBounds isolates the bounds of the distance-only null
// (nullmodel.Field.Bounds, the part of its pass that BenchmarkNullVsRaster
// cannot separate from the scoring and the tally): every block of
// VirtualBlock x VirtualBlock cells of the 27-million-cell study, every cell
// needed, on one goroutine, reporting the process CPU time per cell.
func BenchmarkNullBounds(b *testing.B) {
	g, v, layout, _ := nullBenchStudy(b, 27e6)
	bf := v.field.(BoundedField)
	fb := newFloorBinner(layout)
	lo := make([]float64, VirtualBlock*VirtualBlock)
	hi := make([]float64, VirtualBlock*VirtualBlock)
	var cpu int64
	for b.Loop() {
		t0 := cpuNow(b)
		for y0 := 0; y0 < g.Height; y0 += VirtualBlock {
			for x0 := 0; x0 < g.Width; x0 += VirtualBlock {
				w, h := min(VirtualBlock, g.Width-x0), min(VirtualBlock, g.Height-y0)
				bf.Bounds(x0, y0, w, h, nil, fb, lo, hi)
			}
		}
		cpu += cpuNow(b) - t0
	}
	b.ReportMetric(float64(cpu)/float64(b.N)/float64(g.Width*g.Height), "cpu-ns/cell")
	g.Close()
}

// BenchmarkNullBoundsDense is BenchmarkNullBounds around training points
// crowded in one place: 2400 x 1800 cells of 0.00625 degrees (about 600
// m) with a lattice of 1,000 training points one cell apart at the
// centre, the layout of their own cells' values, as a pass makes it. Far
// from the cluster every super-tile has hundreds of candidate sites and
// most cells are computed exactly (nullmodel's denseSites); it reports the
// CPU time per cell and the share of cells computed exactly.
func BenchmarkNullBoundsDense(b *testing.B) {
	const w, h, deg = 2400, 1800, 0.00625
	west, north := -145.0, -35.0
	g, err := extent.NewGrid(w, h, [6]float64{west, deg, 0, north, 0, -deg}, "EPSG:4326")
	if err != nil {
		b.Fatal(err)
	}
	defer g.Close()
	var lats, lons []float64
	var pc []int
	for i := range 1000 {
		c, r := w/2-16+i%32, h/2-16+i/32
		lon, lat := g.Centre(c, r)
		lats, lons, pc = append(lats, lat), append(lons, lon), append(pc, r*w+c)
	}
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		b.Fatal(err)
	}
	f := DistanceNull(g, ix)
	v := NewVirtual(g, f)
	vals, _, _ := v.Sample(g, pc)
	layout, err := metrics.NewLayout(vals, 4096, metrics.WithHistFloor(DistanceNullFloor(f, g, 4096)))
	if err != nil {
		b.Fatal(err)
	}
	bf := v.field.(BoundedField)
	fb := newFloorBinner(layout)
	lo := make([]float64, VirtualBlock*VirtualBlock)
	hi := make([]float64, VirtualBlock*VirtualBlock)
	var cpu int64
	exact := 0
	for b.Loop() {
		exact = 0
		t0 := cpuNow(b)
		for y0 := 0; y0 < h; y0 += VirtualBlock {
			for x0 := 0; x0 < w; x0 += VirtualBlock {
				bw, bh := min(VirtualBlock, w-x0), min(VirtualBlock, h-y0)
				bf.Bounds(x0, y0, bw, bh, nil, fb, lo, hi)
				for i := range bw * bh {
					if lo[i] == hi[i] {
						exact++
					}
				}
			}
		}
		cpu += cpuNow(b) - t0
	}
	b.ReportMetric(float64(cpu)/float64(b.N)/float64(w*h), "cpu-ns/cell")
	b.ReportMetric(float64(exact)/float64(w*h), "exact-share")
}

// BenchmarkNullBoundsProjected is BenchmarkNullBounds on the study's
// EPSG:3035 grid (nullBenchStudyOn) of 4 and 27 million cells: CPU ns per
// cell, the same for the cell centres alone (CellCentres, PROJ), and the
// share of cells computed exactly (lo == hi).
func BenchmarkNullBoundsProjected(b *testing.B) {
	for _, cells := range []float64{4e6, 27e6} {
		g, v, layout, _ := nullBenchStudyOn(b, cells, "EPSG:3035")
		b.Run(fmt.Sprintf("cells=%d", g.Cells()), func(b *testing.B) { boundsProjected(b, g, v, layout) })
		g.Close()
	}
}

func boundsProjected(b *testing.B, g *extent.Grid, v *Virtual, layout *metrics.Layout) {
	bf := v.field.(BoundedField)
	fb := newFloorBinner(layout)
	lo := make([]float64, VirtualBlock*VirtualBlock)
	hi := make([]float64, VirtualBlock*VirtualBlock)
	lons := make([]float64, VirtualBlock)
	lats := make([]float64, VirtualBlock)
	cen := CellCentres(g)
	var cpu, cenCPU int64
	exact := 0
	for b.Loop() {
		exact = 0
		t0 := cpuNow(b)
		for y0 := 0; y0 < g.Height; y0 += VirtualBlock {
			for x0 := 0; x0 < g.Width; x0 += VirtualBlock {
				w, h := min(VirtualBlock, g.Width-x0), min(VirtualBlock, g.Height-y0)
				bf.Bounds(x0, y0, w, h, nil, fb, lo, hi)
				for i := range w * h {
					if lo[i] == hi[i] {
						exact++
					}
				}
			}
		}
		t1 := cpuNow(b)
		for y0 := 0; y0 < g.Height; y0 += VirtualBlock {
			for x0 := 0; x0 < g.Width; x0 += VirtualBlock {
				w, h := min(VirtualBlock, g.Width-x0), min(VirtualBlock, g.Height-y0)
				for y := range h {
					cen(y0+y, x0, x0+w, lons, lats)
				}
			}
		}
		cpu += t1 - t0
		cenCPU += cpuNow(b) - t1
	}
	n := float64(b.N) * float64(g.Width*g.Height)
	b.ReportMetric(float64(cpu)/n, "cpu-ns/cell")
	b.ReportMetric(float64(cenCPU)/n, "centres-cpu-ns/cell")
	b.ReportMetric(float64(exact)/float64(g.Width*g.Height), "exact-share")
}
