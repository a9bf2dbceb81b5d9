package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestStudyFileValueNamed: a setting refused by the checks that need no
// file (an empty E list, iterations 0) names the study file and key when
// the value came from there, and not when the command line gave it.
// Found by randomized study files: "e: []" was refused as "--e is empty"
// with no word of the file it was written in.
func TestStudyFileValueNamed(t *testing.T) {
	s := newSmallStudy(t)
	dir := t.TempDir()
	base := "model:\n  m: " + s.model + "\noccurrences: " + s.occ + "\nregion: " + s.region + "\n"
	cases := []struct {
		name, file string
		flags      []string
		want       string
		fromFile   bool
	}{
		{"empty E list in the file", base + "e: []\n", nil, "--e is empty", true},
		{"iterations 0 in the file", base + "iterations: 0\n", nil, "--iterations is 0", true},
		{"iterations 0 on the command line", base + "iterations: 10\n", []string{"--iterations", "0"}, "--iterations is 0", false},
	}
	for i, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			study := filepath.Join(dir, "study"+string(rune('a'+i))+".yaml")
			if err := os.WriteFile(study, []byte(c.file), 0o644); err != nil {
				t.Fatal(err)
			}
			out := filepath.Join(dir, "out"+string(rune('a'+i)))
			args := append([]string{"run", "--study", study, "--out", out, "--quiet"}, c.flags...)
			_, se, code := runBin(t, args...)
			if code != 2 || !strings.Contains(se, c.want) {
				t.Fatalf("exit %d, want 2 with %q: %s", code, c.want, se)
			}
			named := strings.Contains(se, "comes from the study file "+study)
			if named != c.fromFile {
				t.Errorf("study file named: %v, want %v: %s", named, c.fromFile, se)
			}
			if _, err := os.Stat(out); !os.IsNotExist(err) {
				t.Errorf("--out was created: %v", err)
			}
		})
	}
}
