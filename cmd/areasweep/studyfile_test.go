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

// TestRunErrorNamesStudyKey: a value the run itself refuses (not the
// settings check: PROJ is asked about --occurrences-crs when the points
// are placed) is attributed to the study file and key that gave it; the
// message named only the flag, which the user never typed. Given on the
// command line, the same value gets no such words; a message that names
// a flag the file did not set gets none either.
func TestRunErrorNamesStudyKey(t *testing.T) {
	s := newSmallStudy(t)
	dir := t.TempDir()
	study := filepath.Join(dir, "study.yaml")
	body := "model: m=" + s.model + "\noccurrences: " + s.occ + "\nregion: " + s.region + "\niterations: 5\noccurrences-crs: 3035\n"
	if err := os.WriteFile(study, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	from := "(the value comes from the study file " + study + ", key occurrences-crs)"
	for _, c := range []struct {
		name  string
		args  []string
		given bool // the message says where the value came from
	}{
		{"from the file", []string{"run", "--study", study}, true},
		{"extents, from the file", []string{"extents", "--study", study}, true},
		{"on the command line", []string{"run", "--study", study, "--occurrences-crs", "3857"}, false},
	} {
		out := filepath.Join(dir, "out-"+strings.ReplaceAll(c.name, " ", "-"))
		var so, se strings.Builder
		code := Main(append(c.args, "--out", out, "--quiet"), nil, &so, &se)
		msg := se.String()
		if code != 2 || !strings.Contains(msg, "is not a CRS PROJ knows") {
			t.Fatalf("%s: exit %d: %s", c.name, code, msg)
		}
		if got := strings.Contains(msg, from); got != c.given {
			t.Errorf("%s: says where the value came from: %v, want %v: %s", c.name, got, c.given, msg)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%s: %s was created", c.name, out)
		}
	}
}
