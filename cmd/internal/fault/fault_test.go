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
