package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/report"
)

// TestModelAboveNullOfItsCopy checks "model above null" end to end: the
// distance-only null's values written as a GeoTIFF and given as a model
// ("copy"), and twice those values ("twice": a strictly increasing function
// of the null, exact in floating point), each differ from the null by
// exactly 0 on every extent: AUC from the placements with SE 0 and the
// interval 0..0, the partial ROC ratio over the paired resamples likewise.
// The summary reads them as not above the null (the same as it), the page and methods text
// carry the comparison, and scores.csv holds the rows. The study's own
// model m is compared with the null too.
func TestModelAboveNullOfItsCopy(t *testing.T) {
	s := newSmallStudy(t)
	out1 := filepath.Join(s.dir, "out1")
	_, g, vals, _, _ := runWithNullValues(t, s, out1)
	defer g.Close()
	copyPath := filepath.Join(s.dir, "copy.tif")
	writeFloat64Raster(t, copyPath, g, vals)
	twice := make([]float64, len(vals))
	for i, v := range vals {
		twice[i] = 2 * v
	}
	twicePath := filepath.Join(s.dir, "twice.tif")
	writeFloat64Raster(t, twicePath, g, twice)

	out := filepath.Join(s.dir, "out2")
	if _, se, code := runBin(t, s.args(out, "--model", "copy="+copyPath, "--model", "twice="+twicePath)...); code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	res := loadResults(t, out)
	got := map[string]int{}
	for _, p := range res.Paired {
		if p.Kind != report.PairedKindNull {
			continue
		}
		if p.OtherModel != report.DistanceNullName {
			t.Errorf("null record against %q", p.OtherModel)
		}
		got[p.Model]++
		if p.Model != "copy" && p.Model != "twice" {
			continue
		}
		if p.Metric == "auc" || strings.HasPrefix(p.Metric, "partial_roc_e") {
			if !p.Defined && p.Metric == "auc" && p.CommonPoints >= 2 {
				t.Errorf("%s on %s: AUC minus null undefined", p.Model, p.Extent)
			}
			if p.Defined && (p.Diff != 0 || val(p.SE) != 0 || val(p.Low) != 0 || val(p.High) != 0 || p.A != p.B) {
				t.Errorf("%s minus null on %s, %s: %+v, want exactly 0", p.Model, p.Extent, p.Metric, p)
			}
		}
	}
	if got["m"] == 0 || got["copy"] == 0 || got["twice"] == 0 || got["sq"] == 0 {
		t.Errorf("null records per model: %v", got)
	}
	for _, p := range res.Paired {
		if p.Kind == report.PairedKindModel && (p.Model == report.DistanceNullName || p.OtherModel == report.DistanceNullName) {
			t.Errorf("the null is ranked as a model: %+v", p)
		}
	}
	found := 0
	for _, an := range res.Sensitivity.AboveNull {
		if an.Metric != "auc" || (an.Model != "copy" && an.Model != "twice") {
			continue
		}
		found++
		if an.BaseReading != report.ReadingNotAbove || an.Above != 0 || an.Below != 0 || !strings.Contains(an.Sentence, "is the same as that of "+report.DistanceNullName+" (distance-only null) on their ") || !strings.Contains(an.Sentence, "every test point's placement is the same") {
			t.Errorf("%s: %+v", an.Model, an)
		}
	}
	if found != 2 {
		t.Errorf("above-null summaries for copy and twice: %d", found)
	}
	if !strings.Contains(res.Sensitivity.Headline, "copy scores the same as distance_null on base (every paired AUC difference 0, on ") || !strings.Contains(res.Sensitivity.Headline, "; the gap is 0 on every extent") {
		t.Errorf("headline: %s", res.Sensitivity.Headline)
	}
	for _, f := range []struct{ file, want string }{
		{"report.html", "Model minus null per extent"},
		{"methods.md", "of copy is the same as that of distance_null"},
		{"scores.csv", "copy,base,"},
		{filepath.Join("figures", "model_minus_null.svg"), "<svg"},
	} {
		b, err := os.ReadFile(filepath.Join(out, f.file))
		if err != nil || !strings.Contains(string(b), f.want) {
			t.Errorf("%s: want %q (err %v)", f.file, f.want, err)
		}
	}
	csv, _ := os.ReadFile(filepath.Join(out, "scores.csv"))
	for _, line := range strings.Split(string(csv), "\n") {
		if strings.HasPrefix(line, "copy,") && strings.Contains(line, ",auc_minus_distance_null,") && !strings.Contains(line, ",0,model") {
			t.Errorf("scores.csv: %s", line)
		}
	}
	if !strings.Contains(string(csv), ",auc_minus_distance_null,") {
		t.Error("scores.csv has no auc_minus_distance_null rows")
	}
}
