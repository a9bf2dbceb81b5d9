package pipeline

import (
	"os"
	"path/filepath"
	"testing"

	"areasweep/cmd/internal/settings"
	"areasweep/metrics"
)

// TestResampleMemoCountsDrawTable: the paired analysis's estimate holds
// the table of resample counts, 1 byte per test point and iteration, up
// to metrics.MaxDrawTableBytes, beside the memo of resampled scores.
func TestResampleMemoCountsDrawTable(t *testing.T) {
	o := &Options{Values: settings.Values{Models: []string{"a=a.tif", "b=b.tif"}, E: []float64{0.05, 0.1}, Iterations: 1000}}
	memo := o.resampleMemo(20, 0)
	if memo <= 0 {
		t.Fatalf("memo of 20 extents: %d bytes", memo)
	}
	for _, c := range []struct {
		points int
		table  int64
	}{
		{500, 500 * 1000},                          // the 27 million-cell study's 500 test points: 0.5 MB
		{100_000, 100_000 * 1000},                  // 100 MB: within the cap of 128 MiB
		{134_217, int64(134_217) * 1000},           // just under the cap
		{134_218, metrics.MaxDrawTableBytes},       // just over: drawn again, so only the cap is counted
		{1_000_000_000, metrics.MaxDrawTableBytes}, // never more than the cap
	} {
		if got := o.resampleMemo(20, c.points) - memo; got != c.table {
			t.Errorf("%d points: the table counts %d bytes, want %d", c.points, got, c.table)
		}
	}
}

// TestEstimateCountsKeptBlocks: a batch's need for a study (Estimate) is
// the figure the study's run checks, kept blocks included. Before, it left
// out the keptBlockBytes (128 MiB) that a scoring run holds from a model's
// sampling at the points to the end of its pass, so a batch put studies
// together that needed 128 MiB more each than its budget counted, and a
// SLURM task asked for --mem without them. A run of `extents` scores
// nothing and keeps no block: its estimate stays below them (a 4 x 3
// raster, 3 occurrence lines: GDAL's 16 MB block cache and a few kB).
func TestEstimateCountsKeptBlocks(t *testing.T) {
	dir := t.TempDir()
	model := tinyRaster(t, dir, "m.tif", true, true)
	occ := filepath.Join(dir, "occ.csv")
	if err := os.WriteFile(occ, []byte("lon,lat,role\n10.1,47.9,train\n10.6,47.6,test\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		extentsOnly bool
		atLeast     bool
	}{
		{false, true}, // a run that scores: the kept blocks are counted
		{true, false}, // extents: no block kept
	} {
		o := Options{Values: settings.Values{Models: []string{"m=" + model}, Occurrences: occ, E: []float64{0.05}, Iterations: 100, Workers: 1}, ExtentsOnly: c.extentsOnly}
		got, err := Estimate(o)
		if err != nil {
			t.Fatal(err)
		}
		if (got >= keptBlockBytes) != c.atLeast {
			t.Errorf("extents only %v: Estimate %d bytes; want it at least keptBlockBytes (%d): %v", c.extentsOnly, got, keptBlockBytes, c.atLeast)
		}
		want, _, _ := o.runMemory(12, 3, 3)
		if got != want.Total() {
			t.Errorf("extents only %v: Estimate %d bytes, the run's own estimate %d", c.extentsOnly, got, want.Total())
		}
	}
}
