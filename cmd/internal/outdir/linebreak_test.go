package outdir

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestOpenLineBreak: an --out whose path holds a line break (in its own
// name, or in the folder it is relative to) is refused as bad input on one
// line that says so; it was refused with "cannot write in PARENT (the path
// holds a line break); choose a folder you can write to", the line break
// printed raw, splitting the message. Nothing is created.
func TestOpenLineBreak(t *testing.T) {
	dir := t.TempDir()
	odd := filepath.Join(dir, "a\nb")
	if err := os.Mkdir(odd, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, out := range []string{filepath.Join(dir, "new\nline"), filepath.Join(odd, "out"), filepath.Join(dir, "cr\r")} {
		_, err := Open(out, false, nil)
		if err == nil {
			t.Fatalf("Open(%q) succeeded", out)
		}
		if !fault.IsBadInput(err) {
			t.Errorf("%v is not bad input", err)
		}
		if msg := err.Error(); strings.ContainsAny(msg, "\n\r") || !strings.Contains(msg, "holds a line break") || strings.Contains(msg, "you can write to") {
			t.Errorf("message %q", msg)
		}
		if _, err := os.Lstat(out); err == nil {
			t.Errorf("%q was created", out)
		}
	}
	if l := leftovers(dir); len(l) > 0 {
		t.Errorf("left %q", l)
	}
}
