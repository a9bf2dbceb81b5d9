//go:build unix

package pass

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"areasweep/extent"
	"areasweep/extent/benchfamily"
	"areasweep/extent/vocab"
)

// planFamily returns a family shaped like a run's of about n extents on
// g: a chain of n/2 nested ellipses growing outwards from inside the grid
// (region buffers) and a chain of the other n/2 members, each the union
// of 40 discs of one radius around fixed sites (point buffers: several
// runs per row, more boundaries as the radius grows).
func planFamily(g *extent.Grid, n int) *extent.Family {
	w, h := float64(g.Width), float64(g.Height)
	region := n / 2
	var members []extent.Member
	for k := range n {
		members = append(members, extent.Member{ID: fmt.Sprint(k), Status: vocab.StatusOK})
	}
	type site struct{ x, y float64 }
	var sites []site
	for i := range 40 {
		sites = append(sites, site{w * (0.2 + 0.6*float64((i*37)%40)/40), h * (0.2 + 0.6*float64((i*23)%40)/40)})
	}
	f := extent.NewFamilyFromRuns(g, members, func(k, row int) []int32 {
		y := float64(row) + 0.5
		if k < region {
			f := 0.2 + 0.75*float64(k+1)/float64(region)
			dy := (y - h/2) / (f * h / 2)
			if math.Abs(dy) >= 1 {
				return nil
			}
			dx := f * w / 2 * math.Sqrt(1-dy*dy)
			return []int32{max(0, int32(math.Ceil(w/2-dx))), min(int32(w), int32(math.Ceil(w/2+dx)))}
		}
		r := h * 0.01 * float64(k-region+1)
		var runs []int32
		for _, s := range sites {
			if dy := y - s.y; math.Abs(dy) < r {
				dx := math.Sqrt(r*r - dy*dy)
				runs = append(runs, max(0, int32(math.Ceil(s.x-dx))), min(int32(w), int32(math.Ceil(s.x+dx))))
			}
		}
		return unionRuns(runs)
	})
	for k := range n {
		name := "points"
		if k < region {
			name = "region"
		}
		f.Chains[name] = append(f.Chains[name], k)
	}
	return f
}

// unionRuns returns the union of the half-open runs a0, a1, b0, b1, ...
// (in any order, possibly overlapping) as sorted, disjoint runs.
func unionRuns(runs []int32) []int32 {
	type run struct{ a, b int32 }
	rs := make([]run, 0, len(runs)/2)
	for i := 0; i < len(runs); i += 2 {
		if runs[i] < runs[i+1] {
			rs = append(rs, run{runs[i], runs[i+1]})
		}
	}
	for i := 1; i < len(rs); i++ {
		for j := i; j > 0 && rs[j].a < rs[j-1].a; j-- {
			rs[j], rs[j-1] = rs[j-1], rs[j]
		}
	}
	var out []int32
	for _, r := range rs {
		if n := len(out); n > 0 && r.a <= out[n-1] {
			out[n-1] = max(out[n-1], r.b)
			continue
		}
		out = append(out, r.a, r.b)
	}
	return out
}

// BenchmarkPlan measures a pass's planning alone, on one worker: every
// block row's plan (planBand) and every block's share of it (planBlock),
// for 256 x 256 blocks of a 3600 x 2400 grid and families of a run's
// shape (planFamily) of 13 and 60 extents. It reports the CPU time
// (user + system) per block; the target is a cost nearly flat in
// the number of extents.
func BenchmarkPlan(b *testing.B) {
	w, h, side := 3600, 2400, 256
	g, err := extent.NewGrid(w, h, [6]float64{-20, 60.0 / float64(w), 0, 70, 0, -40.0 / float64(h)}, "EPSG:4326")
	if err != nil {
		b.Fatal(err)
	}
	defer g.Close()
	for _, n := range []int{13, 60} {
		fam := planFamily(g, n)
		groups := fam.Groups()
		b.Run(fmt.Sprintf("extents=%d", n), func(b *testing.B) { planBlocks(b, fam, groups, w, h, side) })
	}
}

