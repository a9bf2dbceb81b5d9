package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestMergeRefusesGoneInput: an input the shards recorded by its absolute
// path and removed or renamed before the merge is refused naming the
// partial file, the input and what to do (restore it or run the shards
// again: the merge takes no input flags, so "check the path" would not
// help). Exit 2, --out not created.
func TestMergeRefusesGoneInput(t *testing.T) {
	s := newSmallStudy(t)
	shards := runShards(t, s, filepath.Join(s.dir, "shards"), 2)
	first := filepath.Join(shards[0], "shard-1-of-2.aspf")

	cases := []struct {
		name    string
		gone    string // renamed away during the merge
		shards  []string
		want    []string
		wantNot []string
	}{
		{"model renamed", s.model, shards,
			[]string{first, s.model, "recorded by the shards, does not exist", "removed or renamed since the shards ran", "restore it", "run the shards again"}, []string{"check the path"}},
		{"region removed", s.region, shards,
			[]string{first, s.region, "removed or renamed since the shards ran"}, []string{"check the path"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if tc.gone != "" {
				if err := os.Rename(tc.gone, tc.gone+".away"); err != nil {
					t.Fatal(err)
				}
				defer os.Rename(tc.gone+".away", tc.gone)
			}
			out := filepath.Join(s.dir, "out-"+strings.ReplaceAll(tc.name, " ", "-"))
			_, se, code := runBin(t, append([]string{"merge", "--quiet", "--out", out}, tc.shards...)...)
			if code != 2 {
				t.Fatalf("exit %d, want 2: %s", code, se)
			}
			for _, w := range tc.want {
				if !strings.Contains(se, w) {
					t.Errorf("message lacks %q: %s", w, se)
				}
			}
			for _, w := range tc.wantNot {
				if strings.Contains(se, w) {
					t.Errorf("message has %q: %s", w, se)
				}
			}
			if _, err := os.Stat(out); err == nil {
				t.Errorf("%s was created", out)
			}
		})
	}
	// The inputs back in place: the same shards merge.
	if _, se, code := runBin(t, append([]string{"merge", "--quiet", "--out", filepath.Join(s.dir, "merged")}, shards...)...); code != 0 {
		t.Fatalf("merge with the inputs restored: exit %d: %s", code, se)
	}
}

// TestMergeRefusesFolderNamedAspf: a sub-folder whose name ends in .aspf,
// in a folder of partial files given to merge, is refused as a folder
// (named, with what to do), not with the system's "is a directory" read
// error; exit 2, --out not created.
func TestMergeRefusesFolderNamedAspf(t *testing.T) {
	s := newSmallStudy(t)
	dir := filepath.Join(s.dir, "shards")
	for i := 1; i <= 2; i++ {
		if _, se, code := runBin(t, s.shardArgs(t, dir, "--shard", fmt.Sprintf("%d/2", i), "--force")...); code != 0 {
			t.Fatalf("shard %d: exit %d: %s", i, code, se)
		}
	}
	sub := filepath.Join(dir, "old.aspf")
	if err := os.Mkdir(sub, 0o755); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(s.dir, "merged")
	_, se, code := runBin(t, "merge", "--quiet", "--out", out, dir)
	if code != 2 {
		t.Fatalf("exit %d, want 2: %s", code, se)
	}
	for _, w := range []string{sub, "is a folder, not a partial file", "move it out of " + dir} {
		if !strings.Contains(se, w) {
			t.Errorf("message lacks %q: %s", w, se)
		}
	}
	if strings.Contains(se, "is a directory") {
		t.Errorf("message has the system's read error: %s", se)
	}
	if _, err := os.Stat(out); err == nil {
		t.Errorf("%s was created", out)
	}
}

