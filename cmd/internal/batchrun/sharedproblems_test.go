package batchrun

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestSharedSettingProblemOnce: a bad value in the shared settings ("# e:
// 1.5" on line 2) was reported once per row, each naming the row's line
// and a column "e" the table did not have (three lines pointing at lines
// 5 to 7 for one value on line 2; found by the batch audit of
// 2026-12-05). It is now one problem at the shared line, naming the key
// and the studies it concerns; a row that gives its own value is left
// out of them, and its own bad value stays on its line.
func TestSharedSettingProblemOnce(t *testing.T) {
	got, err := tableProblems(t, "shared_e.csv", "# iterations: 30\n# e: 1.5\nid,model,occurrences,region,e\n"+
		"a,m=model.tif,occ.csv,region.geojson,\n"+
		"b,m=model.tif,occ.csv,region.geojson,0.05\n"+
		"c,m=model.tif,occ.csv,region.geojson,\n"+
		"d,m=model.tif,occ.csv,region.geojson,2\n")
	if want := "/e d/e"; strings.Join(got, " ") != want {
		t.Errorf("problems %v, want %s\n%v", got, want, err)
	}
	for _, want := range []string{
		`shared_e.csv line 2 (shared settings), key "e", for studies a and c: --e value 1.5 is outside (0,1)`,
		`line 7, study "d", column "e": --e value 2 is outside (0,1)`,
	} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("message lacks %q:\n%v", want, err)
		}
	}
}

// TestSharedInputMissingNamesItsLine: an input file named in the shared
// settings that does not exist failed every study with the study's own
// line and a column the table did not have; it names the shared line and
// key.
func TestSharedInputMissingNamesItsLine(t *testing.T) {
	s := newSmallStudy(t)
	table := filepath.Join(s.Dir, "shared_missing.csv")
	writeFile(t, table, "# iterations: 30\n# ecoregions: gone.gpkg\n# ecoregion-field: unit\nid,model,occurrences,region\n"+
		"a,m=model.tif,occ.csv,region.geojson\n")
	studies, err := resolve(&Options{Table: table, Out: filepath.Join(t.TempDir(), "out")})
	if err != nil {
		t.Fatal(err)
	}
	want := `shared_missing.csv line 2 (shared settings), key "ecoregions", for study a: ` + filepath.Join(s.Dir, "gone.gpkg") + " does not exist"
	if studies[0].missing == nil || !strings.Contains(studies[0].missing.Error(), want) {
		t.Errorf("missing input: %v, want %q", studies[0].missing, want)
	}
}

// writeFile writes body to path or fails t.
func writeFile(t *testing.T, path, body string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(body), 0o666); err != nil {
		t.Fatal(err)
	}
}
