package outdir

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"testing"
)

// TestRestoreKilledReplace: a run killed (SIGKILL, a power cut) while it
// replaced a previous run's outputs with --force left the previous ones
// in its hidden set-aside folder and --out holding some, none or a mix of
// new ones; the next run removed the set-aside folder as a dead run's,
// deleting the previous run for good (found with the renames slowed by
// strace and the run killed between them: --out held only the user's
// notes.txt). The next run now puts the previous outputs back first, and
// removes the new ones the killed run had moved in; when it had moved
// them all, the new run stays. Files of the user's stay throughout.
func TestRestoreKilledReplace(t *testing.T) {
	old := map[string]string{"results.json": "old", "report.html": "old", "figures/roc_curves.svg": "old", "run.log": "old"}
	new := map[string]string{"results.json": "new", "report.html": "new", "figures/roc_curves.svg": "new", "scores.csv": "new"}
	// The staged entries move in name order: figures, report.html,
	// results.json, scores.csv. killAt is the number moved when the run
	// dies, after every old entry was set aside; -1 is before the journal
	// is written.
	for _, killAt := range []int{-1, 0, 1, 2, 3, 4} {
		t.Run(fmt.Sprint(killAt), func(t *testing.T) {
			out := filepath.Join(t.TempDir(), "out")
			put := func(dir string, files map[string]string) {
				for n, c := range files {
					os.MkdirAll(filepath.Dir(filepath.Join(dir, n)), 0o755)
					if err := os.WriteFile(filepath.Join(dir, n), []byte(c), 0o644); err != nil {
						t.Fatal(err)
					}
				}
			}
			put(out, old)
			put(out, map[string]string{"notes.txt": "mine"})
			earlierRun(t, out, "results.json", "report.html", "figures", "run.log")
			d, err := Open(out, true, nil)
			if err != nil {
				t.Fatal(err)
			}
			put(d.Stage, new)
			killed := errors.New("killed")
			moved := 0
			movedHook = func(string) {
				if moved++; moved == killAt {
					panic(killed)
				}
			}
			defer func() { movedHook = nil }()
			defer func(f func(string, []byte, os.FileMode) error) { writeFile = f }(writeFile)
			if killAt <= 0 {
				writeFile = func(name string, b []byte, m os.FileMode) error {
					if filepath.Base(name) == movingName {
						if killAt == 0 {
							os.WriteFile(name, b, m) // the journal, then no move
						}
						panic(killed)
					}
					return os.WriteFile(name, b, m)
				}
			}
			func() {
				defer func() {
					if r := recover(); r != nil && r != killed {
						panic(r)
					}
				}()
				d.Finish()
			}()
			movedHook = nil
			writeFile = os.WriteFile
			// The killed run's folders now belong to a process that has
			// ended.
			dead := deadPID(t)
			for _, p := range leftovers(out) {
				if st, err := os.Stat(p); err == nil && st.IsDir() {
					o, _ := readOwner(p)
					host, _ := os.Hostname()
					rec := fmt.Sprintf("out\t%s\nhost\t%s\nboot\t%s\npid\t%d\nstart\t\n", o.out, host, bootID(), dead)
					os.WriteFile(filepath.Join(p, OwnerName), []byte(rec), 0o644)
				}
			}
			d2, err := Open(out, true, nil)
			if err != nil {
				t.Fatal(err)
			}
			d2.Abort()
			want := old
			if killAt == 4 {
				want = new
			}
			for _, n := range []string{"results.json", "report.html", "figures/roc_curves.svg", "run.log", "scores.csv"} {
				b, err := os.ReadFile(filepath.Join(out, n))
				if c, ok := want[n]; ok != (err == nil) || string(b) != c {
					t.Errorf("%s: %q, %v; want %q", n, b, err, c)
				}
			}
			if b, _ := os.ReadFile(filepath.Join(out, "notes.txt")); string(b) != "mine" {
				t.Errorf("notes.txt: %q", b)
			}
			if l := leftovers(out); len(l) > 0 {
				t.Errorf("left %v", l)
			}
		})
	}
}
