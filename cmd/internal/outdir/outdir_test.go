package outdir

import (
	"errors"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"

	"areasweep/cmd/internal/fault"
)

// leftovers lists staging folders, set-aside folders and lock files under
// dir.
func leftovers(dir string) []string {
	var found []string
	filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return nil
		}
		n := d.Name()
		if strings.Contains(n, "areasweep-partial") || strings.Contains(n, oldStageMarker) || strings.HasPrefix(n, holdPrefix) || strings.HasSuffix(n, lockSuffix) {
			found = append(found, p)
		}
		return nil
	})
	return found
}

// TestFinishNeverDeletesOthersFiles drives the output folder directly:
// files that appear in --out during a run are kept, a name clash without
// --force moves nothing and keeps the results in a visible folder, and
// --force replaces only areasweep's own entries.
func TestFinishNeverDeletesOthersFiles(t *testing.T) {
	stage := func(t *testing.T, d *Dir) {
		os.WriteFile(filepath.Join(d.Stage, "results.json"), []byte("new"), 0o644)
		os.MkdirAll(filepath.Join(d.Stage, "figures"), 0o755)
	}
	t.Run("file appeared, no clash", func(t *testing.T) {
		out := filepath.Join(t.TempDir(), "res")
		d, err := Open(out, false, nil)
		if err != nil {
			t.Fatal(err)
		}
		stage(t, d)
		os.MkdirAll(out, 0o755)
		os.WriteFile(filepath.Join(out, "notes.txt"), []byte("mine"), 0o644)
		if err := d.Finish(); err != nil {
			t.Fatal(err)
		}
		if b, _ := os.ReadFile(filepath.Join(out, "notes.txt")); string(b) != "mine" {
			t.Error("a file put into --out during the run was lost")
		}
		if b, _ := os.ReadFile(filepath.Join(out, "results.json")); string(b) != "new" {
			t.Error("results not moved in")
		}
	})
	t.Run("clash without force", func(t *testing.T) {
		out := filepath.Join(t.TempDir(), "res")
		d, err := Open(out, false, nil)
		if err != nil {
			t.Fatal(err)
		}
		stage(t, d)
		os.MkdirAll(out, 0o755)
		os.WriteFile(filepath.Join(out, "results.json"), []byte("theirs"), 0o644)
		err = d.Finish()
		if err == nil || !strings.Contains(err.Error(), "gained results.json") {
			t.Fatalf("finish = %v", err)
		}
		if b, _ := os.ReadFile(filepath.Join(out, "results.json")); string(b) != "theirs" {
			t.Error("a file that appeared during the run was replaced without --force")
		}
		kept := out + ".results-" + strconv.Itoa(os.Getpid())
		if b, _ := os.ReadFile(filepath.Join(kept, "results.json")); string(b) != "new" {
			t.Errorf("results not kept in %s", kept)
		}
		if _, err := os.Stat(filepath.Join(kept, OwnerName)); err == nil {
			t.Errorf("the owner record reached the kept results %s", kept)
		}
	})
	t.Run("force replaces only areasweep's files", func(t *testing.T) {
		out := filepath.Join(t.TempDir(), "res")
		os.MkdirAll(filepath.Join(out, "figures"), 0o755)
		os.WriteFile(filepath.Join(out, "figures", "ring_steps_7.svg"), []byte("old"), 0o644)
		os.WriteFile(filepath.Join(out, "extents.tif"), []byte("old"), 0o644)
		os.WriteFile(filepath.Join(out, "notes.txt"), []byte("mine"), 0o644)
		earlierRun(t, out, "figures", "extents.tif")
		d, err := Open(out, true, nil)
		if err != nil {
			t.Fatal(err)
		}
		stage(t, d)
		if err := d.Finish(); err != nil {
			t.Fatal(err)
		}
		if b, _ := os.ReadFile(filepath.Join(out, "notes.txt")); string(b) != "mine" {
			t.Error("--force deleted a file areasweep does not write")
		}
		for _, gone := range []string{"figures/ring_steps_7.svg", "extents.tif"} {
			if _, err := os.Stat(filepath.Join(out, gone)); err == nil {
				t.Errorf("old %s kept next to the new results", gone)
			}
		}
		if l := leftovers(filepath.Dir(out)); len(l) > 0 {
			t.Errorf("left behind: %v", l)
		}
	})
}

