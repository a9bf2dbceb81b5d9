package fault

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"testing"
)

// TestClasses: nil stays nil, the class survives further wrapping, the
// cause stays reachable, an input error is not wrapped twice, and the two
// classes do not mix.
func TestClasses(t *testing.T) {
	if BadInput(nil) != nil || Internal(nil) != nil {
		t.Fatal("nil must stay nil")
	}
	in := fmt.Errorf("context: %w", BadInput(fs.ErrNotExist))
	if !IsBadInput(in) || IsInternal(in) || !errors.Is(in, fs.ErrNotExist) {
		t.Errorf("input error: bad %v internal %v is-not-exist %v", IsBadInput(in), IsInternal(in), errors.Is(in, fs.ErrNotExist))
	}
	if again := BadInput(in); again != in {
		t.Errorf("an input error was wrapped again: %#v", again)
	}
	bug := Internal(errors.New("broken contract"))
	if !IsInternal(bug) || IsBadInput(bug) || bug.Error() != "broken contract" {
		t.Errorf("internal error: %v %v %q", IsInternal(bug), IsBadInput(bug), bug.Error())
	}
	if IsBadInput(errors.New("disk full")) || IsInternal(errors.New("disk full")) {
		t.Error("an unclassified error has a class")
	}
}

// TestUserText: package names go, names of files, flags, models and
// studies stay, and a bug's message is kept whole.
func TestUserText(t *testing.T) {
	tests := []struct {
		err  error
		want string
	}{
		{BadInput(errors.New("region: extent: /d/line.geojson feature 1 is a linestring")), "region: /d/line.geojson feature 1 is a linestring"},
		{BadInput(errors.New("inputs: /d/occ.csv line 1: header has no role column")), "/d/occ.csv line 1: header has no role column"},
		{errors.New("model m: pass: /d/m.tif: the block at column 0 row 0 cannot be read"), "model m: /d/m.tif: the block at column 0 row 0 cannot be read"},
		{BadInput(errors.New("batch: inputs: extent: nested")), "nested"},
		{BadInput(errors.New("model extent: /d/m.tif has no CRS")), "model extent: /d/m.tif has no CRS"},
		{BadInput(errors.New("study pass: failed")), "study pass: failed"},
		{BadInput(errors.New("2 studies failed:\n  a: extent: x\n  inputs: y\nextent: z")), "2 studies failed:\n  a: x\n  y\nz"},
		{BadInput(errors.New("--e value 0 is outside (0,1)")), "--e value 0 is outside (0,1)"},
		{Internal(errors.New("pass: internal: virtual block read without its plan")), "pass: internal: virtual block read without its plan"},
	}
	for _, tc := range tests {
		if got := UserText(tc.err); got != tc.want {
			t.Errorf("UserText(%q) = %q, want %q", tc.err.Error(), got, tc.want)
		}
	}
}

// TestUserTextKeepsUserNames: a file in the working folder named like a
// package (an occurrence table saved as "pass", a raster as "report") and
// a Shown message that lists studies with such ids keep those names; the
// package names around them still go.
func TestUserTextKeepsUserNames(t *testing.T) {
	t.Chdir(t.TempDir())
	for _, name := range []string{"pass", "report"} {
		if err := os.WriteFile(name, nil, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	tests := []struct {
		name string
		err  error
		want string
	}{
		{"occurrences file named pass", BadInput(errors.New("pass: file has no records")), "pass: file has no records"},
		{"region named report, package names around", BadInput(errors.New("region: extent: report: not a polygon")), "region: report: not a polygon"},
		{"no file named metrics", BadInput(errors.New("metrics: no test point")), "no test point"},
		{"studies named pass and metrics listed", Shown(errors.New("2 of 2 studies failed: pass, metrics:\n  pass: x\n  metrics: y")), "2 of 2 studies failed: pass, metrics:\n  pass: x\n  metrics: y"},
		{"a Shown input error keeps its class", Shown(BadInput(errors.New("metrics: kept"))), "metrics: kept"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := UserText(tc.err); got != tc.want {
				t.Errorf("UserText(%q) = %q, want %q", tc.err.Error(), got, tc.want)
			}
		})
	}
	if got, want := Warning("extent: training points are collinear; the convex hull has no area; no hull extents"), "training points are collinear; the convex hull has no area; no hull extents"; got != want {
		t.Errorf("Warning: %q, want %q", got, want)
	}
	if got, want := Warning("pass: x"), "x"; got != want {
		t.Errorf("Warning does not depend on the files in the working folder: %q, want %q", got, want)
	}
	if !IsBadInput(Shown(BadInput(errors.New("x")))) {
		t.Error("Shown lost the input class")
	}
}
