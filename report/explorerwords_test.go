package report

import (
	"net/url"
	"path/filepath"
	"regexp"
	"testing"

	"areasweep/extent/vocab"
)

// TestExplorerNamesTheReferenceExtent: the extent explorer's sentence
// calls the extent differences are taken from "the reference extent" when
// it stands in for a base extent that could not be scored (it said "On
// region_b50, the base extent (...)"), and counts one test point in the
// singular ("1 test points" was written).
func TestExplorerNamesTheReferenceExtent(t *testing.T) {
	bin := needChromium(t)
	r := loadSample(t)
	for i := range r.Scores {
		if r.Scores[i].Extent == vocab.BaseID {
			r.Scores[i].Scored, r.Scores[i].NotScored = false, "no test points inside this extent"
		}
	}
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	ref, model := r.Sensitivity.BaseExtent, r.Sensitivity.ModelNames[0]
	if ref == vocab.BaseID || ref == "" {
		t.Fatalf("no extent stands in for the base extent: %q", ref)
	}
	for i := range r.Scores {
		if r.Scores[i].Extent == ref && r.Scores[i].Model == model {
			r.Scores[i].TestPoints = 1
		}
	}
	dir := t.TempDir()
	if err := Write(dir, r); err != nil {
		t.Fatal(err)
	}
	page := "file://" + filepath.Join(dir, "report.html") + "#extent=" + url.QueryEscape(ref) + "&model=" + url.QueryEscape(model)
	dom, _ := runChromium(t, bin, chromiumArgs(t.TempDir(), "--virtual-time-budget=5000", "--dump-dom", page))
	sent := regexp.MustCompile(`<p id="teach-sentence">[^<]*`).FindString(string(dom))
	checkWords(t, "explorer's sentence", sent, []string{"On " + ref + ", the reference extent (", " km², 1 test point) "}, []string{"the base extent", "1 test points"})
}