// TestForceKeepsOthersFilesInReplacedFolders: --force replaces figures/
// (and the demo's inputs/) as a whole, so a file of the user's in it is
// refused before anything is written (exit 2) and, when it appears
// during the run, stops the move with the results kept beside --out.
func TestForceKeepsOthersFilesInReplacedFolders(t *testing.T) {
	mine := func(t *testing.T, p string) {
		t.Helper()
		os.MkdirAll(filepath.Dir(p), 0o755)
		if err := os.WriteFile(p, []byte("mine"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	kept := func(t *testing.T, p string) {
		t.Helper()
		if b, _ := os.ReadFile(p); string(b) != "mine" {
			t.Errorf("%s was deleted or changed", p)
		}
	}
	cases := []struct {
		name, file string
		demo       bool
	}{
		{"own figure", "figures/my_figure.png", false},
		{"figure name with another extension", "figures/roc_curves.eps", false},
		{"sub-folder of figures", "figures/drafts/a.svg", false},
		{"notes in the demo's inputs", "inputs/notes.txt", true},
		{"a file named figures", "figures", false},
		// A folder where a file goes was deleted with everything in it.
		{"a folder named scores.csv", "scores.csv/keep.txt", false},
		{"a folder named results.json", "results.json/a/b.txt", false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out := filepath.Join(t.TempDir(), "res")
			mine(t, filepath.Join(out, c.file))
			if c.file != "figures" {
				mine(t, filepath.Join(out, "figures", "roc_curves.svg"))
			}
			open := func() (*Dir, error) { return Open(out, true, nil) }
			if c.demo {
				open = func() (*Dir, error) { return OpenDemo(out, true, []string{"study.yaml"}) }
			}
			_, err := open()
			if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), filepath.Join(out, strings.Split(c.file, "/")[0])) {
				t.Fatalf("Open = %v, want an input error naming the file", err)
			}
			kept(t, filepath.Join(out, c.file))
			if l := leftovers(filepath.Dir(out)); len(l) > 0 {
				t.Errorf("left behind: %v", l)
			}
		})
	}
	t.Run("a shard leaves figures/ alone", func(t *testing.T) {
		out := filepath.Join(t.TempDir(), "res")
		mine(t, filepath.Join(out, "figures", "my_figure.png"))
		d, err := OpenShard(out, true, nil, []string{"shard-1-of-2.aspf", "shard-1-of-2.log"})
		if err != nil {
			t.Fatal(err)
		}
		os.WriteFile(filepath.Join(d.Stage, "shard-1-of-2.aspf"), []byte("x"), 0o644)
		if err := d.Finish(); err != nil {
			t.Fatal(err)
		}
		kept(t, filepath.Join(out, "figures", "my_figure.png"))
	})
	t.Run("a shard refuses a folder named as its partial file at once", func(t *testing.T) {
		for _, name := range []string{"shard-1-of-2.aspf", "shard-1-of-2.log"} {
			out := filepath.Join(t.TempDir(), "res")
			mine(t, filepath.Join(out, name, "keep.txt"))
			own := []string{"shard-1-of-2.aspf", "shard-1-of-2.log"}
			for _, try := range []func() error{
				func() error { return Check(out, true, nil, own) },
				func() error { _, err := OpenShard(out, true, nil, own); return err },
			} {
				err := try()
				if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), "holds the folder "+filepath.Join(out, name)) {
					t.Fatalf("%s: refusal = %v, want bad input naming the folder", name, err)
				}
			}
			kept(t, filepath.Join(out, name, "keep.txt"))
			if l := leftovers(filepath.Dir(out)); len(l) > 0 {
				t.Errorf("left behind: %v", l)
			}
		}
	})
	t.Run("a shard keeps a folder named as its partial file made during the run", func(t *testing.T) {
		out := filepath.Join(t.TempDir(), "res")
		d, err := OpenShard(out, true, nil, []string{"shard-1-of-2.aspf", "shard-1-of-2.log"})
		if err != nil {
			t.Fatal(err)
		}
		mine(t, filepath.Join(out, "shard-1-of-2.aspf", "keep.txt"))
		os.WriteFile(filepath.Join(d.Stage, "shard-1-of-2.aspf"), []byte("x"), 0o644)
		err = d.Finish()
		if err == nil || fault.IsBadInput(err) || !strings.Contains(err.Error(), "holds the folder "+filepath.Join(out, "shard-1-of-2.aspf")) {
			t.Fatalf("Finish = %v, want a failure naming the folder", err)
		}
		kept(t, filepath.Join(out, "shard-1-of-2.aspf", "keep.txt"))
		keep := out + ".results-" + strconv.Itoa(os.Getpid())
		if b, _ := os.ReadFile(filepath.Join(keep, "shard-1-of-2.aspf")); string(b) != "x" {
			t.Errorf("results not kept in %s", keep)
		}
	})
	t.Run("areasweep's own names pass", func(t *testing.T) {
		out := filepath.Join(t.TempDir(), "res")
		for _, n := range []string{"figures/ring_steps_12.pdf", "figures/model_minus_null.png", "figures/.extent_maps.svg.tmp-12345", "inputs/notes.txt"} {
			mine(t, filepath.Join(out, n))
		}
		earlierRun(t, out, "figures")
		d, err := Open(out, true, nil) // not the demo: inputs/ is not replaced
		if err != nil {
			t.Fatal(err)
		}
		os.MkdirAll(filepath.Join(d.Stage, "figures"), 0o755)
		if err := d.Finish(); err != nil {
			t.Fatal(err)
		}
		kept(t, filepath.Join(out, "inputs/notes.txt"))
		if _, err := os.Stat(filepath.Join(out, "figures/ring_steps_12.pdf")); err == nil {
			t.Error("an old figure page was kept beside the new figures")
		}
	})
	t.Run("file appears during the run", func(t *testing.T) {
		out := filepath.Join(t.TempDir(), "res")
		mine(t, filepath.Join(out, "figures", "roc_curves.svg"))
		earlierRun(t, out, "figures")
		d, err := Open(out, true, nil)
		if err != nil {
			t.Fatal(err)
		}
		os.MkdirAll(filepath.Join(d.Stage, "figures"), 0o755)
		os.WriteFile(filepath.Join(d.Stage, "figures", "roc_curves.svg"), []byte("new"), 0o644)
		mine(t, filepath.Join(out, "figures", "sketch.png"))
		err = d.Finish()
		if err == nil || fault.IsBadInput(err) || !strings.Contains(err.Error(), "sketch.png") {
			t.Fatalf("Finish = %v, want a failure naming the file", err)
		}
		kept(t, filepath.Join(out, "figures", "sketch.png"))
		keep := out + ".results-" + strconv.Itoa(os.Getpid())
		if b, _ := os.ReadFile(filepath.Join(keep, "figures", "roc_curves.svg")); string(b) != "new" {
			t.Errorf("results not kept in %s", keep)
		}
	})
}

