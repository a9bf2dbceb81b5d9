package report

import (
	"slices"
	"strings"
	"testing"

	"areasweep/metrics"
)

// TestBootstrapTooFewPoints: the published half-size bootstrap of the
// partial ROC ratio gave, on an extent of one test point, an interval of
// zero width and a P printed "< 0.005" (every resample is that point: an
// audit of edge cases), a test the data cannot support; so did a
// resample fraction of 1e-12 on any number of points (each resample one
// point). Where a resample draws fewer than MinPairedPoints test points
// (or fewer than MinPercentileResamples resamples formed) the report gives
// the full-sample ratio and the resamples' mean, without percentiles or P.
func TestBootstrapTooFewPoints(t *testing.T) {
	cases := []struct {
		size, iterations, notFormed int
		want                        bool
	}{
		{1, 200, 0, false},
		{3, 200, 0, false},
		{MinPairedPoints - 1, 200, 0, false},
		{MinPairedPoints, 200, 0, true},
		{45, 1, 0, false},
		{45, 2, 0, false},
		{45, MinPercentileResamples - 1, 0, false},
		{45, MinPercentileResamples, 0, true},
		{45, 200, 200 - MinPercentileResamples + 1, false},
		{45, 200, 200 - MinPercentileResamples, true},
		{45, 200, 199, false},
	}
	for _, c := range cases {
		pr := PartialROC{Iterations: c.iterations, NotFormed: c.notFormed, ResampleSize: c.size}
		if got := BootstrapReadable(pr); got != c.want {
			t.Errorf("%d points per resample, %d of %d formed: readable %v, want %v", c.size, c.iterations-c.notFormed, c.iterations, got, c.want)
		}
	}
	// The fewest test points an extent needs at a fraction: by a scan of
	// metrics.ResampleSize (max(1, round(f n))) here, against
	// minBootstrapPoints's arithmetic.
	for _, f := range []float64{1, 0.9, 0.75, 0.5, 0.3, 0.25, 0.1, 0.05, 0.01} {
		n := 1
		for metrics.ResampleSize(f, n) < MinPairedPoints {
			n++
		}
		if got := minBootstrapPoints(f); got != n {
			t.Errorf("fraction %v: minBootstrapPoints %d, scan %d", f, got, n)
		}
	}
	if got := minBootstrapPoints(0.5); got != 19 {
		t.Errorf("fraction 0.5: %d, want 19 (round(9.5) = 10, round(9) = 9)", got)
	}
	if got := minBootstrapPoints(1e-12); got < 9e12 {
		t.Errorf("fraction 1e-12: %d", got)
	}

	r := loadSample(t)
	var sc *Score
	for i := range r.Scores {
		if s := &r.Scores[i]; s.Model == "good" && s.Extent == "base" {
			sc = s
		}
	}
	if sc == nil || len(sc.PartialROC) == 0 {
		t.Fatal("no partial ROC of good on base in the sample")
	}
	sc.TestPoints = 1
	for k := range sc.PartialROC {
		sc.PartialROC[k].ResampleSize = 1
	}
	pr := &sc.PartialROC[0]
	pr.Defined, pr.Ratio, pr.RatioMean, pr.CILow, pr.CIHigh, pr.PValue, pr.NotFormed = true, 1.884, 1.884, 1.884, 1.884, 0, 0
	analyzed(t, r)
	v := scoresSection(r)
	var row []cell
	for _, rw := range v.PartialROC.Rows {
		if rw[0].text == "good" && rw[1].text == "base" {
			row = rw
			break
		}
	}
	if row == nil {
		t.Fatal("no partial ROC row of good on base")
	}
	if got := row[5].text + " | " + row[6].text; got != "– | –" {
		t.Errorf("interval and P on 1 test point: %s", got)
	}
	if row[3].text != "1.884" || row[4].text != "1.884" {
		t.Errorf("ratio and mean: %s, %s", row[3].text, row[4].text)
	}
	checkWords(t, "table caption", v.TooFewNote, []string{"Where a resample draws fewer than 10 test records (an extent with fewer than 19 at 50%) (our cut-off, as for the AUC's paired differences)"}, nil)
	td, err := teachData(r)
	if err != nil {
		t.Fatal(err)
	}
	if n := strings.Count(string(td), `"partial_roc_no_interval":true`); n != 1 {
		t.Errorf("explorer: %d cells without the interval, want 1 (good on base)", n)
	}
	if strings.Contains(methodsText(analyzedSample(t)), "neither is given") || scoresSection(analyzedSample(t)).TooFewNote != "" {
		t.Error("the note is given although every extent holds enough test points")
	}
	checkWords(t, "methods", methodsText(r), []string{"neither is given where a resample draws fewer than 10 test records (an extent with fewer than 19 at 50%), our cut-off"}, nil)
	checkWords(t, "caption", metricsCaption(r), []string{"(no bar where a resample draws fewer than 10 test records (an extent with fewer than 19 at 50%), our cut-off)"}, nil)
	for _, sp := range r.Sensitivity.Spreads {
		if sp.Metric != MetricKeyPartialROC(pr.E) || sp.Model != "good" {
			continue
		}
		for i, e := range sp.Extents {
			if e == "base" && (sp.BootSD[i] != 0 || sp.BootLow[i] != 1.884 || sp.BootHigh[i] != 1.884) {
				t.Errorf("spread of good on base: SD %g, %g to %g", sp.BootSD[i], sp.BootLow[i], sp.BootHigh[i])
			}
		}
	}
}