// TestShardRefusesPipedInput: the merge reads every input again, so a
// shard refuses, before any work, an occurrence table it could read only
// once: a pipe on a file descriptor (a shell's <(...), /dev/fd/N),
// standard input, and a named pipe (a merge's read would wait for a
// writer). Exit 2, --out not created.
func TestShardRefusesPipedInput(t *testing.T) {
	s := newSmallStudy(t)
	occ, err := os.ReadFile(s.occ)
	if err != nil {
		t.Fatal(err)
	}
	fifo := filepath.Join(s.dir, "fifo.csv")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name, path string
		want       []string
	}{
		{"descriptor", "/dev/fd/3", []string{"/dev/fd/3", "standard input or a pipe", "save it as a file and run the shards with that file"}},
		{"standard input", "/dev/stdin", []string{"/dev/stdin", "standard input or a pipe", "save it as a file"}},
		{"named pipe", fifo, []string{fifo, "is a named pipe", "save it as a file"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			out := filepath.Join(s.dir, "out-"+strings.ReplaceAll(tc.name, " ", "-"))
			args := replaceArg(append(s.shardArgs(t, out), "--shard", "1/2"), s.occ, tc.path)
			// A shard that reads the named pipe would wait for a writer:
			// it is stopped after a minute.
			ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
			defer cancel()
			cmd := exec.CommandContext(ctx, areasweepBin, args...)
			var se bytes.Buffer
			cmd.Stderr = &se
			// The table is written into a pipe given as descriptor 3 and
			// as standard input.
			r, w, err := os.Pipe()
			if err != nil {
				t.Fatal(err)
			}
			cmd.ExtraFiles = []*os.File{r}
			cmd.Stdin = r
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			r.Close()
			w.Write(occ)
			w.Close()
			code := exitCode(cmd.Wait())
			if code != 2 {
				t.Fatalf("shard: exit %d, want 2: %s", code, se.String())
			}
			for _, w := range append(tc.want, "--shard") {
				if !strings.Contains(se.String(), w) {
					t.Errorf("message lacks %q: %s", w, se.String())
				}
			}
			if _, err := os.Stat(out); err == nil {
				t.Errorf("%s was created", out)
			}
		})
	}
}

// TestRunPipedOccurrences: a run reads an occurrence table given as a
// pipe (README: "the occurrence table may be a pipe, such as a shell's
// <(...)") once: results.json records the SHA-256 of the table's bytes
// (computed here with crypto/sha256 from the file), not that of the empty
// rest of the pipe, and the scores are those of the run from the file. A
// named pipe is read once too (a second open waited for a writer
// forever; the run is stopped after a minute).
func TestRunPipedOccurrences(t *testing.T) {
	s := newSmallStudy(t)
	occ, err := os.ReadFile(s.occ)
	if err != nil {
		t.Fatal(err)
	}
	want := fmt.Sprintf("%x", sha256.Sum256(occ))
	plain := filepath.Join(s.dir, "plain")
	if _, se, code := runBin(t, s.args(plain)...); code != 0 {
		t.Fatalf("run from the file: exit %d: %s", code, se)
	}
	scores, _ := os.ReadFile(filepath.Join(plain, "scores.csv"))
	fifo := filepath.Join(s.dir, "fifo.csv")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct{ name, path string }{{"descriptor", "/dev/fd/3"}, {"named pipe", fifo}} {
		t.Run(tc.name, func(t *testing.T) {
			out := filepath.Join(s.dir, "out-"+strings.ReplaceAll(tc.name, " ", "-"))
			args := replaceArg(s.args(out), s.occ, tc.path)
			ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
			defer cancel()
			cmd := exec.CommandContext(ctx, areasweepBin, args...)
			var se bytes.Buffer
			cmd.Stderr = &se
			r, w, err := os.Pipe()
			if err != nil {
				t.Fatal(err)
			}
			if tc.path == fifo {
				r.Close()
				w.Close()
			} else {
				cmd.ExtraFiles = []*os.File{r}
			}
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			done := make(chan struct{})
			if tc.path == fifo {
				// Opening the named pipe for writing waits for the run
				// to open it for reading (or for the open below, once
				// the run has ended).
				go func() {
					defer close(done)
					if f, err := os.OpenFile(fifo, os.O_WRONLY, 0); err == nil {
						f.Write(occ)
						f.Close()
					}
				}()
			} else {
				r.Close()
				w.Write(occ)
				w.Close()
				close(done)
			}
			code := exitCode(cmd.Wait())
			if f, err := os.OpenFile(fifo, os.O_RDONLY|syscall.O_NONBLOCK, 0); err == nil {
				f.Close()
			}
			<-done
			if code != 0 {
				t.Fatalf("exit %d: %s", code, se.String())
			}
			var got string
			for _, in := range loadResults(t, out).Inputs {
				if in.Role == "occurrences" {
					got = in.SHA256
				}
			}
			if got != want {
				t.Errorf("occurrences recorded with SHA-256 %s, want %s (the table's)", got, want)
			}
			if b, _ := os.ReadFile(filepath.Join(out, "scores.csv")); len(scores) == 0 || !bytes.Equal(b, scores) {
				t.Error("scores.csv differs from the run's from the file")
			}
		})
	}
}

