package report

import (
	"strings"
	"testing"
)

// TestPartialROCCrossingCutOff: a partial ROC ratio's difference between
// two models (or a model and a null) is judged only when E n, the test
// points expected beyond its 1 - E crossing, reaches MinCrossingPoints
// (metrics.TestPairedIntervalCoverage: at E = 0.01 the intervals between
// models covered 0.833 on 30 points, 0.931 on 150). Between extents the
// ratio is described whatever the points, on MinResampledPoints.
func TestPartialROCCrossingCutOff(t *testing.T) {
	// The cut-offs: 1.5 / E rounded up, never below MinResampledPoints
	// (worked by hand: 1.5 / 0.01 = 150, 1.5 / 0.025 = 60, 1.5 / 0.03 = 50).
	for _, c := range []struct {
		e    float64
		want int
	}{{0.05, 30}, {0.1, 30}, {0.2, 30}, {0.5, 30}, {0.04, 38}, {0.03, 50}, {0.025, 60}, {0.01, 150}, {0.001, 1500}, {1e-300, 1 << 53}, {5e-324, 1 << 53}} {
		if got := partialROCMinPoints(c.e); got != c.want {
			t.Errorf("partialROCMinPoints(%g) = %d, want %d", c.e, got, c.want)
		}
	}
	for _, c := range []struct {
		name   string
		kind   PairKind
		method string
		metric string
		common int
		want   string // notJudgedKind
		reason string // the end of NotJudgedReason, when not judged
	}{
		{"E 0.01 models on 149 points", PairedKindModel, "paired_resamples", MetricKeyPartialROC(0.01), 149, positionTooFew, "too few common test points: 149, our cut-off 150"},
		{"E 0.01 models on 150 points", PairedKindModel, "paired_resamples", MetricKeyPartialROC(0.01), 150, "", ""},
		{"E 0.01 model and null on 100 points", PairedKindNull, "paired_resamples", MetricKeyPartialROC(0.01), 100, positionTooFew, "our cut-off 150"},
		{"E 0.025 models on 59 points", PairedKindModel, "paired_resamples", MetricKeyPartialROC(0.025), 59, positionTooFew, "our cut-off 60"},
		{"E 0.05 models on 30 points", PairedKindModel, "paired_resamples", MetricKeyPartialROC(0.05), 30, "", ""},
		{"E 0.05 models on 29 points", PairedKindModel, "paired_resamples", MetricKeyPartialROC(0.05), 29, positionTooFew, "our cut-off 30"},
		{"E 0.01 extents on 100 points", PairedKindExtent, "point_difference", MetricKeyPartialROC(0.01), 100, positionNotCalibrated, "9% to 84% in our simulation check"},
		{"E 0.01 extents on 29 points", PairedKindExtent, "point_difference", MetricKeyPartialROC(0.01), 29, positionTooFew, "our cut-off 30"},
		{"omission models on 30 points", PairedKindModel, "paired_resamples", "omission_mtp", 30, "", ""},
	} {
		p := Paired{Kind: c.kind, Method: c.method, Metric: c.metric, Defined: true, CommonPoints: c.common, Resamples: 1000}
		if got := p.notJudgedKind(); got != c.want {
			t.Errorf("%s: %q, want %q", c.name, got, c.want)
		}
		if r := p.NotJudgedReason(); !strings.HasSuffix(r, c.reason) || (c.reason == "") != (r == "") {
			t.Errorf("%s: reason %q, want it to end %q", c.name, r, c.reason)
		}
	}
	// The methods text names the larger cut-offs of the run's E, and
	// only those.
	for _, c := range []struct {
		es   []float64
		want string
	}{
		{[]float64{0.05, 0.1}, ""},
		{[]float64{0.01, 0.05}, ", and for the partial ROC ratio between two models 150 at E = 0.01, so that at least 1.5 test records are expected beyond its 1 − E crossing"},
		{[]float64{0.025, 0.01}, ", and for the partial ROC ratio between two models 60 at E = 0.025 and 150 at E = 0.01, so that at least 1.5 test records are expected beyond its 1 − E crossing"},
	} {
		if got := crossingNote(Settings{E: c.es}); got != c.want {
			t.Errorf("crossingNote(%v) = %q, want %q", c.es, got, c.want)
		}
	}
}
