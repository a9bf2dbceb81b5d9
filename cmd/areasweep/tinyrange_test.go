package main

import (
	"math"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/extent"
)

// TestValuesCloserThanTheHistogramWarned: a Float64 model whose values all
// lie within about 4.5e-305 of each other (the small study's model times
// 1e-310, subnormal numbers: hD's degenerate-data hunt) gets a Boyce index
// read from fewer histogram bins than stated (its bins are never narrower
// than 2^-1022): it differed from the unscaled model's by up to 0.04 with
// no word. The run warns, and says that the other scores are exact: the
// AUC and the partial ROC ratio equal the unscaled model's (a scale
// changes no rank), while the Boyce index differs on some extent.
func TestValuesCloserThanTheHistogramWarned(t *testing.T) {
	s := newSmallStudy(t)
	grid, err := extent.NewGrid(s.w, s.h, s.gt, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer grid.Close()
	tiny := filepath.Join(s.dir, "tiny.tif")
	v := make([]float64, len(s.vals))
	for i, x := range s.vals {
		v[i] = x * 1e-310
	}
	writeFloat64Raster(t, tiny, grid, v)
	out := filepath.Join(t.TempDir(), "out")
	_, se, code := runBin(t, "run", "--model", "m="+s.model, "--model", "tiny="+tiny, "--occurrences", s.occ, "--region", s.region,
		"--iterations", "5", "--region-buffers", "60", "--point-buffers", "40", "--hull-buffers", "0", "--no-distance-null", "--out", out)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	res := loadResults(t, out)
	var warned []string
	for _, w := range res.Warnings {
		if strings.Contains(w, "histogram resolves") {
			warned = append(warned, w)
		}
	}
	if len(warned) != 1 || !strings.HasPrefix(warned[0], "model tiny: the values of "+tiny) ||
		!strings.Contains(warned[0], "that index is approximate, the other scores are not") || !strings.Contains(warned[0], `--calc="A*1e300"`) {
		t.Fatalf("warnings %q: want one for model tiny alone", res.Warnings)
	}
	if !strings.Contains(se, "histogram resolves") {
		t.Errorf("no warning on the terminal: %s", se)
	}
	differs := false
	for _, a := range res.Scores {
		if a.Model != "m" || !a.Scored {
			continue
		}
		for _, b := range res.Scores {
			if b.Model != "tiny" || b.Extent != a.Extent {
				continue
			}
			if !b.Scored || b.AUC != a.AUC || b.PartialROC[0].Ratio != a.PartialROC[0].Ratio {
				t.Errorf("%s: tiny AUC %v ratio %v, m %v and %v", a.Extent, b.AUC, b.PartialROC[0].Ratio, a.AUC, a.PartialROC[0].Ratio)
			}
			if a.Boyce != nil && b.Boyce != nil && math.Abs(a.Boyce.Index-b.Boyce.Index) > 1e-3 {
				differs = true
			}
		}
	}
	if !differs {
		t.Error("the Boyce indices agree on every extent: if the histogram now resolves such a range, drop the warning")
	}
}
