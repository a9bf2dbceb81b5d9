package outdir

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestTildeOut: --out=~/runs reaches areasweep with its ~ (a shell
// expands ~ only at the start of a word), and a folder named ~ was made
// in the current folder (which rm -r ~ then takes for the home folder).
// It is refused (exit 2), naming the path the shell would have made, and
// nothing is created; a folder whose name merely starts with ~ is not.
func TestTildeOut(t *testing.T) {
	home := t.TempDir()
	t.Setenv("HOME", home)
	cwd := t.TempDir()
	t.Chdir(cwd)
	for _, out := range []string{"~/runs", "~"} {
		_, err := Open(out, false, nil)
		if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), "--out "+out+": it starts with ~") ||
			!strings.Contains(err.Error(), "(--out "+out+")") || !strings.Contains(err.Error(), "does not make a folder named ~") {
			t.Errorf("--out %s: %v", out, err)
		}
		if out == "~/runs" && !strings.Contains(err.Error(), filepath.Join(home, "runs")) {
			t.Errorf("--out %s: the message does not name %s: %v", out, filepath.Join(home, "runs"), err)
		}
	}
	if _, err := os.Stat(filepath.Join(cwd, "~")); err == nil {
		t.Error("a folder named ~ was made")
	}
	d, err := Open("~notes", false, nil)
	if err != nil {
		t.Fatalf("--out ~notes: %v", err)
	}
	d.Abort()
}
