package outdir

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestFileWhereFolderGoes: a file named figures (or, for the demo,
// inputs) in --out is refused with --force, naming it as a file where a
// folder goes (the message used to say that --out itself is replaced as
// a whole), and is kept.
func TestFileWhereFolderGoes(t *testing.T) {
	for _, name := range []string{"figures", "inputs"} {
		out := filepath.Join(t.TempDir(), "out")
		os.MkdirAll(out, 0o755)
		p := filepath.Join(out, name)
		os.WriteFile(p, []byte("mine"), 0o644)
		open := func() (*Dir, error) { return Open(out, true, nil) }
		if name == "inputs" {
			open = func() (*Dir, error) { return OpenDemo(out, true, []string{"study.yaml"}) }
		}
		d, err := open()
		if err == nil {
			d.Abort()
			t.Fatalf("%s: accepted", name)
		}
		if !fault.IsBadInput(err) || !strings.Contains(err.Error(), p+", a file where areasweep writes a folder of that name") || strings.Contains(err.Error(), "replaces as a whole") {
			t.Errorf("%s: %v", name, err)
		}
		if b, err := os.ReadFile(p); err != nil || string(b) != "mine" {
			t.Errorf("%s: the file: %q, %v", name, b, err)
		}
	}
}

// TestOpenDanglingLink: an --out that is, or lies under, a symbolic link
// whose target does not exist is refused at the start (exit 2), naming
// the link and its target, and the link is kept. It used to be accepted:
// the whole sweep ran, then moving the results onto the link failed with
// "not a directory" (exit 1); under it, "cannot create ... (file exists)".
func TestOpenDanglingLink(t *testing.T) {
	dir := t.TempDir()
	link := filepath.Join(dir, "out")
	target := filepath.Join(dir, "nowhere")
	if err := os.Symlink(target, link); err != nil {
		t.Fatal(err)
	}
	for _, out := range []string{link, filepath.Join(link, "sub")} {
		d, err := Open(out, true, nil)
		if err == nil {
			d.Abort()
			t.Fatalf("%s: accepted", out)
		}
		if !fault.IsBadInput(err) || !strings.Contains(err.Error(), link+" on its path is a symbolic link to "+target+", which does not exist") {
			t.Errorf("%s: %v", out, err)
		}
		if got, err := os.Readlink(link); err != nil || got != target {
			t.Errorf("%s: the link: %q, %v", out, got, err)
		}
		if entries, _ := os.ReadDir(dir); len(entries) != 1 {
			t.Errorf("%s: %d entries left in %s, want the link alone", out, len(entries), dir)
		}
	}
}

// TestOpenInputNamedByLinkInOut: an input named by a symbolic link inside
// --out (out/results.json -> ../model.tif) is an input in --out, refused
// whatever --force says, like the file itself there. Only the link's
// target was compared, which lies outside, so the run was accepted and
// --force deleted the link the command line named, as an output of that
// name.
func TestOpenInputNamedByLinkInOut(t *testing.T) {
	for _, name := range []string{"results.json", "scores.csv", "notes.tif"} {
		dir := t.TempDir()
		model := filepath.Join(dir, "model.tif")
		os.WriteFile(model, []byte("model"), 0o644)
		out := filepath.Join(dir, "out")
		os.MkdirAll(out, 0o755)
		link := filepath.Join(out, name)
		if err := os.Symlink("../model.tif", link); err != nil {
			t.Fatal(err)
		}
		d, err := Open(out, true, []string{link})
		if err == nil {
			d.Abort()
			t.Fatalf("%s: accepted", name)
		}
		if !fault.IsBadInput(err) || !strings.Contains(err.Error(), "holds the input "+link) {
			t.Errorf("%s: %v", name, err)
		}
		if got, err := os.Readlink(link); err != nil || got != "../model.tif" {
			t.Errorf("%s: the link: %q, %v", name, got, err)
		}
	}
}

// TestBatchFolderRefused: a batch's --out (it holds BatchOwnDir) is
// refused as the --out of one run, extents, shard, merge or demo, with
// --force or not (a run --force wrote its results among the batch's
// study folders and summary), naming the marker folder, and nothing in
// it changes.
func TestBatchFolderRefused(t *testing.T) {
	out := filepath.Join(t.TempDir(), "batch")
	os.MkdirAll(filepath.Join(out, BatchOwnDir), 0o755)
	os.MkdirAll(filepath.Join(out, "sp1"), 0o755)
	os.WriteFile(filepath.Join(out, "summary.csv"), []byte("id\n"), 0o644)
	before, _ := os.ReadDir(out)
	opens := map[string]func() (*Dir, error){
		"run":          func() (*Dir, error) { return Open(out, false, nil) },
		"run --force":  func() (*Dir, error) { return Open(out, true, nil) },
		"shard":        func() (*Dir, error) { return OpenShard(out, true, nil, nil) },
		"demo --force": func() (*Dir, error) { return OpenDemo(out, true, []string{"study.yaml"}) },
		"merge --force": func() (*Dir, error) {
			return nil, Check(out, true, nil, nil)
		},
	}
	for name, open := range opens {
		d, err := open()
		if err == nil {
			if d != nil {
				d.Abort()
			}
			t.Errorf("%s: accepted", name)
			continue
		}
		if !fault.IsBadInput(err) || !strings.Contains(err.Error(), "is a batch's folder (it holds "+filepath.Join(out, BatchOwnDir)) {
			t.Errorf("%s: %v", name, err)
		}
	}
	after, _ := os.ReadDir(out)
	if len(after) != len(before) {
		t.Errorf("entries %v, want %v", after, before)
	}
}