// BenchmarkPlanStudy is BenchmarkPlan on the families of 13 and 60
// extents of `cmd/sweepbench` (extent/benchfamily: base, hull and whole
// raster, region buffers every 20 km in and out, point buffers every
// 25 km around the training points) built on the study named by
// AREASWEEP_BENCH_STUDY (a folder holding model1.tif, occurrences.csv and
// region.geojson, e.g. a sweepbench study; skipped when unset), with the
// raster's 256 x 256 blocks, on one worker: CPU time per block.
func BenchmarkPlanStudy(b *testing.B) {
	dir, g := benchStudy(b)
	train := studyTrain(b, filepath.Join(dir, "occurrences.csv"))
	w, h, side := g.Width, g.Height, 256
	for _, n := range []int{13, 60} {
		region, points := benchfamily.Buffers(n)
		spec := extent.Spec{Region: filepath.Join(dir, "region.geojson"), RegionBuffersKm: region, Train: train, PointBuffersKm: points, HullBuffersKm: []float64{0}}
		fam, err := extent.Build(g, nil, spec, nil, nil)
		if err != nil {
			b.Fatal(err)
		}
		groups := fam.Groups()
		b.Run(fmt.Sprintf("extents=%d", len(fam.Members)), func(b *testing.B) { planBlocks(b, fam, groups, w, h, side) })
	}
}

// planBlocks plans every block of side x side cells of a w x h grid for
// fam on one worker, as a pass does, and reports the CPU time per block.
func planBlocks(b *testing.B, fam *extent.Family, groups [][]int, w, h, side int) {
	nx, ny := (w+side-1)/side, (h+side-1)/side
	ws := newWorkerState(side, side)
	var cpu int64
	for b.Loop() {
		t0 := cpuNow(b)
		bs := newBands(fam, groups, w, nx, side, RowRange{0, h})
		for i := range nx * ny {
			x0, y0 := (i%nx)*side, (i/nx)*side
			blk := block{x0: x0, y0: y0, w: min(side, w-x0), h: min(side, h-y0)}
			bd := bs.get(i/nx, ws)
			ws.planBlock(bd, blk)
			bs.done(i/nx, bd)
		}
		cpu += cpuNow(b) - t0
	}
	b.ReportMetric(float64(cpu)/float64(b.N*nx*ny), "cpu-ns/block")
}

// benchStudy opens the grid of the study named by AREASWEEP_BENCH_STUDY
// (a folder of cmd/sweepbench holding model1.tif, occurrences.csv and
// region.geojson), skipping b when it is unset.
func benchStudy(b *testing.B) (dir string, g *extent.Grid) {
	dir = os.Getenv("AREASWEEP_BENCH_STUDY")
	if dir == "" {
		b.Skip("AREASWEEP_BENCH_STUDY names no study folder")
	}
	extent.Configure()
	g, err := extent.OpenGrid(filepath.Join(dir, "model1.tif"))
	if err != nil {
		b.Fatal(err)
	}
	b.Cleanup(func() { g.Close() })
	return dir, g
}

// studyTrain reads the training points of a sweepbench occurrence file
// (longitude,latitude,role with a header).
func studyTrain(b *testing.B, path string) []extent.LonLat { return studyPoints(b, path, true) }

// studyAll reads every point of a sweepbench occurrence file.
func studyAll(b *testing.B, path string) []extent.LonLat { return studyPoints(b, path, false) }

// studyPoints reads the points of a sweepbench occurrence file, only the
// training points when trainOnly.
func studyPoints(b *testing.B, path string, trainOnly bool) []extent.LonLat {
	data, err := os.ReadFile(path)
	if err != nil {
		b.Fatal(err)
	}
	var pts []extent.LonLat
	for _, line := range strings.Split(strings.TrimSpace(string(data)), "\n")[1:] {
		f := strings.Split(line, ",")
		if len(f) < 3 {
			b.Fatalf("%s: bad line %q", path, line)
		}
		lon, err1 := strconv.ParseFloat(f[0], 64)
		lat, err2 := strconv.ParseFloat(f[1], 64)
		if err1 != nil || err2 != nil {
			b.Fatalf("%s: bad line %q", path, line)
		}
		if !trainOnly || f[2] == "train" {
			pts = append(pts, extent.LonLat{Lon: lon, Lat: lat})
		}
	}
	return pts
}
