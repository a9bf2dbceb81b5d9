package batchrun

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestSlurmPendingStale: a study finished from another row (here another
// seed) is not submitted again without --force and is named; with
// --force its marker is removed (else the array script would skip the
// task as finished) and its task submitted. Finished studies whose row
// did not change stay finished.
func TestSlurmPendingStale(t *testing.T) {
	s := newSmallStudy(t)
	table := batchTable(t, s)
	out := filepath.Join(t.TempDir(), "runs")
	if err := runBatch(&Options{Table: table, Out: out, Only: []string{"alpha", "beta"}, Quiet: true}); err != nil {
		t.Fatalf("batch: %v", err)
	}
	body, err := os.ReadFile(table)
	if err != nil {
		t.Fatal(err)
	}
	changed := strings.Replace(string(body), "occ.csv,region.geojson,11", "occ.csv,region.geojson,12", 1)
	if changed == string(body) {
		t.Fatal("the test table has no row with seed 11")
	}
	table2 := filepath.Join(filepath.Dir(table), "studies-seed12.csv")
	if err := os.WriteFile(table2, []byte(changed), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, force := range []bool{false, true} {
		pending, stale := slurmPendingOf(t, &Options{Table: table2, Out: out, Shards: 1, Force: force, Slurm: SlurmOptions{Enabled: true, CPUs: 1}})
		// Tasks: 1 alpha (finished, same row), 2 beta (finished, row
		// changed), 3 broken (never finished).
		wantPending, wantStale := []int{3}, []string{"beta"}
		if force {
			wantPending, wantStale = []int{2, 3}, nil
		}
		var ids []string
		for _, s := range stale {
			ids = append(ids, s.st.id)
			if !strings.Contains(s.why.why, "from other settings (the table row changed since it finished: seed 11 then, 12 now)") {
				t.Errorf("force %v: %s stale because %q; want the row named", force, s.st.id, s.why.why)
			}
		}
		if fmt.Sprint(pending) != fmt.Sprint(wantPending) || fmt.Sprint(ids) != fmt.Sprint(wantStale) {
			t.Errorf("force %v: pending %v, stale %v; want %v, %v", force, pending, ids, wantPending, wantStale)
		}
		_, err = os.Stat(filepath.Join(out, "beta", ".areasweep-done"))
		if force == (err == nil) {
			t.Errorf("force %v: beta's marker: %v", force, err)
		}
	}
	if _, err := os.Stat(filepath.Join(out, "alpha", ".areasweep-done")); err != nil {
		t.Errorf("alpha's marker: %v", err)
	}
}

// TestSlurmPendingInputReplaced: which tasks --slurm submits once an
// input file of a finished study was replaced: without --force, not that
// study's (named with the file), with --force its task, its marker
// removed so that the array script does not skip it. A finished study
// whose files did not change is not submitted either way; with --shards,
// the shards of a study whose input changed are submitted again.
func TestSlurmPendingInputReplaced(t *testing.T) {
	dir, table := inputsStudy(t)
	for _, shards := range []int{1, 2} {
		out := filepath.Join(t.TempDir(), "runs")
		if err := runBatch(&Options{Table: table, Out: out, Shards: shards}); err != nil {
			t.Fatalf("shards %d: batch: %v", shards, err)
		}
		occ := filepath.Join(dir, "occ.csv")
		b, _ := os.ReadFile(occ)
		if err := os.WriteFile(occ, append(b, "13.6,43.1,test\n"...), 0o644); err != nil {
			t.Fatal(err)
		}
		for _, force := range []bool{false, true} {
			pending, stale := slurmPendingOf(t, &Options{Table: table, Out: out, Shards: shards, Force: force, Slurm: SlurmOptions{Enabled: true, CPUs: 1}})
			// Tasks: a's (occ.csv replaced), then b's (unchanged).
			wantPending, wantStale := []int{1}, "[a]"
			if shards == 2 {
				wantPending = []int{1, 2}
			}
			if !force {
				wantPending = nil
			}
			var ids []string
			for _, s := range stale {
				ids = append(ids, s.st.id)
				if !strings.Contains(s.why.why, "the occurrences file "+occ+" holds other content") {
					t.Errorf("shards %d: a stale because %q; want occ.csv named", shards, s.why.why)
				}
			}
			if force {
				wantStale = "[]"
			}
			if fmt.Sprint(pending) != fmt.Sprint(wantPending) || fmt.Sprint(ids) != wantStale {
				t.Errorf("shards %d, force %v: pending %v, stale %v; want %v, %s", shards, force, pending, ids, wantPending, wantStale)
			}
			_, err := os.Stat(filepath.Join(out, "a", ".areasweep-done"))
			if force == (err == nil) {
				t.Errorf("shards %d, force %v: a's marker: %v", shards, force, err)
			}
		}
		if _, err := os.Stat(filepath.Join(out, "b", ".areasweep-done")); err != nil {
			t.Errorf("shards %d: b's marker: %v", shards, err)
		}
		if err := os.WriteFile(occ, b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// slurmPendingOf resolves the batch of o and returns the tasks --slurm
// would submit and the studies it finds stale (slurmPending).
func slurmPendingOf(t *testing.T, o *Options) ([]int, []staleStudy) {
	t.Helper()
	studies, err := resolve(o)
	if err != nil {
		t.Fatal(err)
	}
	p, err := slurmPlan(o, studies)
	if err != nil {
		t.Fatal(err)
	}
	pending, stale, err := slurmPending(o, p, studies)
	if err != nil {
		t.Fatal(err)
	}
	return pending, stale
}
