package pipeline

import (
	"bytes"
	"encoding/csv"
	"math"
	"strconv"
	"strings"
	"testing"

	"areasweep/report"
)

// TestScoresCSV checks the tidy scores table on the report package's
// synthetic run (testdata/report, made with numpy/SciPy): the header, one
// row per scored value, the test-point count of each row, and that the
// threshold-test rows agree with each other (missed = n - successes,
// share missed = missed / n).
func TestScoresCSV(t *testing.T) {
	r, err := report.Load("../../../testdata/report/sample_results.json")
	if err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(bytes.NewReader(scoresCSV(r))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"model", "extent", "extent_kind", "extent_area_km2", "test_points", "metric", "e", "rule", "value", "role"}
	if len(recs) == 0 || len(recs[0]) != len(want) {
		t.Fatalf("header %v, want %v", recs[0], want)
	}
	for i, h := range want {
		if recs[0][i] != h {
			t.Fatalf("header %v, want %v", recs[0], want)
		}
	}
	type key struct{ model, extent, metric, e, rule string }
	got := map[key]float64{}
	for _, rec := range recs[1:] {
		v, err := strconv.ParseFloat(rec[8], 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			t.Errorf("row %v: value %q", rec, rec[8])
		}
		got[key{rec[0], rec[1], rec[5], rec[6], rec[7]}] = v
		for _, sc := range r.Scores {
			if sc.Model == rec[0] && sc.Extent == rec[1] && rec[4] != strconv.Itoa(sc.TestPoints) {
				t.Errorf("row %v: test_points %s, want %d", rec, rec[4], sc.TestPoints)
			}
		}
	}
	rows := 0
	for _, sc := range r.Scores {
		if !sc.Scored {
			continue
		}
		rows += 2 + 5*len(sc.Thresholds) // auc, auc_unweighted; five per rule
		if sc.TrainPoints > 0 {
			rows++ // auc_train
		}
		if sc.TestPoints >= 2 {
			rows += 3 // auc_boot_sd, auc_se, auc_unweighted_se_delong
		}
		for _, pr := range sc.PartialROC {
			rows++ // the ratio, or partial_roc_undefined
			if pr.Iterations > pr.NotFormed {
				rows++ // the resamples' mean
				if report.BootstrapReadable(pr) {
					rows += 3 // their percentiles and P
				}
			}
		}
		if sc.Boyce != nil {
			rows++
		}
		for _, th := range sc.Thresholds {
			rule := string(th.Name)
			if rule == "fixed" {
				rule = "fixed_" + ftoa(th.Value)
			}
			k := func(m string) key { return key{sc.Model, sc.Extent, m, "", rule} }
			missed := got[k("test_points_missed")]
			if missed != float64(th.N-th.Successes) {
				t.Errorf("%s on %s, %s: missed %v, want %d", sc.Model, sc.Extent, rule, missed, th.N-th.Successes)
			}
			if th.N > 0 && math.Abs(got[k("share_missed")]-missed/float64(th.N)) > 1e-12 {
				t.Errorf("%s on %s, %s: share missed %v, want %v/%d", sc.Model, sc.Extent, rule, got[k("share_missed")], missed, th.N)
			}
			if got[k("binomial_p_one_sided")] != th.PBinomial || got[k("extent_share_at_or_above_cut")] != th.AreaFraction {
				t.Errorf("%s on %s, %s: binomial row disagrees with results", sc.Model, sc.Extent, rule)
			}
		}
	}
	if len(recs)-1 != rows {
		t.Errorf("%d rows, want %d", len(recs)-1, rows)
	}
}

