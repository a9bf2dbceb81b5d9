package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"

	"areasweep/cmd/internal/batch"
	"areasweep/cmd/internal/smallstudy"
)

// inputsStudy copies the shared small study's model, region and
// occurrences into a folder of the test's own (the test changes them),
// with a second copy of the occurrences for a study the changes must not
// touch and an .aux.xml beside the model (a sidecar file the run records
// with it), and writes a table of two studies on them: "a" (occ.csv) and
// "b" (occ_b.csv). It returns the folder and the table's path.
func inputsStudy(t *testing.T) (dir, table string) {
	t.Helper()
	s := sharedStudy(t)
	dir = t.TempDir()
	return dir, smallstudy.Inputs(t, dir, s.model, s.region, s.occ)
}

// laterTime sets path's modification time an hour ahead, so that a
// rewrite within the file system's time resolution is still seen.
func laterTime(t *testing.T, path string) {
	t.Helper()
	later := time.Now().Add(time.Hour)
	if err := os.Chtimes(path, later, later); err != nil {
		t.Fatal(err)
	}
}

// TestBatchInputReplaced: a finished study one of whose input files is
// replaced under the same path. Touched only: still finished, skipped,
// and its marker takes the new time. Other content: named with the file,
// not run again, listed as failed in the summary, exit 1 as for a
// changed row; with --force: run again, other results. A sidecar file
// removed: named as removed; restored with the same bytes: finished
// again. A sidecar added: named as added. A named input removed: the table check refuses it (exit 2). A
// marker without input lines (an older areasweep's): finished, as before.
func TestBatchInputReplaced(t *testing.T) {
	dir, table := inputsStudy(t)
	out := filepath.Join(t.TempDir(), "runs")
	occ := filepath.Join(dir, "occ.csv")
	batchOK := func(what string, args ...string) string {
		t.Helper()
		_, se, code := runBin(t, append([]string{"batch", table, "--out", out}, args...)...)
		if code != 0 {
			t.Fatalf("%s: exit %d, want 0: %s", what, code, se)
		}
		return se
	}
	batchOK("first run")
	m, err := batch.ReadMarker(filepath.Join(out, "a"))
	if err != nil {
		t.Fatal(err)
	}
	files, err := m.Inputs()
	if err != nil {
		t.Fatal(err)
	}
	var roles []string
	for _, f := range files {
		roles = append(roles, f.Role+" "+filepath.Base(f.Path))
	}
	if want := []string{"model:m model.tif", "model:m model.tif.aux.xml", "occurrences occ.csv", "region region.geojson"}; !slices.Equal(roles, want) {
		t.Fatalf("marker records %v, want %v", roles, want)
	}
	// The checksums are the run's own, those results.json records.
	var want []string
	for _, in := range loadResults(t, filepath.Join(out, "a")).Inputs {
		want = append(want, in.Path+" "+in.SHA256)
		for _, sc := range in.Sidecars {
			want = append(want, sc.Path+" "+sc.SHA256)
		}
	}
	var got []string
	for _, f := range files {
		got = append(got, f.Path+" "+f.SHA256)
	}
	if !slices.Equal(got, want) {
		t.Errorf("marker records %v, results.json's inputs %v", got, want)
	}
	results := filepath.Join(out, "a", "results.json")
	first, err := os.ReadFile(results)
	if err != nil {
		t.Fatal(err)
	}

	// Touched: the same bytes, a new time.
	laterTime(t, occ)
	se := batchOK("after touch")
	if !strings.Contains(se, "a: already finished, skipped") {
		t.Errorf("after touch: a not skipped as finished: %s", se)
	}
	st, _ := os.Stat(occ)
	m, _ = batch.ReadMarker(filepath.Join(out, "a"))
	files, _ = m.Inputs()
	if files[2].ModTime != st.ModTime().UnixNano() {
		t.Errorf("after touch: the marker records time %d for occ.csv, the file has %d (the next rerun would hash it again)", files[2].ModTime, st.ModTime().UnixNano())
	}

	// Other content: the last test point removed.
	b, _ := os.ReadFile(occ)
	lines := strings.SplitAfter(strings.TrimSuffix(string(b), "\n"), "\n")
	if err := os.WriteFile(occ, []byte(strings.Join(lines[:len(lines)-1], "")), 0o644); err != nil {
		t.Fatal(err)
	}
	laterTime(t, occ)
	_, se, code := runBin(t, "batch", table, "--out", out)
	if code != 1 {
		t.Fatalf("occ.csv replaced: exit %d, want 1 (as for a changed row): %s", code, se)
	}
	for _, want := range []string{"b: already finished, skipped", "1 of 2 studies failed: a",
		"a: " + filepath.Join(out, "a") + " was made from other inputs (since it finished, the occurrences file " + occ + " holds other content (SHA-256 ", "add --force to run it again, or restore the file", "--force runs it again (it was made from other settings or inputs, its results changed since, or its completion marker is damaged)"} {
		if !strings.Contains(se, want) {
			t.Errorf("occ.csv replaced: stderr lacks %q:\n%s", want, se)
		}
	}
	if got, _ := os.ReadFile(results); !bytes.Equal(got, first) {
		t.Error("occ.csv replaced: a's results.json changed without --force")
	}
	rows := readSummary(t, out)
	if len(rows) != 2 || rows[0]["study"] != "a" || rows[0]["status"] != "failed" || !strings.Contains(rows[0]["error"], occ) || rows[1]["status"] != "ok" {
		t.Errorf("occ.csv replaced: summary rows %v; want a failed naming %s, b ok", rows, occ)
	}

	// --force: a runs again from the new file.
	se = batchOK("--force", "--force")
	if !strings.Contains(se, "a: started") || !strings.Contains(se, "b: already finished, skipped") {
		t.Errorf("--force: stderr %s", se)
	}
	second, _ := os.ReadFile(results)
	if bytes.Equal(second, first) {
		t.Error("--force: a's results.json is the old one")
	}
	if se := batchOK("after --force"); !strings.Contains(se, "a: already finished, skipped") {
		t.Errorf("after --force: a not finished: %s", se)
	}

	// A sidecar removed, then put back with the same bytes.
	aux := filepath.Join(dir, "model.tif.aux.xml")
	auxBytes, _ := os.ReadFile(aux)
	os.Remove(aux)
	_, se, code = runBin(t, "batch", table, "--out", out)
	if code != 1 || !strings.Contains(se, "the model m file "+aux+" was removed") || !strings.Contains(se, "2 of 2 studies failed") {
		t.Errorf("sidecar removed: exit %d, want 1 naming %s as removed for both studies: %s", code, aux, se)
	}
	if err := os.WriteFile(aux, auxBytes, 0o644); err != nil {
		t.Fatal(err)
	}
	laterTime(t, aux)
	batchOK("sidecar restored")

	// A sidecar replaced by a folder of its name (a read would fail):
	// stale, named, no package names in the summary's error column.
	os.Remove(aux)
	if err := os.Mkdir(aux, 0o755); err != nil {
		t.Fatal(err)
	}
	_, se, code = runBin(t, "batch", table, "--out", out)
	if code != 1 || !strings.Contains(se, "the model m file "+aux+" is no longer a file") {
		t.Errorf("sidecar replaced by a folder: exit %d, want 1 naming %s: %s", code, aux, se)
	}
	for _, r := range readSummary(t, out) {
		if !strings.Contains(r["error"], aux+" is no longer a file") || strings.Contains(r["error"], "batch: ") {
			t.Errorf("sidecar replaced by a folder: summary error %q, want it naming %s without package names", r["error"], aux)
		}
	}
	os.Remove(aux)
	if err := os.WriteFile(aux, auxBytes, 0o644); err != nil {
		t.Fatal(err)
	}
	laterTime(t, aux)
	batchOK("sidecar restored after the folder")

	// A sidecar added: a world file beside the model.
	tfw := filepath.Join(dir, "model.tfw")
	if err := os.WriteFile(tfw, []byte("0.25\n0\n0\n-0.25\n10.125\n47.875\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	_, se, code = runBin(t, "batch", table, "--out", out)
	if code != 1 || !strings.Contains(se, "the model m file "+tfw+" was added") || !strings.Contains(se, "or remove the file again") {
		t.Errorf("sidecar added: exit %d, want 1 naming %s as added: %s", code, tfw, se)
	}
	os.Remove(tfw)
	batchOK("added sidecar removed")

	// A named input removed: its study fails without running (the
	// others run), exit 1.
	os.Rename(occ, occ+".away")
	_, se, code = runBin(t, "batch", table, "--out", out)
	if code != 1 || !strings.Contains(se, occ+" does not exist") {
		t.Errorf("occ.csv removed: exit %d, want 1 naming it: %s", code, se)
	}
	os.Rename(occ+".away", occ)

	// A marker without input lines: the settings alone are compared.
	m, _ = batch.ReadMarker(filepath.Join(out, "a"))
	m.SetInputs(nil)
	if err := batch.WriteMarker(filepath.Join(out, "a"), m); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(occ, b, 0o644); err != nil {
		t.Fatal(err)
	}
	laterTime(t, occ)
	if se := batchOK("older marker"); !strings.Contains(se, "a: already finished, skipped") {
		t.Errorf("older marker: a not skipped: %s", se)
	}
}

// TestBatchInputReplacedShards: with --shards, the shards' markers record
// the inputs too: after an input is replaced, --force runs the shards
// again (not only the merge, which would refuse shards made from the old
// file) and the merged results are those of a plain run on the new file.
func TestBatchInputReplacedShards(t *testing.T) {
	dir, table := inputsStudy(t)
	out := filepath.Join(t.TempDir(), "runs")
	occ := filepath.Join(dir, "occ.csv")
	if _, se, code := runBin(t, "batch", table, "--out", out, "--only", "a", "--shards", "2"); code != 0 {
		t.Fatalf("first run: exit %d: %s", code, se)
	}
	b, _ := os.ReadFile(occ)
	if err := os.WriteFile(occ, bytes.Replace(b, []byte("10.6,47.6,test\n"), nil, 1), 0o644); err != nil {
		t.Fatal(err)
	}
	laterTime(t, occ)
	_, se, code := runBin(t, "batch", table, "--out", out, "--only", "a", "--shards", "2", "--force")
	if code != 0 {
		t.Fatalf("--force: exit %d: %s", code, se)
	}
	for k := 1; k <= 2; k++ {
		if want := fmt.Sprintf("a: shard %d/2 started", k); !strings.Contains(se, want) {
			t.Errorf("--force: stderr lacks %q: %s", want, se)
		}
	}
	plain := filepath.Join(t.TempDir(), "plain")
	args := []string{"run", "--model", "m=" + filepath.Join(dir, "model.tif"), "--occurrences", occ, "--region", filepath.Join(dir, "region.geojson"),
		"--region-buffers", "60", "--point-buffers", "40", "--hull-buffers", "0", "--e", "0.05", "--iterations", "30", "--quiet", "--out", plain}
	if _, se, code := runBin(t, args...); code != 0 {
		t.Fatalf("plain run: exit %d: %s", code, se)
	}
	want, _ := os.ReadFile(filepath.Join(plain, "results.json"))
	got, _ := os.ReadFile(filepath.Join(out, "a", "results.json"))
	if len(want) == 0 || !bytes.Equal(got, want) {
		t.Error("after --force with shards: a's results.json differs from a plain run on the new occ.csv")
	}
}

// TestBatchResultsChanged: a finished study whose results.json is no
// longer the one it wrote (another run wrote into its folder with
// --force, or the file was edited) is named and not taken into the
// summary as the study's, exit 1 as for a changed row; --force runs it
// again. It was skipped, and the summary read the other run's results.
func TestBatchResultsChanged(t *testing.T) {
	_, table := inputsStudy(t)
	out := filepath.Join(t.TempDir(), "runs")
	if _, se, code := runBin(t, "batch", table, "--out", out); code != 0 {
		t.Fatalf("first run: exit %d: %s", code, se)
	}
	res := filepath.Join(out, "a", "results.json")
	b, err := os.ReadFile(res)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(res, append(b, '\n'), 0o644); err != nil {
		t.Fatal(err)
	}
	_, se, code := runBin(t, "batch", table, "--out", out)
	if code != 1 {
		t.Fatalf("exit %d, want 1: %s", code, se)
	}
	for _, want := range []string{filepath.Join(out, "a") + " was made by a run whose results.json has changed since it finished", "add --force to run it again, or remove the folder", "its results changed since"} {
		if !strings.Contains(se, want) {
			t.Errorf("stderr does not say %q: %s", want, se)
		}
	}
	if strings.Contains(se, filepath.Join(out, "b")+" was made") {
		t.Errorf("study b, untouched, is named: %s", se)
	}
	if _, se, code := runBin(t, "batch", table, "--out", out, "--force"); code != 0 {
		t.Fatalf("--force: exit %d: %s", code, se)
	}
	if after, err := os.ReadFile(res); err != nil || bytes.Equal(after, append(b, '\n')) {
		t.Errorf("--force left the edited results.json (%v)", err)
	}
}
