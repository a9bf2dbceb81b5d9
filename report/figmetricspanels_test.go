package report

import (
	"fmt"
	"strings"
	"testing"
	"time"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"areasweep/metrics"
)

// TestMetricsFigureManyThresholds: metrics_vs_area drew one panel per
// metric in rows squeezed into the 230 mm page, so 300 --thresholds (the
// run allows 1000) made 100 rows of negative height, whose lines the
// rasterizer drew millions of points long: the run's report had not
// finished after 10 minutes. The figure now keeps the panels that fit
// rows of at least minMetricRow, leaving out the fixed thresholds' omission
// panels first, and its caption names those it leaves out.
func TestMetricsFigureManyThresholds(t *testing.T) {
	r := loadSample(t)
	const n = 300
	var fixed []float64
	for k := 1; k <= n; k++ {
		fixed = append(fixed, float64(k)/1000)
	}
	r.Settings.FixedThresholds = fixed
	for i := range r.Scores {
		sc := &r.Scores[i]
		if !sc.Scored || len(sc.Thresholds) == 0 {
			continue
		}
		// Each fixed threshold as a copy of the score's first one (the
		// figure draws its omission rate against the extent's area).
		for _, v := range fixed {
			th := sc.Thresholds[0]
			th.Name, th.Value = metrics.ThresholdFixed, v
			sc.Thresholds = append(sc.Thresholds, th)
		}
	}
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	all, _ := metricPanels(r)
	l := layoutMetrics(r)
	if len(all) < n {
		t.Fatalf("the test needs %d or more panels, has %d", n, len(all))
	}
	rows := (len(l.panels) + 2) / 3
	if h := l.legendH + vg.Length(rows)*minMetricRow; h > maxHeight {
		t.Errorf("%d panels in %d rows need %.0f mm, more than the page's %.0f", len(l.panels), rows, h/vg.Millimeter, maxHeight/vg.Millimeter)
	}
	if len(l.panels)+len(l.left) != len(all) || len(l.left) == 0 {
		t.Fatalf("%d panels kept and %d left out of %d", len(l.panels), len(l.left), len(all))
	}
	for _, pn := range l.left {
		if pn.m.Kind != MetricOmission || pn.m.Threshold != metrics.ThresholdFixed {
			t.Errorf("left out %s before the fixed thresholds' panels", pn.m.Label)
		}
	}
	kept := map[string]bool{}
	for _, pn := range l.panels {
		kept[pn.m.Key] = true
	}
	for _, key := range []string{"auc", "boyce", "area_fraction_mtp", "omission_p10_training_presence"} {
		if !kept[key] {
			t.Errorf("panel %s left out", key)
		}
	}
	want := fmt.Sprintf("No room on the page for %d more panels (omission at %d fixed thresholds from", len(l.left), len(l.left))
	if c := metricsCaption(r); !strings.Contains(c, want) || !strings.Contains(c, "to 0.3)") {
		t.Errorf("caption does not name the panels left out: %s", c)
	}
	// Drawn in a few seconds (it did not finish).
	f := metricsFigure(r)
	done := make(chan error, 1)
	go func() { done <- f.draw(draw.New(newPNGCanvas(f.W, f.H))) }()
	select {
	case err := <-done:
		if err != nil {
			t.Fatal(err)
		}
	case <-time.After(2 * time.Minute):
		t.Fatal("metrics_vs_area with 300 fixed thresholds not drawn in 2 minutes")
	}
}
