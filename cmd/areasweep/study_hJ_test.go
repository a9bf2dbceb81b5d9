package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestEmptyStudyFileHJ: a study file that sets nothing (empty, only
// comments, keys without values) is named when the run then lacks an
// input; the message said only "no model given", as if no study file had
// been given. Nothing is written.
func TestEmptyStudyFileHJ(t *testing.T) {
	dir := t.TempDir()
	for name, body := range map[string]string{"empty.yaml": "", "comments.yaml": "# to do\nseed:\n"} {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		for _, cmd := range []string{"run", "extents"} {
			out := filepath.Join(dir, "out-"+cmd+"-"+name)
			var so, se strings.Builder
			code := Main([]string{cmd, "--study", p, "--out", out, "--quiet"}, nil, &so, &se)
			msg := se.String()
			if code != 2 || !strings.Contains(msg, " given: add --") || !strings.Contains(msg, "the study file "+p+" sets nothing") {
				t.Errorf("%s --study %s: exit %d: %s", cmd, name, code, msg)
			}
			if _, err := os.Stat(out); err == nil {
				t.Errorf("%s --study %s: %s was created", cmd, name, out)
			}
		}
	}
}
