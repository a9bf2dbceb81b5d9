package batchrun

import (
	"context"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestBatchOutRefusedBeforeAnything: an --out whose path holds a line
// break made the folder, ran every study (each refused its own folder
// inside it, exit 1) and wrote the summary into it; with --slurm it, or
// a tab, ended as "slurm: bad job plan ... this is a bug in areasweep"
// (exit 3) after --out was made, and a backslash wrote job scripts
// whose logs sbatch would write nowhere (found by the batch audit of
// 2026-12-05). Each is now refused before anything is made (exit 2).
func TestBatchOutRefusedBeforeAnything(t *testing.T) {
	for _, tc := range []struct {
		name, out string
		slurm     bool
		want      string
	}{
		{"line break", "runs\nold", false, "the path holds a line break"},
		{"line break, slurm", "runs\nold", true, "the path holds a line break"},
		{"tab, slurm", "runs\told", true, "--out runs\told: with --slurm its path cannot hold a tab or a backslash"},
		{"backslash, slurm", `runs\old`, true, `--out runs\old: with --slurm its path cannot hold a tab or a backslash`},
		// The root folder: the table check said each input lay in
		// the batch's --out (helper probe, 2026-12-05).
		{"the root folder", "/", false, "--out / is the root folder"},
		{"the root folder by another name", "/tmp/..", false, "--out /tmp/.. is the root folder"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Chdir(t.TempDir())
			o := &Options{Out: tc.out, Table: "studies.csv"}
			o.Slurm.Enabled = tc.slurm
			err := preflight(o)
			if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("got %v, want a bad input with %q", err, tc.want)
			}
			if ents, _ := os.ReadDir("."); len(ents) > 0 {
				t.Errorf("made %s", filepath.Join(".", ents[0].Name()))
			}
		})
	}
	// A tab or a backslash is a folder name like any other for a local
	// batch (only sbatch's log path cannot hold them).
	t.Chdir(t.TempDir())
	if err := preflight(&Options{Out: `runs\old` + "\tx"}); err != nil && strings.Contains(err.Error(), "--out") {
		t.Errorf("a local batch refused --out: %v", err)
	}
}

// TestStudyFolderTooLongRefusedFirst: a study whose folder, --out/<id>,
// has a path too long for the GeoPackages written in it ran only after
// every other study, then failed (exit 1) advising "choose an --out with
// a path 37 bytes shorter" (found by the batch audit of 2026-12-05: a
// 64-character id under a 420-byte --out). It is now a problem of the
// table, at the study's line and id, before anything runs.
func TestStudyFolderTooLongRefusedFirst(t *testing.T) {
	s := newSmallStudy(t)
	table := filepath.Join(s.Dir, "long.csv")
	id := strings.Repeat("a", 64)
	writeFile(t, table, "# iterations: 30\nid,model,occurrences,region\n"+
		id+",m=model.tif,occ.csv,region.geojson\nb,m=model.tif,occ.csv,region.geojson\n")
	// --out of 420 bytes: study b's GeoPackages stay under SQLite's 504
	// bytes (about 483), the 64-character id's pass them by 63 more.
	base := filepath.Join(t.TempDir(), strings.Repeat("x", 200))
	out := filepath.Join(base, strings.Repeat("y", 420-len(base)-1))
	got, err := resolveProblems(t, &Options{Table: table, Out: out})
	if want := id + "/id"; strings.Join(got, " ") != want {
		t.Fatalf("problems %v, want %s\n%v", got, want, err)
	}
	if want := "its path is too long for the GeoPackage files written in it"; !strings.Contains(err.Error(), want) || !strings.Contains(err.Error(), "shorten --out or the id") {
		t.Errorf("message lacks %q and what to shorten:\n%v", want, err)
	}
}

// TestSlurmTableFromPipeRefused: with --slurm every array task reads the
// study table again by the path given, so a table given as a pipe or as
// standard input (<(...), /dev/stdin) gave tasks that read nothing; it
// is refused before anything is made (found by the batch audit of
// 2026-12-05).
func TestSlurmTableFromPipeRefused(t *testing.T) {
	t.Chdir(t.TempDir())
	o := &Options{Out: "runs", Table: "/dev/stdin"}
	o.Slurm.Enabled = true
	err := preflight(o)
	if want := "study table /dev/stdin is a pipe or standard input"; err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), want) {
		t.Fatalf("got %v, want a bad input with %q", err, want)
	}
	if ents, _ := os.ReadDir("."); len(ents) > 0 {
		t.Errorf("made %s", ents[0].Name())
	}
	o.Slurm.Enabled = false
	if err := preflight(o); err != nil && strings.Contains(err.Error(), "pipe") {
		t.Errorf("a local batch refused a table from a pipe: %v", err)
	}
}

// TestSlurmPlanWriteFailureNotABug: a job file that could not be written
// (a full disk or quota on the cluster's scratch, a folder in its place)
// was reported as "this is a bug in areasweep" (exit 3; found by the
// batch audit of 2026-12-05). It is an outside failure (exit 1) naming
// the file, with what to do.
func TestSlurmPlanWriteFailureNotABug(t *testing.T) {
	s := newSmallStudy(t)
	table := batchTable(t, s)
	out := filepath.Join(t.TempDir(), "runs")
	if err := os.MkdirAll(filepath.Join(out, OwnDir, "slurm", "manifest.tsv"), 0o755); err != nil {
		t.Fatal(err)
	}
	o := &Options{Table: table, Out: out, Jobs: 1, Shards: 1, Slurm: SlurmOptions{Enabled: true, CPUs: 1}}
	err := Run(context.Background(), o, IO{Out: io.Discard, ErrOut: io.Discard})
	want := "writing the SLURM job files into " + filepath.Join(out, OwnDir, "slurm") + " failed"
	if err == nil || fault.IsInternal(err) || fault.IsBadInput(err) || !strings.Contains(err.Error(), want) {
		t.Fatalf("got %v (internal %v), want an outside failure with %q", err, fault.IsInternal(err), want)
	}
}
