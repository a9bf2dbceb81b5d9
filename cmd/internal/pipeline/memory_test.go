package pipeline

import (
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
