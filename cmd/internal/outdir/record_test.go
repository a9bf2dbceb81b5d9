package outdir

import (
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// earlierRun writes into out the record an earlier run that wrote names
// there would have left, so that a test's hand-made outputs count as
// areasweep's.
func earlierRun(t *testing.T, out string, names ...string) {
	t.Helper()
	if err := os.MkdirAll(out, 0o755); err != nil {
		t.Fatal(err)
	}
	body := recordHeader + "\n" + strings.Join(names, "\n") + "\n"
	if err := os.WriteFile(filepath.Join(out, recordName), []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
}

// recorded returns the names the record in out lists, sorted.
func recorded(out string) []string {
	var names []string
	for n := range readRecord(out) {
		names = append(names, n)
	}
	slices.Sort(names)
	return names
}

// TestForceNeverReplacesUnrecorded: --force replaces an entry of an
// output's name only when a run's record in --out lists it. In a folder
// no run wrote into (the user's run.log, scores.csv and extents.tif) it
// replaced all three, the last though the new run wrote none; now the run
// is refused before any work, naming them, and nothing changes. A record
// that is not one (no header) vouches for nothing.
func TestForceNeverReplacesUnrecorded(t *testing.T) {
	for _, c := range []struct {
		name   string
		record string // written as the record's content; "" = none
	}{
		{"no record", ""},
		{"a file of that name that is not a record", "run.log\nscores.csv\nextents.tif\n"},
		{"a record listing other names", recordHeader + "\nresults.json\n"},
	} {
		t.Run(c.name, func(t *testing.T) {
			out := filepath.Join(t.TempDir(), "mine")
			os.MkdirAll(out, 0o755)
			for _, n := range []string{"run.log", "scores.csv", "extents.tif", "notes.txt"} {
				os.WriteFile(filepath.Join(out, n), []byte("mine"), 0o644)
			}
			if c.record != "" {
				os.WriteFile(filepath.Join(out, recordName), []byte(c.record), 0o644)
			}
			for _, open := range []func() error{
				func() error { return Check(out, true, nil, nil) },
				func() error {
					d, err := Open(out, true, nil)
					if err == nil {
						d.Abort()
					}
					return err
				},
			} {
				err := open()
				if err == nil || !fault.IsBadInput(err) {
					t.Fatalf("err = %v, want a refusal", err)
				}
				for _, w := range []string{filepath.Join(out, "scores.csv"), filepath.Join(out, "run.log"), filepath.Join(out, "extents.tif"), "which no areasweep run wrote there", "move them out of " + out} {
					if !strings.Contains(err.Error(), w) {
						t.Errorf("refusal does not say %q: %v", w, err)
					}
				}
				if strings.Contains(err.Error(), "notes.txt") {
					t.Errorf("refusal names notes.txt, which --force never touches: %v", err)
				}
			}
			for _, n := range []string{"run.log", "scores.csv", "extents.tif", "notes.txt"} {
				if b, _ := os.ReadFile(filepath.Join(out, n)); string(b) != "mine" {
					t.Errorf("%s changed", n)
				}
			}
			if l := leftovers(filepath.Dir(out)); len(l) > 0 {
				t.Errorf("left behind: %v", l)
			}
		})
	}
}

// TestRecordFollowsRuns: a run's record lists what --out holds of
// areasweep's after it: a new folder's outputs; after a --force run that
// writes fewer, only those (the set-aside ones are gone, so a file of the
// user's put there later under such a name is not replaced); shards
// writing into one folder each add their own files to the others'.
// A file that appears during a --force run under an output's name stops
// the move (the results are kept beside --out).
func TestRecordFollowsRuns(t *testing.T) {
	finish := func(d *Dir, names ...string) {
		t.Helper()
		for _, n := range names {
			os.WriteFile(filepath.Join(d.Stage, n), []byte("new"), 0o644)
		}
		if err := d.Finish(); err != nil {
			t.Fatal(err)
		}
	}
	out := filepath.Join(t.TempDir(), "res")
	d, err := Open(out, false, nil)
	if err != nil {
		t.Fatal(err)
	}
	finish(d, "results.json", "run.log", "scores.csv")
	if got, want := recorded(out), []string{"results.json", "run.log", "scores.csv"}; !slices.Equal(got, want) {
		t.Errorf("after the first run the record lists %v, want %v", got, want)
	}
	os.WriteFile(filepath.Join(out, "notes.txt"), []byte("mine"), 0o644)
	if d, err = Open(out, true, nil); err != nil {
		t.Fatal(err)
	}
	finish(d, "results.json")
	if got, want := recorded(out), []string{"results.json"}; !slices.Equal(got, want) {
		t.Errorf("after a --force run writing results.json only the record lists %v, want %v", got, want)
	}
	os.WriteFile(filepath.Join(out, "run.log"), []byte("mine"), 0o644)
	if err := Check(out, true, nil, nil); err == nil || !strings.Contains(err.Error(), filepath.Join(out, "run.log")) {
		t.Errorf("a run.log of the user's put there since: Check = %v, want a refusal naming it", err)
	}
	os.Remove(filepath.Join(out, "run.log"))

	if d, err = Open(out, true, nil); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(d.Stage, "results.json"), []byte("newer"), 0o644)
	os.WriteFile(filepath.Join(out, "scores.csv"), []byte("mine"), 0o644) // during the run
	if err := d.Finish(); err == nil || !strings.Contains(err.Error(), "which no areasweep run wrote there") {
		t.Fatalf("Finish = %v, want a refusal naming scores.csv", err)
	}
	if b, _ := os.ReadFile(filepath.Join(out, "scores.csv")); string(b) != "mine" {
		t.Error("a scores.csv that appeared during the run was replaced")
	}
	if b, _ := os.ReadFile(filepath.Join(out, "results.json")); string(b) != "new" {
		t.Error("the outputs changed though the move was refused")
	}
	os.RemoveAll(out + ".results-" + strconv.Itoa(os.Getpid()))

	shards := filepath.Join(t.TempDir(), "shards")
	for k, own := range [][]string{{"shard-1-of-2.aspf", "shard-1-of-2.log"}, {"shard-2-of-2.aspf", "shard-2-of-2.log"}} {
		d, err := OpenShard(shards, true, nil, own)
		if err != nil {
			t.Fatalf("shard %d: %v", k+1, err)
		}
		finish(d, own...)
	}
	if got, want := recorded(shards), []string{"shard-1-of-2.aspf", "shard-1-of-2.log", "shard-2-of-2.aspf", "shard-2-of-2.log"}; !slices.Equal(got, want) {
		t.Errorf("after two shards the record lists %v, want %v", got, want)
	}
	// A shard run again replaces its own files, recorded.
	d, err = OpenShard(shards, true, nil, []string{"shard-1-of-2.aspf", "shard-1-of-2.log"})
	if err != nil {
		t.Fatal(err)
	}
	finish(d, "shard-1-of-2.aspf", "shard-1-of-2.log")
	if got := recorded(shards); len(got) != 4 {
		t.Errorf("after shard 1 again the record lists %v", got)
	}
}

// TestSystemAbs: paths resolved as the system resolves them, name by
// name: a ".." after a symbolic link goes up from the link's target (as
// mkdir lnk/../x makes x beside the target); filepath.Abs's cleaning of
// the text put lnk/../xo beside the link, while the inputs, opened by the
// system, were read from beside the target (helper probe, 2026-12-05).
func TestSystemAbs(t *testing.T) {
	root, err := filepath.EvalSymlinks(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	os.MkdirAll(filepath.Join(root, "deep", "a"), 0o755)
	os.Symlink(filepath.Join("deep", "a"), filepath.Join(root, "lnk"))          // relative target
	os.Symlink(filepath.Join(root, "deep", "a"), filepath.Join(root, "abslnk")) // absolute target
	os.Symlink("loop", filepath.Join(root, "loop"))
	t.Chdir(root)
	for _, c := range []struct{ in, want string }{
		{"lnk/../xo", filepath.Join(root, "deep", "xo")},
		{"abslnk/../xo", filepath.Join(root, "deep", "xo")},
		{root + "/lnk/../../xo", filepath.Join(root, "xo")},
		{"lnk", filepath.Join(root, "deep", "a")},
		{"./deep/./a/", filepath.Join(root, "deep", "a")},
		{"new/../x", filepath.Join(root, "x")}, // from a missing name on, as written
		{"lnk/new/x", filepath.Join(root, "deep", "a", "new", "x")},
		{"loop/x", filepath.Join(root, "loop", "x")}, // a loop: the rest as written
		{"/", "/"},
	} {
		if got, err := systemAbs(c.in); err != nil || got != c.want {
			t.Errorf("systemAbs(%q) = %q, %v; want %q", c.in, got, err, c.want)
		}
	}
	// Open puts --out where the system would: beside the link's target.
	d, err := Open("lnk/../xo", false, nil)
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(d.Stage, "results.json"), []byte("new"), 0o644)
	if err := d.Finish(); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(root, "deep", "xo", "results.json")); err != nil {
		t.Errorf("--out lnk/../xo: %v", err)
	}
	if _, err := os.Stat(filepath.Join(root, "xo")); err == nil {
		t.Error("--out lnk/../xo was made beside the link")
	}
	// An --out that the system resolves to the folder of an input is
	// refused, however the input is written.
	os.WriteFile(filepath.Join(root, "deep", "o.csv"), []byte("x"), 0o644)
	if err := Check("lnk/..", true, []string{"deep/o.csv"}, nil); err == nil || !strings.Contains(err.Error(), "holds the input deep/o.csv") {
		t.Errorf("--out lnk/.. with the input deep/o.csv: %v", err)
	}
	if err := Check("deep", true, []string{"lnk/../o.csv"}, nil); err == nil || !strings.Contains(err.Error(), "holds the input lnk/../o.csv") {
		t.Errorf("--out deep with the input lnk/../o.csv: %v", err)
	}
}
