package fault

import (
	"errors"
	"fmt"
	"io/fs"
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
