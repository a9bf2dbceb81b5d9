package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestEmptyStudyFile: a study file that sets nothing (empty, only
// comments, keys without values) is named when the run then lacks an
// input; the message said only "no model given", as if no study file had
// been given. Nothing is written. Another problem (--iterations 0) is
// said without it.
func TestEmptyStudyFile(t *testing.T) {
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
	// A problem other than a missing input gets no word about the file.
	var so, se strings.Builder
	code := Main([]string{"run", "--study", filepath.Join(dir, "empty.yaml"), "--model", "m=m.tif", "--occurrences", "o.csv", "--region", "r.gpkg", "--iterations", "0", "--out", filepath.Join(dir, "o")}, nil, &so, &se)
	if code != 2 || !strings.Contains(se.String(), "--iterations is 0") || strings.Contains(se.String(), "sets nothing") {
		t.Errorf("iterations 0 with an empty study file: exit %d: %s", code, se.String())
	}
}
