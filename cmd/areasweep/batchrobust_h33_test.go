package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestBatchUnreadableInputForce: a finished study one of whose recorded
// input files cannot be read (here a symbolic link to itself, which stat
// refuses with "too many levels of symbolic links": the tests run as root,
// which reads a file of mode 000) is not taken as finished nor as made
// from other inputs. --force does not get past it, and the message says
// so (GDAL would skip an unreadable sidecar such as a mask without a word,
// so a run made then could silently differ); a SLURM plan leaves it out,
// with or without --force, instead of submitting a task that fails on the
// same check. Made readable again, the study is finished as before.
func TestBatchUnreadableInputForce(t *testing.T) {
	dir, table := inputsStudy(t)
	out := filepath.Join(t.TempDir(), "runs")
	if _, se, code := runBin(t, "batch", table, "--out", out); code != 0 {
		t.Fatalf("first run: exit %d: %s", code, se)
	}
	results := filepath.Join(out, "a", "results.json")
	first, _ := os.ReadFile(results)
	aux := filepath.Join(dir, "model.tif.aux.xml")
	auxBytes, _ := os.ReadFile(aux)
	os.Remove(aux)
	if err := os.Symlink(aux, aux); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name  string
		args  []string
		code  int
		words []string
		not   []string
	}{
		{"without --force", nil, 1, []string{"2 of 2 studies failed", "the model m file " + aux + " cannot be read to check", "make it readable", "move it away"}, []string{"--force runs them again", "batch: "}},
		{"with --force", []string{"--force"}, 1, []string{"2 of 2 studies failed", aux + " cannot be read to check", "--force does not get past this", "never skips reading an input", "each line says what to do"}, []string{"a: started", "b: started"}},
		{"--slurm", []string{"--slurm"}, 0, []string{"not submitted: a: the model m file " + aux + " cannot be read", "not submitted: b:", "2 tasks, 0 not finished"}, nil},
		{"--slurm --force", []string{"--slurm", "--force"}, 0, []string{"not submitted: a:", "--force does not get past this", "2 tasks, 0 not finished"}, []string{"submit with"}},
	} {
		so, se, code := runBin(t, append([]string{"batch", table, "--out", out}, c.args...)...)
		all := so + se
		if code != c.code {
			t.Errorf("%s: exit %d, want %d: %s", c.name, code, c.code, all)
		}
		for _, w := range c.words {
			if !strings.Contains(all, w) {
				t.Errorf("%s: output lacks %q:\n%s", c.name, w, all)
			}
		}
		for _, w := range c.not {
			if strings.Contains(all, w) {
				t.Errorf("%s: output holds %q:\n%s", c.name, w, all)
			}
		}
		if m := forbidden.FindString(all); m != "" {
			t.Errorf("%s: output holds %q", c.name, m)
		}
		if got, _ := os.ReadFile(results); !bytes.Equal(got, first) {
			t.Fatalf("%s: a's results.json changed", c.name)
		}
	}
	os.Remove(aux)
	if err := os.WriteFile(aux, auxBytes, 0o644); err != nil {
		t.Fatal(err)
	}
	laterTime(t, aux)
	if _, se, code := runBin(t, "batch", table, "--out", out); code != 0 || !strings.Contains(se, "a: already finished, skipped") {
		t.Errorf("readable again: exit %d: %s", code, se)
	}
}