// TestScoresTableNoTrainingAUC: the Scores table showed "0.000" as the AUC
// on the training records of an extent holding none (an audit of edge cases: an extra
// extent around one test point); results.json holds 0 there by
// convention, the table a dash.
func TestScoresTableNoTrainingAUC(t *testing.T) {
	r := analyzedSample(t)
	for i := range r.Scores {
		if sc := &r.Scores[i]; sc.Model == "good" && sc.Extent == "base" {
			sc.TrainPoints, sc.AUCTrain = 0, 0
		}
	}
	v := scoresSection(r)
	col := slices.Index(v.Main.Head, "AUC on the training records")
	if col < 0 {
		t.Fatalf("no training AUC column in %v", v.Main.Head)
	}
	for _, row := range v.Main.Rows {
		if row[0].text == "good" && row[1].text == "base" && row[col].text != "–" {
			t.Errorf("AUC on no training records: %q", row[col].text)
		}
		if row[0].text == "good" && row[1].text == "region_b50" && row[col].text == "–" {
			t.Error("dash on an extent with training records")
		}
	}
}

// TestPartialROCTableE: the Partial ROC table printed E with two decimals,
// so --e 0.001 read "0.00" and --e 0.999 "1.00", values E cannot take
// (an audit of edge cases); E is printed as given.
func TestPartialROCTableE(t *testing.T) {
	r := analyzedSample(t)
	for i := range r.Scores {
		for j := range r.Scores[i].PartialROC {
			r.Scores[i].PartialROC[j].E = []float64{0.001, 0.999}[(i+j)%2]
		}
	}
	seen := map[string]bool{}
	for _, row := range scoresSection(r).PartialROC.Rows {
		seen[row[2].text] = true
	}
	if !seen["0.001"] || !seen["0.999"] || seen["0.00"] || seen["1.00"] {
		t.Errorf("E printed as %v", seen)
	}
}

// TestScoresTableNoSDOfOneResample: with --iterations 1 the Scores table
// showed "0.0000" as the AUC resample SD, the SD of one value (an audit of edge
// cases); it shows a dash.
func TestScoresTableNoSDOfOneResample(t *testing.T) {
	r := analyzedSample(t)
	r.Settings.PairedResamples = 1
	v := scoresSection(r)
	col := slices.Index(v.Main.Head, "AUC resample SD")
	if col < 0 {
		t.Fatalf("no resample SD column in %v", v.Main.Head)
	}
	for _, row := range v.Main.Rows {
		if row[5].text == "yes" && row[col].text != "–" {
			t.Errorf("%s on %s: resample SD %q from one resample", row[0].text, row[1].text, row[col].text)
		}
	}
	td, err := teachData(r)
	if err != nil {
		t.Fatal(err)
	}
	if n, m := strings.Count(string(td), `"auc_sd_none":true`), strings.Count(string(td), `"scored":true`); n == 0 || n != m {
		t.Errorf("explorer still gives an SD from one resample")
	}
}
