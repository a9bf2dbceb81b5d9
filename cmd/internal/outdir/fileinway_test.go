package outdir

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestFileWhereFolderGoes: a file named figures (or, for the demo,
// inputs) in --out is refused with --force, naming it as a file where a
// folder goes (the message used to say that --out itself is replaced as
// a whole), and is kept.
func TestFileWhereFolderGoes(t *testing.T) {
	for _, name := range []string{"figures", "inputs"} {
		out := filepath.Join(t.TempDir(), "out")
		os.MkdirAll(out, 0o755)
		p := filepath.Join(out, name)
		os.WriteFile(p, []byte("mine"), 0o644)
		open := func() (*Dir, error) { return Open(out, true, nil) }
		if name == "inputs" {
			open = func() (*Dir, error) { return OpenDemo(out, true, []string{"study.yaml"}) }
		}
		d, err := open()
		if err == nil {
			d.Abort()
			t.Fatalf("%s: accepted", name)
		}
		if !fault.IsBadInput(err) || !strings.Contains(err.Error(), p+", a file where areasweep writes a folder of that name") || strings.Contains(err.Error(), "replaces as a whole") {
			t.Errorf("%s: %v", name, err)
		}
		if b, err := os.ReadFile(p); err != nil || string(b) != "mine" {
			t.Errorf("%s: the file: %q, %v", name, b, err)
		}
	}
}
