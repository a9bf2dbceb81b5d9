package report

import (
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"areasweep/extent/vocab"
)

// withNull returns the sample run with a copy of its first model's scores
// added as the distance-only null, and a sorting bias on every usable
// extent.
func withNull(t *testing.T) *Results {
	t.Helper()
	r := loadSample(t)
	first := r.Models[0].Name
	r.Models = append(r.Models, Model{Name: DistanceNullName, Role: RoleNull, NullKind: NullDistance})
	var add []Score
	for _, sc := range r.Scores {
		if sc.Model == first {
			sc.Model = DistanceNullName
			sc.AUC = 0.999 // above every model, so a ranking that saw it would change
			add = append(add, sc)
		}
	}
	r.Scores = append(r.Scores, add...)
	for i := range r.Extents {
		if r.Extents[i].Status == vocab.StatusOK {
			r.Extents[i].SortingBias = &SortingBias{Defined: true, TestPoints: 3, TestMeanKm: 10, BackgroundMeanKm: 40, RatioMean: 0.25, RatioMedian: 0.3}
		}
	}
	return r
}

// TestNullsLeftOutOfAnalysis checks that a null changes nothing in the
// sensitivity analysis (spreads, decomposition, verdicts, headline are
// identical to the run without it) while it is labelled in the report
// page, drawn in the metrics figure (legend) and the ROC figure (own
// panel), and described in methods.md
// with its AUC range and the sorting bias.
func TestNullsLeftOutOfAnalysis(t *testing.T) {
	plain := analyzedSample(t)
	r := withNull(t)
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(plain.Sensitivity, r.Sensitivity) {
		t.Error("adding a null changed the sensitivity analysis")
	}
	dir, page := writtenPage(t, r)
	for _, want := range []string{DistanceNullName + " (distance-only null)", "Spatial sorting bias", "tbl-sorting-bias"} {
		if !strings.Contains(page, want) {
			t.Errorf("report.html lacks %q", want)
		}
	}
	for _, name := range []string{"metrics_vs_area", "roc_curves"} {
		fig, err := os.ReadFile(filepath.Join(dir, "figures", name+".svg"))
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(string(fig), "distance-only null") {
			t.Errorf("figure %s does not name the distance-only null", name)
		}
	}
	methods, err := os.ReadFile(filepath.Join(dir, "methods.md"))
	if err != nil {
		t.Fatal(err)
	}
	// The sample's sorting-bias ratio is 0.250 on every extent: "was
	// 0.250 on all ... extents", not "ranged 0.250–0.250" (rangeOver).
	for _, want := range []string{"A distance-only null", "0.999", "spatial sorting bias", "was 0.250 on all", "Hijmans, R.J. (2012)"} {
		if !strings.Contains(string(methods), want) {
			t.Errorf("methods.md lacks %q", want)
		}
	}
}

// TestMethodsNamesTheNullsHistogramFloor: the methods text says how the
// distance-only null's Boyce histogram differs from a model's (its bins
// have a floor), and says it only when the run scored that null.
func TestMethodsNamesTheNullsHistogramFloor(t *testing.T) {
	const floor = "for the distance-only null the bins are never narrower"
	without, with := loadSample(t), withNull(t)
	for _, r := range []*Results{without, with} {
		if err := Analyze(r); err != nil {
			t.Fatal(err)
		}
	}
	if got := methodsText(without); strings.Contains(got, floor) {
		t.Errorf("methods text of a run without the distance-only null speaks of its bins")
	}
	if got := methodsText(with); !strings.Contains(got, floor) {
		t.Errorf("methods text of a run with the distance-only null lacks %q", floor)
	}
}

// TestExplorerListsNulls checks that the page's model-and-extent explorer
// offers the null after the models, under its label, with its own curves:
// issue 11 asks for the null in the ROC panel, and the explorer is the
// page's ROC panel.
func TestExplorerListsNulls(t *testing.T) {
	r := withNull(t)
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	pl := explorerPayload(t, r)
	want := append(append([]string{}, r.Sensitivity.ModelNames...), DistanceNullName)
	if !reflect.DeepEqual(pl.Models, want) {
		t.Fatalf("explorer lists %q, want the models then the null: %q", pl.Models, want)
	}
	if got := pl.Labels[len(pl.Labels)-1]; got != DistanceNullName+" (distance-only null)" {
		t.Errorf("null labelled %q", got)
	}
	for i, m := range r.Sensitivity.ModelNames {
		if pl.Labels[i] != m {
			t.Errorf("model %q labelled %q", m, pl.Labels[i])
		}
	}
	scored := 0
	for _, c := range pl.Cells {
		if c.Model == DistanceNullName && c.Scored {
			scored++
			if c.AUC != 0.999 {
				t.Errorf("null on %s: AUC %v, want its own score 0.999", c.Extent, c.AUC)
			}
		}
	}
	if scored == 0 {
		t.Error("the null has no scored cell in the explorer")
	}
}

// explorerPayload is the explorer's data for r (teachData), decoded.
func explorerPayload(t *testing.T, r *Results) teachPayload {
	t.Helper()
	b, err := teachData(r)
	if err != nil {
		t.Fatal(err)
	}
	var pl teachPayload
	if err := json.Unmarshal(b, &pl); err != nil {
		t.Fatal(err)
	}
	return pl
}
