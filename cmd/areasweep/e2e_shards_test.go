package main

import (
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"testing"
	"time"

	"areasweep/cmd/internal/pass"
	"areasweep/extent/nullmodel"
)

// e2eShardCounts are the shard counts TestEndToEndShardsAndWorkers splits
// each study into: 2, and 7, odd, whose edges fall inside the 32-row
// raster tiles and the null's 15-row super-tiles and 16-row tiles on
// every study's height (checked by cutsInside).
var e2eShardCounts = []int{2, 7}

// e2eNullTileRows is the side, in rows, of the tiles of the distance-only
// null's projected path (nullmodel's tileSide, unexported there).
const e2eNullTileRows = 16

// TestEndToEndShardsAndWorkers: each of the five studies of TestEndToEndGolden
// (projected grids, where the distance-only null takes the projected path,
// and latitude-longitude grids across the antimeridian, at high latitude and
// up to the pole, where it takes the bounded path) gives byte-identical
// results.json, scores.csv, report, methods, extents, omitted points and
// figures with the default workers, --workers 1 and --workers 3, and when
// split into 2 and 7 shards of rows (run with 1 or 2 workers) merged in a
// shuffled order. The shard edges cut inside the rasters' 32 x 32 tiles,
// the null's 240-row blocks (each study is one block high) and its tiles
// or super-tiles.
func TestEndToEndShardsAndWorkers(t *testing.T) {
	g := loadE2EGolden(t)
	for i := range g.Studies {
		st := &g.Studies[i]
		t.Run(st.Spec.Name, func(t *testing.T) {
			start := time.Now()
			h := st.Spec.Height
			nullSide := nullmodel.SuperTile
			if st.Spec.CRS != "EPSG:4326" {
				nullSide = e2eNullTileRows
			}
			for _, side := range []int{32, nullSide, pass.VirtualBlock} {
				if !cutsInside(h, e2eShardCounts, side) {
					t.Fatalf("no shard edge of N = %v on %d rows falls inside a run of %d rows: pick other N", e2eShardCounts, h, side)
				}
			}
			dir := t.TempDir()
			study := writeE2EStudy(t, st, g, dir)
			sameAcrossSplits(t, dir, study, []int{1, 3}, e2eShardCounts, 1)
			t.Logf("%s (%d x %d): %s", st.Spec.Name, st.Spec.Width, h, time.Since(start).Round(time.Millisecond))
		})
	}
}

// cutsInside reports whether some shard edge of a split of height rows
// into one of counts shards falls strictly inside a run of side rows (the
// edges are metrics.ShardBlocks': row (i n) / N).
func cutsInside(height int, counts []int, side int) bool {
	for _, n := range counts {
		for i := 1; i < n; i++ {
			if e := i * height / n; e%side != 0 && e < height {
				return true
			}
		}
	}
	return false
}

// sameAcrossSplits runs the study file study into dir/single, then with
// each worker count of workers and split into each shard count of counts
// (shards run with 1 or 2 workers, merged in an order shuffled from
// shuffle), and reports each output that differs from the single run's.
// It returns the single run's folder.
func sameAcrossSplits(t *testing.T, dir, study string, workers, counts []int, shuffle uint64) string {
	t.Helper()
	args := func(out string, extra ...string) []string {
		return append([]string{"run", "--study", study, "--quiet", "--out", out}, extra...)
	}
	single := filepath.Join(dir, "single")
	if _, se, code := runBin(t, args(single)...); code != 0 {
		t.Fatalf("single run: exit %d: %s", code, se)
	}
	same := comparedOutputs(t, single)
	for _, w := range workers {
		out := filepath.Join(dir, fmt.Sprintf("workers-%d", w))
		if _, se, code := runBin(t, args(out, "--workers", fmt.Sprint(w))...); code != 0 {
			t.Fatalf("--workers %d: exit %d: %s", w, code, se)
		}
		sameOutputs(t, single, out, same, fmt.Sprintf("--workers %d", w))
	}
	for _, n := range counts {
		sub := filepath.Join(dir, fmt.Sprintf("n%d", n))
		outs := runShardsOf(t, sub, n, args)
		merged := filepath.Join(sub, "merged")
		// Our choice of seed: a fixed shuffle, the same on every run.
		order := rand.New(rand.NewPCG(uint64(n), shuffle)).Perm(n)
		mergeShuffled(t, outs, order, merged)
		sameOutputs(t, single, merged, same, fmt.Sprintf("N=%d (merged in the order %v)", n, order))
	}
	return single
}
