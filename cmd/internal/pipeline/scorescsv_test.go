package pipeline

import (
	"bytes"
	"encoding/csv"
	"math"
	"strconv"
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
		rows += 6 + 5*len(sc.PartialROC) + 5*len(sc.Thresholds)
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
