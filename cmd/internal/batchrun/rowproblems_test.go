package batchrun

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/inputs"
)

// TestRowProblemsAllInOneRound: a row with two settings that run would
// refuse (e 1.5 and fraction 2) was refused for the first only, so the
// user fixed it, ran again and met the second; every problem of a row is
// now listed in one round, each with its column, and a good row beside it
// adds none.
func TestRowProblemsAllInOneRound(t *testing.T) {
	got, err := tableProblems(t, "two_bad.csv", "# iterations: 30\nid,model,occurrences,region,e,fraction,iterations\n"+
		"bad,m=model.tif,occ.csv,region.geojson,1.5,2,\n"+
		"good,m=model.tif,occ.csv,region.geojson,0.1,0.5,\n"+
		"one,m=model.tif,occ.csv,region.geojson,,1.5,\n")
	if want := "bad/e bad/fraction one/fraction"; strings.Join(got, " ") != want {
		t.Errorf("problems %v, want %s", got, want)
	}
	for _, want := range []string{`line 3, study "bad", column "e": --e value 1.5 is outside (0,1)`, `line 3, study "bad", column "fraction": --fraction 2 is outside (0,1]`} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("message lacks %q:\n%v", want, err)
		}
	}
}

// TestRefusedRowProblemsAllInOneRound: a row the table's reading refused
// (iterations "abc", a model without a name) hid its other problems: its
// e 1.5 came to light only once the cells were fixed. They are now listed
// in the same round, and the refused cells and the model are not named a
// second time (no "no model given").
func TestRefusedRowProblemsAllInOneRound(t *testing.T) {
	got, err := tableProblems(t, "refused.csv", "# iterations: 30\nid,model,occurrences,region,e,iterations\n"+
		"cells,m=model.tif,occ.csv,region.geojson,1.5,abc\n"+
		"noname,model.tif,occ.csv,region.geojson,0.1;2,\n"+
		"fine,m=model.tif,occ.csv,region.geojson,,\n")
	if want := "cells/iterations cells/e noname/model noname/e"; strings.Join(got, " ") != want {
		t.Errorf("problems %v, want %s\n%v", got, want, err)
	}
	if msg := err.Error(); strings.Contains(msg, "no model given") || strings.Contains(msg, "m=refused") || strings.Contains(msg, "--region refused") {
		t.Errorf("a refused cell is reported again, or a placeholder shows:\n%v", err)
	}
}

// tableProblems writes body as the study table name beside the small
// study's files, resolves it, and returns its problems as "study/column",
// in order, and the error; it fails the test when the table is not
// refused for its rows.
func tableProblems(t *testing.T, name, body string) ([]string, error) {
	t.Helper()
	s := newSmallStudy(t)
	table := filepath.Join(s.Dir, name)
	if err := os.WriteFile(table, []byte(body), 0o666); err != nil {
		t.Fatal(err)
	}
	return resolveProblems(t, &Options{Table: table, Out: filepath.Join(t.TempDir(), "out")})
}

// resolveProblems resolves o's table and returns its problems as
// "study/column", with the error; the table must have problems.
func resolveProblems(t *testing.T, o *Options) ([]string, error) {
	t.Helper()
	_, err := resolve(o)
	var errs inputs.BatchErrors
	if !errors.As(err, &errs) {
		t.Fatalf("resolve: %v, want the table's problems", err)
	}
	var got []string
	for _, e := range errs {
		got = append(got, e.Study+"/"+e.Column)
	}
	return got, err
}

// TestInputInsideOutRefused: a row whose input lies in the batch's --out
// (another study's outputs, the batch's own folder, a file beside the
// summary, or any of them through a symbolic link to --out) is refused
// before anything runs, with its column. Before, such a study failed as
// "does not exist" when it ran before the study writing the file, and ran
// on a second try: its numbers depended on the order the studies ran in,
// and a rerun of the other study replaced its input.
func TestInputInsideOutRefused(t *testing.T) {
	s := newSmallStudy(t)
	out := filepath.Join(s.Dir, "runs")
	if err := os.MkdirAll(filepath.Join(out, "alpha"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(out, filepath.Join(s.Dir, "link")); err != nil {
		t.Fatal(err)
	}
	table := filepath.Join(s.Dir, "inside.csv")
	// A .prj named by occurrences-crs is an input too (it was not
	// checked): one in a study's folder.
	if err := os.WriteFile(filepath.Join(out, "alpha", "occ.prj"), []byte(`GEOGCS["WGS 84"]`), 0o644); err != nil {
		t.Fatal(err)
	}
	body := "# iterations: 30\nid,model,occurrences,region,extra,occurrences-crs\n" +
		"alpha,m=model.tif,occ.csv,region.geojson,,\n" +
		"other,m=model.tif,occ.csv,runs/alpha/extents.gpkg,,\n" +
		"own,m=runs/.areasweep-batch/m.tif,occ.csv,region.geojson,,\n" +
		"beside,m=model.tif,runs/occ.csv,region.geojson,,\n" +
		"linked,m=model.tif,occ.csv,region.geojson,x=link/alpha/extents.gpkg,\n" +
		"near,m=model.tif,occ.csv,region.geojson,x=runs2/a.gpkg,\n" +
		"crs,m=model.tif,occ.csv,region.geojson,,runs/alpha/occ.prj\n" +
		"code,m=model.tif,occ.csv,region.geojson,,EPSG:4326\n"
	if err := os.WriteFile(table, []byte(body), 0o666); err != nil {
		t.Fatal(err)
	}
	got, err := resolveProblems(t, &Options{Table: table, Out: out})
	if want := "other/region own/model beside/occurrences linked/extra crs/occurrences-crs"; strings.Join(got, " ") != want {
		t.Errorf("problems %v, want %s\n%v", got, want, err)
	}
	for _, want := range []string{
		`line 4, study "other", column "region": ` + filepath.Join(out, "alpha", "extents.gpkg") + " lies in " + filepath.Join(out, "alpha") + ", which this batch writes",
		"copy the file to a folder outside " + out,
	} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("message lacks %q:\n%v", want, err)
		}
	}
}