// TestMergeRefusesChangedVRTSource: a model given as a virtual raster
// whose source file changed after the shards ran is refused naming the
// VRT, its source and that kind of file among those the merge compares;
// exit 2, --out not created.
func TestMergeRefusesChangedVRTSource(t *testing.T) {
	s := newSmallStudy(t)
	data, err := os.ReadFile(s.model)
	if err != nil {
		t.Fatal(err)
	}
	srcPath := filepath.Join(s.dir, "source.tif")
	os.WriteFile(srcPath, data, 0o644)
	vrt := filepath.Join(s.dir, "virtual.vrt")
	virtualRaster(t, srcPath, vrt)
	shards := runShards(t, s, filepath.Join(s.dir, "shards"), 2, "--model", "v="+vrt)
	// One byte more at the end of the source: another SHA-256, the same
	// raster for GDAL.
	os.WriteFile(srcPath, append(bytes.Clone(data), 0), 0o644)
	out := filepath.Join(s.dir, "merged")
	_, se, code := runBin(t, append([]string{"merge", "--quiet", "--out", out}, shards...)...)
	if code != 2 {
		t.Fatalf("exit %d, want 2: %s", code, se)
	}
	for _, w := range []string{"model:v", vrt, "source.tif", "not those the shards read", "a virtual raster's source", "run the shards again"} {
		if !strings.Contains(se, w) {
			t.Errorf("message lacks %q: %s", w, se)
		}
	}
	if _, err := os.Stat(out); err == nil {
		t.Errorf("%s was created", out)
	}
}

// TestBatchShardPartialFileDamaged: a shard task that finished (its
// completion marker written) but whose partial file was damaged or
// removed since is run again by the next batch, which then merges: the
// merge refused the file on every re-run ("running the same command again
// retries them" did not). The study equals a plain run byte for byte.
func TestBatchShardPartialFileDamaged(t *testing.T) {
	s := sharedStudy(t)
	table := batchTable(t, s)
	out := filepath.Join(t.TempDir(), "sharded")
	for i := 1; i <= 2; i++ {
		if _, se, code := runBin(t, "batch", table, "--out", out, "--shards", "2", "--only", "alpha", "--shard", fmt.Sprint(i)); code != 0 {
			t.Fatalf("shard task %d: exit %d: %s", i, code, se)
		}
	}
	shardFile := func(i int) string {
		return filepath.Join(out, ".areasweep-batch", "shards", "alpha", fmt.Sprint(i), fmt.Sprintf("shard-%d-of-2.aspf", i))
	}
	data, err := os.ReadFile(shardFile(1))
	if err != nil {
		t.Fatal(err)
	}
	data[len(data)/2] ^= 1
	if err := os.WriteFile(shardFile(1), data, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Remove(shardFile(2)); err != nil {
		t.Fatal(err)
	}
	_, se, code := runBin(t, "batch", table, "--out", out, "--shards", "2", "--only", "alpha")
	if code != 0 {
		t.Fatalf("exit %d, want 0: %s", code, se)
	}
	for _, w := range []string{"alpha: shard 1/2 started", "alpha: shard 2/2 started", "alpha: merge of 2 shards finished"} {
		if !strings.Contains(se, w) {
			t.Errorf("stderr lacks %q: %s", w, se)
		}
	}
	plain := plainRun(t, s, "9", "m="+s.model, "sq="+s.model2)
	for _, f := range []string{"results.json", "scores.csv"} {
		want, _ := os.ReadFile(filepath.Join(plain, f))
		got, err := os.ReadFile(filepath.Join(out, "alpha", f))
		if err != nil || len(want) == 0 || !bytes.Equal(got, want) {
			t.Errorf("alpha/%s differs from a plain run (%v)", f, err)
		}
	}
}