// TestScoresCSVUnformedResamples checks the partial ROC rows of
// scores.csv against the resamples formed: when none of the published
// bootstrap's resamples formed a ratio (the demo's coarse model, whose
// 1 - E crossing falls among tied test points in every resample), the
// resamples' mean, percentiles and P do not exist, and the table leaves
// their rows out rather than write 0 (a P of 0 reads as "< 1/B"); with
// fewer than report.MinPercentileResamples formed only the mean is
// written (the percentiles and P of so few resamples are no interval or
// test: report.BootstrapReadable), with that many or more the four rows.
// The values are the fields' own, copied.
func TestScoresCSVUnformedResamples(t *testing.T) {
	for _, c := range []struct {
		name      string
		pr        report.PartialROC
		wantRows  []string
		wantValue map[string]float64
	}{
		{"undefined, none formed", report.PartialROC{E: 0.05, Iterations: 500, NotFormed: 500, ResampleSize: 10},
			[]string{"partial_roc_undefined"}, map[string]float64{"partial_roc_undefined": 1}},
		{"undefined, one formed", report.PartialROC{E: 0.05, RatioMean: 1.2, CILow: 1.2, CIHigh: 1.2, PValue: 0, Iterations: 500, NotFormed: 499, ResampleSize: 10},
			[]string{"partial_roc_undefined", "partial_roc_ratio_resample_mean"},
			map[string]float64{"partial_roc_undefined": 1, "partial_roc_ratio_resample_mean": 1.2}},
		{"undefined, too few formed", report.PartialROC{E: 0.05, RatioMean: 1.2, CILow: 1.1, CIHigh: 1.4, PValue: 0.02, Iterations: 500, NotFormed: 500 - report.MinPercentileResamples + 1, ResampleSize: 10},
			[]string{"partial_roc_undefined", "partial_roc_ratio_resample_mean"},
			map[string]float64{"partial_roc_undefined": 1, "partial_roc_ratio_resample_mean": 1.2}},
		{"undefined, some formed", report.PartialROC{E: 0.05, RatioMean: 1.2, CILow: 1.1, CIHigh: 1.4, PValue: 0.02, Iterations: 500, NotFormed: 500 - report.MinPercentileResamples, ResampleSize: 10},
			[]string{"partial_roc_undefined", "partial_roc_ratio_resample_mean", "partial_roc_resample_p2_5", "partial_roc_resample_p97_5", "partial_roc_p_value"},
			map[string]float64{"partial_roc_undefined": 1, "partial_roc_ratio_resample_mean": 1.2, "partial_roc_resample_p2_5": 1.1, "partial_roc_resample_p97_5": 1.4, "partial_roc_p_value": 0.02}},
		{"defined, all formed, P 0", report.PartialROC{E: 0.05, Defined: true, Ratio: 1.3, RatioMean: 1.25, CILow: 1.1, CIHigh: 1.5, PValue: 0, Iterations: 500, ResampleSize: 10},
			[]string{"partial_roc_ratio", "partial_roc_ratio_resample_mean", "partial_roc_resample_p2_5", "partial_roc_resample_p97_5", "partial_roc_p_value"},
			map[string]float64{"partial_roc_ratio": 1.3, "partial_roc_ratio_resample_mean": 1.25, "partial_roc_resample_p2_5": 1.1, "partial_roc_resample_p97_5": 1.5, "partial_roc_p_value": 0}},
		// Every resample formed, but of 9 points (a small --fraction):
		// no percentiles or P either.
		{"defined, all formed, 9 points a resample", report.PartialROC{E: 0.05, Defined: true, Ratio: 1.3, RatioMean: 1.25, CILow: 1.1, CIHigh: 1.5, PValue: 0, Iterations: 500, ResampleSize: 9},
			[]string{"partial_roc_ratio", "partial_roc_ratio_resample_mean"},
			map[string]float64{"partial_roc_ratio": 1.3, "partial_roc_ratio_resample_mean": 1.25}},
	} {
		t.Run(c.name, func(t *testing.T) {
			r := &report.Results{
				Models:  []report.Model{{Name: "m", Role: report.RoleModel}},
				Extents: []report.Extent{{ID: "base", Kind: "base", AreaKm2: 100}},
				Scores:  []report.Score{{Model: "m", Extent: "base", Scored: true, TestPoints: 20, PartialROC: []report.PartialROC{c.pr}}},
			}
			recs, err := csv.NewReader(bytes.NewReader(scoresCSV(r))).ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			var got []string
			for _, rec := range recs[1:] {
				if rec[6] == "" {
					continue // not a partial ROC row
				}
				got = append(got, rec[5])
				v, err := strconv.ParseFloat(rec[8], 64)
				if err != nil || v != c.wantValue[rec[5]] {
					t.Errorf("%s: value %q, want %v", rec[5], rec[8], c.wantValue[rec[5]])
				}
			}
			if strings.Join(got, ",") != strings.Join(c.wantRows, ",") {
				t.Errorf("partial ROC rows %v, want %v", got, c.wantRows)
			}
		})
	}
}
