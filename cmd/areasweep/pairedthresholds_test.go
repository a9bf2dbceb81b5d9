package main

import (
	"math"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/report"
)

// TestModelsWithDifferentThresholds compares two models whose threshold
// lists differ: the second has no data on every training point's cell, so
// it has no training-presence thresholds (minimum and 10th percentile
// training presence) while the first has both; both have the fixed
// threshold 0.5. Found by a randomized run of small studies: the paired
// comparison of the two models on one extent stopped the run with an
// internal error (exit 1). The run must finish, compare the models on
// every score both have (AUC, partial ROC, Boyce, omission at the fixed
// threshold), leave out the omission rates only one of them has, and
// compare each model with itself across extents on its own thresholds.
func TestModelsWithDifferentThresholds(t *testing.T) {
	s := newSmallStudy(t)
	// The second model: no data on the cells of the training points.
	holes := append([]float64(nil), s.vals...)
	for i := 0; i < 6; i++ {
		for j := 0; j < 4; j++ {
			lon, lat := 13.1+float64(i)*0.8, 42.6+float64(j)*0.9
			c := int(math.Floor((lon - s.gt[0]) / s.gt[1]))
			r := int(math.Floor((lat - s.gt[3]) / s.gt[5]))
			holes[r*s.w+c] = math.NaN()
		}
	}
	holed := filepath.Join(s.dir, "holed.tif")
	writeRaster(t, holed, s.w, s.h, s.gt, holes, true)

	out := filepath.Join(t.TempDir(), "out")
	smallRunScores(t, out, "--model", "m="+s.model, "--model", "holed="+holed,
		"--occurrences", s.occ, "--region", s.region, "--thresholds", "0.5")
	res := loadResults(t, out)

	thresholds := map[string][]string{}
	for _, sc := range res.Scores {
		if !sc.Scored {
			continue
		}
		var keys []string
		for _, th := range sc.Thresholds {
			keys = append(keys, report.MetricKeyOmission(th.Name, th.Value))
		}
		thresholds[sc.Model] = keys
	}
	if got := strings.Join(thresholds["m"], " "); got != "omission_minimum_training_presence omission_p10_training_presence omission_fixed_0.5" {
		t.Fatalf("model m's thresholds: %s", got)
	}
	if got := strings.Join(thresholds["holed"], " "); got != "omission_fixed_0.5" {
		t.Fatalf("model holed's thresholds: %s (the test needs it to have only the fixed one)", got)
	}

	between := map[string]bool{}           // metrics compared between the two models
	within := map[string]map[string]bool{} // per model, metrics compared across extents
	for _, p := range res.Paired {
		switch p.Kind {
		case report.PairedKindModel:
			between[p.Metric] = true
		case report.PairedKindExtent:
			if within[p.Model] == nil {
				within[p.Model] = map[string]bool{}
			}
			within[p.Model][p.Metric] = true
		}
	}
	for _, m := range []string{"auc", "partial_roc_e0.05", "boyce", "omission_fixed_0.5"} {
		if !between[m] {
			t.Errorf("no paired comparison of the two models on %s", m)
		}
	}
	for _, m := range []string{"omission_minimum_training_presence", "omission_p10_training_presence"} {
		if between[m] {
			t.Errorf("the models are compared on %s, which only one of them has", m)
		}
		if !within["m"][m] {
			t.Errorf("model m is not compared across extents on %s", m)
		}
		if within["holed"][m] {
			t.Errorf("model holed is compared across extents on %s, which it does not have", m)
		}
	}
	if !within["holed"]["omission_fixed_0.5"] {
		t.Error("model holed is not compared across extents on its fixed threshold")
	}
}
