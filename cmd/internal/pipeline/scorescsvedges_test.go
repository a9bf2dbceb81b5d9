package pipeline

import (
	"bytes"
	"encoding/csv"
	"testing"

	"areasweep/report"
)

// TestScoresCSVBootstrapTooFew: where a resample draws fewer test points
// than report.MinPairedPoints the published bootstrap's percentiles and P are
// left out of scores.csv, as from the report (with one test point every
// resample is that point: a P of 0 read as "< 1/B" and an interval of
// zero width; an audit of edge cases). The full-sample ratio and the resamples' mean
// stay.
func TestScoresCSVBootstrapTooFew(t *testing.T) {
	r, err := report.Load("../../../testdata/report/sample_results.json")
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for i := range r.Scores {
		if sc := &r.Scores[i]; sc.Model == "good" && sc.Extent == "base" && len(sc.PartialROC) > 0 {
			sc.TestPoints = 1
			sc.PartialROC[0].Defined, sc.PartialROC[0].NotFormed = true, 0
			for j := range sc.PartialROC {
				sc.PartialROC[j].ResampleSize = 1
			}
			found = true
		}
	}
	if !found {
		t.Fatal("no partial ROC of good on base in the sample")
	}
	recs, err := csv.NewReader(bytes.NewReader(scoresCSV(r))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	got := map[string]bool{}
	for _, rec := range recs[1:] {
		if rec[0] == "good" && rec[1] == "base" {
			got[rec[5]] = true
		}
		if rec[0] == "good" && rec[1] == "region_b50" && rec[5] == "partial_roc_p_value" {
			got["other extent's P"] = true
		}
	}
	for _, m := range []string{"partial_roc_ratio", "partial_roc_ratio_resample_mean", "other extent's P"} {
		if !got[m] {
			t.Errorf("no %s row", m)
		}
	}
	for _, m := range []string{"partial_roc_resample_p2_5", "partial_roc_resample_p97_5", "partial_roc_p_value"} {
		if got[m] {
			t.Errorf("%s row on 1 test point", m)
		}
	}
}

// TestScoresCSVNoNumberWithoutPoints: scores.csv wrote auc_train 0 for an
// extent holding no training point, and auc_se 0 (auc_boot_sd a rounding
// dust of 2e-15, auc_unweighted_se_delong 0) for an extent holding one test
// point (an audit of edge cases: an extra extent around one test point), numbers that
// read as an AUC of 0 and as no uncertainty; results.json holds 0 there by
// its documented convention. The rows are left out, as the report shows a
// dash.
func TestScoresCSVNoNumberWithoutPoints(t *testing.T) {
	r, err := report.Load("../../../testdata/report/sample_results.json")
	if err != nil {
		t.Fatal(err)
	}
	for i := range r.Scores {
		if sc := &r.Scores[i]; sc.Model == "good" && sc.Extent == "base" {
			sc.TestPoints, sc.TrainPoints, sc.AUCTrain, sc.AUCSE, sc.AUCBootSD, sc.AUCUnweightedSEDeLong = 1, 0, 0, 0, 2e-15, 0
		}
	}
	recs, err := csv.NewReader(bytes.NewReader(scoresCSV(r))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	got := map[string]bool{}
	for _, rec := range recs[1:] {
		if rec[0] == "good" && rec[1] == "base" {
			got[rec[5]] = true
		}
		if rec[0] == "good" && rec[1] == "region_b50" {
			got["other extent's "+rec[5]] = true
		}
	}
	for _, m := range []string{"auc", "auc_unweighted", "other extent's auc_train", "other extent's auc_se", "other extent's auc_boot_sd", "other extent's auc_unweighted_se_delong"} {
		if !got[m] {
			t.Errorf("no %s row", m)
		}
	}
	for _, m := range []string{"auc_train", "auc_se", "auc_boot_sd", "auc_unweighted_se_delong"} {
		if got[m] {
			t.Errorf("%s row with 1 test point and no training point", m)
		}
	}
}

// TestScoresCSVNoSDOfOneResample: with --iterations 1 the SD of AUC over
// the paired resamples is the SD of one value, written as 0 (an audit of edge cases);
// the row is left out.
func TestScoresCSVNoSDOfOneResample(t *testing.T) {
	r, err := report.Load("../../../testdata/report/sample_results.json")
	if err != nil {
		t.Fatal(err)
	}
	r.Settings.PairedResamples = 1
	for i := range r.Scores {
		r.Scores[i].AUCBootSD = 0
	}
	recs, err := csv.NewReader(bytes.NewReader(scoresCSV(r))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	se := 0
	for _, rec := range recs[1:] {
		switch rec[5] {
		case "auc_boot_sd":
			t.Fatalf("row %v from one resample", rec)
		case "auc_se":
			se++
		}
	}
	if se == 0 {
		t.Error("no auc_se rows either")
	}
}