// TestOpenErrorsWrapTheCause: a refused --out keeps the file system's
// error in the chain (errors.Is finds it) and is an input error.
func TestOpenErrorsWrapTheCause(t *testing.T) {
	file := filepath.Join(t.TempDir(), "plain")
	if err := os.WriteFile(file, []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err := Open(filepath.Join(file, "res"), false, nil)
	if !errors.Is(err, syscall.ENOTDIR) {
		t.Errorf("Open under a file: %v; errors.Is(err, ENOTDIR) is false", err)
	}
	if !fault.IsBadInput(err) {
		t.Errorf("Open under a file: %v is not an input error", err)
	}
	// It said only "--out FILE/res cannot be used: not a directory".
	if msg := err.Error(); !strings.Contains(msg, file+" on its path is a file") || !strings.Contains(msg, "choose another --out") {
		t.Errorf("Open under a file: %q does not name the file and what to do", msg)
	}
}

// TestForeignErrorNamesEachFolder: files of the user's in the demo's
// figures/ and inputs/ are refused with both folders named, not only the
// first one's.
func TestForeignErrorNamesEachFolder(t *testing.T) {
	out := t.TempDir()
	for _, p := range []string{"figures/notes.txt", "inputs/user.csv"} {
		os.MkdirAll(filepath.Join(out, filepath.Dir(p)), 0o755)
		os.WriteFile(filepath.Join(out, p), []byte("mine"), 0o644)
	}
	_, err := OpenDemo(out, true, []string{"study.yaml"})
	if err == nil {
		t.Fatal("OpenDemo accepted a folder with the user's files in figures/ and inputs/")
	}
	want := "in " + filepath.Join(out, "figures") + " and " + filepath.Join(out, "inputs") + ","
	if !strings.Contains(err.Error(), want) {
		t.Errorf("message %q does not contain %q", err, want)
	}
}

// TestStageRemovesDeadStaging: Stage removes the staging folder of a
// process that no longer exists and keeps a living process's.
func TestStageRemovesDeadStaging(t *testing.T) {
	dir := t.TempDir()
	cmd := exec.Command("true")
	if err := cmd.Run(); err != nil {
		t.Fatal(err)
	}
	host, _ := os.Hostname()
	abs := RealPath(dir)
	rec := func(host string, pid int, start string) string {
		return "out\t" + abs + "\nhost\t" + host + "\nboot\t" + bootID() + "\npid\t" + strconv.Itoa(pid) + "\nstart\t" + start + "\n"
	}
	me := os.Getpid()
	for _, c := range []struct {
		name    string
		record  string // "" for none
		removed bool
	}{
		{"dead process on this machine", rec(host, cmd.Process.Pid, "1"), true},
		{"living process", rec(host, me, startTime(me)), false},
		{"process on another machine (dir on shared storage)", rec("node-b", cmd.Process.Pid, "1"), false},
		{"no record (the user's, or an earlier version's)", "", false},
	} {
		t.Run(c.name, func(t *testing.T) {
			p := filepath.Join(dir, stagedPrefix+strconv.Itoa(cmd.Process.Pid)+"-"+strings.ReplaceAll(c.name, " ", "_"))
			os.MkdirAll(filepath.Join(p, "figures"), 0o755)
			if c.record != "" {
				os.WriteFile(filepath.Join(p, OwnerName), []byte(c.record), 0o644)
			}
			s, err := Stage(dir)
			if err != nil {
				t.Fatal(err)
			}
			defer s.Abort()
			if _, err := readOwner(s.Path); err != nil {
				t.Errorf("the new staging folder holds no owner record: %v", err)
			}
			_, err = os.Stat(p)
			if gone := os.IsNotExist(err); gone != c.removed {
				t.Errorf("removed %v, want %v", gone, c.removed)
			}
		})
	}
}

// TestNothingMadeAfterAbortAll: once a signal's AbortAll has run, the
// process is about to exit, so an --out or a Stage opened then (a batch's
// next study starting meanwhile) must create nothing. It created its lock
// file and staging folder, left behind by the exit (found by interrupting
// a batch with --jobs 2 after 0.3 s: 2 of 30 left
// .s2.areasweep-lock and .s2.areasweep-partial-PID-...).
func TestNothingMadeAfterAbortAll(t *testing.T) {
	defer ResetStopping()
	dir := t.TempDir()
	AbortAll()
	if d, err := Open(filepath.Join(dir, "out"), false, nil); err == nil {
		d.Abort()
		t.Errorf("Open after AbortAll: accepted")
	}
	if s, err := Stage(dir); err == nil {
		s.Abort()
		t.Errorf("Stage after AbortAll: accepted")
	}
	if entries, _ := os.ReadDir(dir); len(entries) > 0 {
		t.Errorf("%d entries made after AbortAll: %v", len(entries), entries)
	}
}
