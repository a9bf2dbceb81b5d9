package rerender

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestReportWithoutResults: a folder without results.json is named by
// what it is: one that does not exist as such (it said "DIR/results.json
// not found"), the folder of `areasweep extents` as the extent family
// that scores nothing; any other folder keeps "results.json not found".
// Each is bad input (exit 2) and nothing is written.
func TestReportWithoutResults(t *testing.T) {
	dir := t.TempDir()
	ext := filepath.Join(dir, "family")
	os.Mkdir(ext, 0o755)
	os.WriteFile(filepath.Join(ext, "extents.csv"), []byte("id,kind\n"), 0o644)
	os.WriteFile(filepath.Join(ext, "run.log"), []byte("log\n"), 0o644)
	empty := filepath.Join(dir, "empty")
	os.Mkdir(empty, 0o755)
	for _, tc := range []struct {
		name, dir, want string
	}{
		{"missing folder", filepath.Join(dir, "nope"), filepath.Join(dir, "nope") + " does not exist: give the --out directory of a finished run"},
		{"extents folder", ext, "holds the extent family that areasweep extents wrote (extents.csv), not a scored run's results.json"},
		{"empty folder", empty, filepath.Join(empty, "results.json") + " not found"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Run(Options{Dir: tc.dir, Force: true})
			if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("got %v, want bad input saying %q", err, tc.want)
			}
			if tc.dir == ext {
				if names, _ := os.ReadDir(ext); len(names) != 2 {
					t.Errorf("the extents folder holds %d entries after the refusal, want 2", len(names))
				}
			}
		})
	}
}
