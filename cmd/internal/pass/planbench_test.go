//go:build unix

package pass

import (
	"fmt"
	"math"
	"testing"

	"areasweep/extent"
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
	nx, ny := (w+side-1)/side, (h+side-1)/side
	for _, n := range []int{13, 60} {
		fam := planFamily(g, n)
		groups := fam.Groups()
		b.Run(fmt.Sprintf("extents=%d", n), func(b *testing.B) {
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
		})
	}
}
