package main

import (
	"bytes"
	"crypto/sha256"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/report"
)

// shardArgs are the small study's run arguments with a raster null whose
// no-data cells differ from the first model's (holes where the model has
// data, data in the model's no-data corner), so that every kind of pass
// (models, a raster null, the distance-only null) is split and the clip to
// the first model's valid cells matters for a later pass.
func (s *smallStudy) shardArgs(t *testing.T, out string, extra ...string) []string {
	t.Helper()
	holes := filepath.Join(s.dir, "holes.tif")
	if _, err := os.Stat(holes); err != nil {
		v := make([]float64, len(s.vals))
		for i := range v {
			r, c := i/s.w, i%s.w
			switch {
			case c >= 44 && r >= 28:
				v[i] = float64(float32(0.01 * float64(c-r)))
			case r >= 9 && r < 14 && c >= 20 && c < 31:
				v[i] = math.NaN()
			default:
				v[i] = float64(float32(1 - s.vals[i]))
			}
		}
		writeRaster(t, holes, s.w, s.h, s.gt, v, true)
	}
	return s.args(out, append([]string{"--null", "holes=" + holes}, extra...)...)
}

// runShards runs shards 1..n of the small study (shardArgs) into
// dir/shard-i: see runShardsOf.
func runShards(t *testing.T, s *smallStudy, dir string, n int, extra ...string) []string {
	t.Helper()
	return runShardsOf(t, dir, n, func(out string, more ...string) []string {
		return s.shardArgs(t, out, append(more, extra...)...)
	})
}

// runShardsOf runs shards 1..n of the run whose arguments args gives for an
// output folder (and extra flags), shard i into dir/shard-i with --workers
// 1 for odd i and 2 for even i, checks each wrote its partial file, and
// returns the folders.
func runShardsOf(t *testing.T, dir string, n int, args func(out string, extra ...string) []string) []string {
	t.Helper()
	var outs []string
	for i := 1; i <= n; i++ {
		out := filepath.Join(dir, fmt.Sprintf("shard-%d", i))
		if _, se, code := runBin(t, args(out, "--shard", fmt.Sprintf("%d/%d", i, n), "--workers", fmt.Sprint(2-i%2))...); code != 0 {
			t.Fatalf("shard %d/%d: exit %d: %s", i, n, code, se)
		}
		if _, err := os.Stat(filepath.Join(out, fmt.Sprintf("shard-%d-of-%d.aspf", i, n))); err != nil {
			t.Fatalf("shard %d/%d wrote no partial file: %v", i, n, err)
		}
		outs = append(outs, out)
	}
	return outs
}

// mergeShuffled merges the shards whose folders outs holds (shard i in
// outs[i-1]) into merged, giving them in the order order (a permutation of
// 0..len(outs)-1), shard 1 by its partial file and the others by folder.
func mergeShuffled(t *testing.T, outs []string, order []int, merged string) {
	t.Helper()
	n := len(outs)
	args := []string{"merge", "--out", merged}
	for _, i := range order {
		if i == 0 {
			args = append(args, filepath.Join(outs[i], fmt.Sprintf("shard-1-of-%d.aspf", n)))
		} else {
			args = append(args, outs[i])
		}
	}
	_, se, code := runBin(t, args...)
	if code != 0 {
		t.Fatalf("N=%d: merge: exit %d: %s", n, code, se)
	}
	// Its last line on standard error is the answer, as a run's is.
	lines := strings.Split(strings.TrimSuffix(se, "\n"), "\n")
	if res := loadResults(t, merged); res.Sensitivity != nil && lines[len(lines)-1] != "answer: "+res.Sensitivity.Headline {
		t.Errorf("N=%d: the merge's last line on standard error is %q, want the headline after \"answer: \"", n, lines[len(lines)-1])
	}
}

// comparedOutputs lists the outputs of the run in folder dir that a run
// with other workers or a merge of shards must write byte for byte the
// same: results.json, scores.csv, the report, methods, the extents and
// their raster (the runs that call it write it), omitted points and every
// figure.
func comparedOutputs(t *testing.T, dir string) []string {
	t.Helper()
	same := []string{"results.json", "scores.csv", "report.html", "methods.md", "extents.gpkg", "extents.tif", "omitted_points.gpkg"}
	figs, _ := filepath.Glob(filepath.Join(dir, "figures", "*"))
	if len(figs) == 0 {
		t.Fatalf("the run in %s wrote no figure", dir)
	}
	for _, f := range figs {
		same = append(same, filepath.Join("figures", filepath.Base(f)))
	}
	return same
}

// sameOutputs reports each file of files that differs between folders a
// (the single run's) and b (what names b's run in the message).
func sameOutputs(t *testing.T, a, b string, files []string, what string) {
	t.Helper()
	for _, f := range files {
		x, err1 := os.ReadFile(filepath.Join(a, f))
		y, err2 := os.ReadFile(filepath.Join(b, f))
		if err1 != nil || err2 != nil {
			t.Fatalf("%s: %s: %v %v", what, f, err1, err2)
		}
		if !bytes.Equal(x, y) {
			t.Errorf("%s: %s differs from the single run's", what, f)
		}
	}
}

// TestShardsMergeToSingleRun: the small study split into N = 1, 2, 3 and 7
// shards of grid rows (7 shards of 32 rows cut inside the 16 x 16 raster
// tiles and the null's blocks), each shard run with 1 or 2 workers,
// merges into exactly the single run's results.json and scores.csv, and
// the same report, figures, extents and omitted points.
func TestShardsMergeToSingleRun(t *testing.T) {
	s := newSmallStudy(t)
	single := filepath.Join(s.dir, "single")
	if _, se, code := runBin(t, s.shardArgs(t, single)...); code != 0 {
		t.Fatalf("single run: exit %d: %s", code, se)
	}
	same := comparedOutputs(t, single)
	for _, n := range []int{1, 2, 3, 7} {
		dir := filepath.Join(s.dir, fmt.Sprintf("n%d", n))
		outs := runShards(t, s, dir, n)
		merged := filepath.Join(dir, "merged")
		// Folders and a file, in a shuffled order.
		var order []int
		for i := n - 1; i >= 0; i-- {
			order = append(order, i)
		}
		mergeShuffled(t, outs, order, merged)
		sameOutputs(t, single, merged, same, fmt.Sprintf("N=%d: the merge", n))
	}
}

// TestDemoShardsMergeToSingleRun: the demo's study (a latitude-longitude
// grid of 240 rows, so the distance-only null takes the bounded path) split
// into 3 shards of 80 rows, cut inside the null's 240-row blocks and its
// 15-row super-tiles, merges into exactly the single run's results.json and
// scores.csv: the sorting-bias tally must see the same value per cell in a
// shard as in the single run, although a shard's blocks and family differ.
func TestDemoShardsMergeToSingleRun(t *testing.T) {
	dir := t.TempDir()
	demo := exec.Command(areasweepBin, "demo", "--out", "demo", "--quiet")
	demo.Dir = dir
	if out, err := demo.CombinedOutput(); err != nil {
		t.Fatalf("demo: %v\n%s", err, out)
	}
	study := filepath.Join(dir, "demo", "inputs", "study.yaml")
	single := filepath.Join(dir, "single")
	if _, se, code := runBin(t, "run", "--quiet", "--study", study, "--out", single); code != 0 {
		t.Fatalf("single run: exit %d: %s", code, se)
	}
	const n = 3
	args := []string{"merge", "--quiet", "--out", filepath.Join(dir, "merged")}
	for i := 1; i <= n; i++ {
		out := filepath.Join(dir, fmt.Sprintf("shard-%d", i))
		if _, se, code := runBin(t, "run", "--quiet", "--study", study, "--out", out, "--shard", fmt.Sprintf("%d/%d", i, n), "--workers", fmt.Sprint(2-i%2)); code != 0 {
			t.Fatalf("shard %d/%d: exit %d: %s", i, n, code, se)
		}
		args = append(args, out)
	}
	if _, se, code := runBin(t, args...); code != 0 {
		t.Fatalf("merge: exit %d: %s", code, se)
	}
	for _, f := range []string{"results.json", "scores.csv"} {
		a, err1 := os.ReadFile(filepath.Join(single, f))
		b, err2 := os.ReadFile(filepath.Join(dir, "merged", f))
		if err1 != nil || err2 != nil {
			t.Fatalf("%s: %v %v", f, err1, err2)
		}
		if !bytes.Equal(a, b) {
			t.Errorf("%s of the merged demo shards differs from the single run's", f)
		}
	}
}

// TestMergeRefuses: a merge of a bad set of partial files exits 2, names
// the file or files at fault and the reason, and writes nothing.
func TestMergeRefuses(t *testing.T) {
	s := newSmallStudy(t)
	two := runShards(t, s, filepath.Join(s.dir, "two"), 2)
	otherSeed := runShards(t, s, filepath.Join(s.dir, "seed"), 2, "--seed", "10")
	otherSettings := runShards(t, s, filepath.Join(s.dir, "settings"), 2, "--iterations", "60", "--tolerance-auc", "0.03")
	// Shard 2 of a run whose occurrences differ by one line.
	occ2 := filepath.Join(s.dir, "occ2.csv")
	b, _ := os.ReadFile(s.occ)
	os.WriteFile(occ2, append(bytes.Clone(b), []byte("13.3,43.3,test\n")...), 0o644)
	other := *s
	other.occ = occ2
	otherInput := runShards(t, &other, filepath.Join(s.dir, "input"), 2)
	file := func(dir string, i, n int) string { return filepath.Join(dir, fmt.Sprintf("shard-%d-of-%d.aspf", i, n)) }
	dup := filepath.Join(s.dir, "dup")
	os.MkdirAll(dup, 0o755)
	data, _ := os.ReadFile(file(two[0], 1, 2))
	os.WriteFile(filepath.Join(dup, "copy.aspf"), data, 0o644)
	corrupt := filepath.Join(s.dir, "corrupt.aspf")
	c := bytes.Clone(data)
	c[len(c)/2] ^= 1
	os.WriteFile(corrupt, c, 0o644)
	cut := filepath.Join(s.dir, "cut.aspf")
	os.WriteFile(cut, data[:len(data)/3], 0o644)
	empty := filepath.Join(s.dir, "empty.aspf")
	os.WriteFile(empty, nil, 0o644)
	notShard := filepath.Join(s.dir, "results.aspf")
	os.WriteFile(notShard, []byte(`{"schema_version": 1}`), 0o644)
	cases := []struct {
		name  string
		files []string
		want  []string
	}{
		{"mixed seeds", []string{two[0], otherSeed[1]}, []string{"seed (9 vs 10)", file(two[0], 1, 2), file(otherSeed[1], 2, 2)}},
		{"other settings", []string{two[0], otherSettings[1]}, []string{"differ in settings (iterations 50 vs 60, tolerance-auc 0.02 vs 0.03)", file(otherSettings[1], 2, 2)}},
		{"changed input", []string{two[0], otherInput[1]}, []string{"occurrences", "checksum", file(otherInput[1], 2, 2)}},
		{"missing shard", []string{two[1]}, []string{"shard(s) 1 of 2 not given", file(two[1], 2, 2)}},
		{"duplicate shard", []string{two[0], two[1], dup}, []string{"both shard 1", "copy.aspf"}},
		{"corrupt file", []string{corrupt, two[1]}, []string{corrupt, "checksum mismatch"}},
		{"cut short", []string{two[0], cut}, []string{cut}},
		{"not a partial file", []string{notShard}, []string{notShard, "ASPF"}},
		{"empty file", []string{two[0], empty}, []string{empty, "is empty (0 bytes)", "run that shard again"}},
		{"empty folder", []string{t.TempDir()}, []string{"holds no partial file"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			out := filepath.Join(s.dir, "out-"+strings.ReplaceAll(tc.name, " ", "-"))
			_, se, code := runBin(t, append([]string{"merge", "--quiet", "--out", out}, tc.files...)...)
			if code != 2 {
				t.Fatalf("exit %d, want 2: %s", code, se)
			}
			for _, w := range tc.want {
				if !strings.Contains(se, w) {
					t.Errorf("message lacks %q: %s", w, se)
				}
			}
			if _, err := os.Stat(out); err == nil {
				t.Errorf("%s was created", out)
			}
		})
	}
	// An empty --out is refused at once, as run refuses it: before, the
	// merge prepared the run again from the inputs and logged its first
	// lines before saying so.
	t.Run("empty --out", func(t *testing.T) {
		_, se, code := runBin(t, "merge", "--out", "", two[0], two[1])
		if code != 2 || strings.TrimSpace(se) != "areasweep: --out is empty; name an output directory" {
			t.Fatalf("exit %d, want 2 and one line: %q", code, se)
		}
	})
	// An input changed after the shards ran: the merge re-reads it and
	// refuses, naming the file.
	t.Run("input changed since", func(t *testing.T) {
		os.WriteFile(s.occ, append(bytes.Clone(b), []byte("13.7,43.1,test\n")...), 0o644)
		defer os.WriteFile(s.occ, b, 0o644)
		out := filepath.Join(s.dir, "out-changed")
		_, se, code := runBin(t, "merge", "--quiet", "--out", out, two[0], two[1])
		if code != 2 || !strings.Contains(se, s.occ) || !strings.Contains(se, "changed") {
			t.Fatalf("exit %d, want 2 naming %s: %s", code, s.occ, se)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%s was created", out)
		}
	})
}

// TestMergeRefusesEmptyModel: a raster null with no cell with data is not
// an error for a shard, which reads only its own rows of it (no whole
// raster read for a value range), but the merge, which sees every shard's
// rows, refuses it as a single run does: exit 2, the file named, nothing
// written.
func TestMergeRefusesEmptyModel(t *testing.T) {
	s := newSmallStudy(t)
	empty := filepath.Join(s.dir, "empty.tif")
	v := make([]float64, len(s.vals))
	for i := range v {
		v[i] = math.NaN()
	}
	writeRaster(t, empty, s.w, s.h, s.gt, v, true)
	shards := runShards(t, s, filepath.Join(s.dir, "empty"), 2, "--null", "void="+empty)
	single := filepath.Join(s.dir, "single")
	_, seRun, codeRun := runBin(t, s.shardArgs(t, single, "--null", "void="+empty)...)
	out := filepath.Join(s.dir, "merged")
	_, seMerge, codeMerge := runBin(t, append([]string{"merge", "--quiet", "--out", out}, shards...)...)
	for what, r := range map[string]struct {
		se   string
		code int
		out  string
	}{"single run": {seRun, codeRun, single}, "merge": {seMerge, codeMerge, out}} {
		if r.code != 2 {
			t.Errorf("%s: exit %d, want 2: %s", what, r.code, r.se)
		}
		for _, w := range []string{"null void", "empty.tif", "every cell", "no data"} {
			if !strings.Contains(r.se, w) {
				t.Errorf("%s: message lacks %q: %s", what, w, r.se)
			}
		}
		if _, err := os.Stat(r.out); err == nil {
			t.Errorf("%s: %s was created", what, r.out)
		}
	}
}

// TestShardsShareAFolder: shards run one after another into one folder
// need --force from the second on, and --force then replaces only the
// shard's own two files: another shard's files and a whole run's outputs
// in the folder stay as they were. merge takes the folder.
func TestShardsShareAFolder(t *testing.T) {
	s := newSmallStudy(t)
	dir := filepath.Join(s.dir, "shared")
	shard := func(i int, extra ...string) (string, int) {
		_, se, code := runBin(t, s.shardArgs(t, dir, append([]string{"--shard", fmt.Sprintf("%d/2", i)}, extra...)...)...)
		return se, code
	}
	if se, code := shard(1); code != 0 {
		t.Fatalf("shard 1: exit %d: %s", code, se)
	}
	if se, code := shard(2); code != 2 || !strings.Contains(se, "--force") {
		t.Fatalf("shard 2 into a non-empty folder without --force: exit %d: %s", code, se)
	}
	if se, code := shard(2, "--force"); code != 0 {
		t.Fatalf("shard 2 --force: exit %d: %s", code, se)
	}
	keep := filepath.Join(dir, "results.json")
	os.WriteFile(keep, []byte("a whole run's results\n"), 0o644)
	other, _ := os.ReadFile(filepath.Join(dir, "shard-2-of-2.aspf"))
	if se, code := shard(1, "--force"); code != 0 {
		t.Fatalf("shard 1 again --force: exit %d: %s", code, se)
	}
	if b, err := os.ReadFile(keep); err != nil || string(b) != "a whole run's results\n" {
		t.Errorf("results.json in the shards' folder was replaced or removed by a shard (%v)", err)
	}
	if b, _ := os.ReadFile(filepath.Join(dir, "shard-2-of-2.aspf")); len(other) == 0 || !bytes.Equal(b, other) {
		t.Error("shard 1 --force changed shard 2's partial file")
	}
	for _, f := range []string{"shard-1-of-2.aspf", "shard-1-of-2.log", "shard-2-of-2.log"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Errorf("%s missing: %v", f, err)
		}
	}
	if _, se, code := runBin(t, "merge", "--quiet", "--out", filepath.Join(s.dir, "merged"), dir); code != 0 {
		t.Fatalf("merge of the folder: exit %d: %s", code, se)
	}
	// Another split run into the same folder: the merge of the folder is
	// refused saying it holds several splits and which files to give.
	_, se, code := runBin(t, s.shardArgs(t, dir, "--shard", "1/3", "--force")...)
	if code != 0 {
		t.Fatalf("shard 1/3: exit %d: %s", code, se)
	}
	out := filepath.Join(s.dir, "merged-mixed")
	_, se, code = runBin(t, "merge", "--quiet", "--out", out, dir)
	if code != 2 || !strings.Contains(se, dir+" holds the partial files of several splits") || !strings.Contains(se, "shard-*-of-") {
		t.Fatalf("merge of a folder with two splits: exit %d: %s", code, se)
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("the refused merge created --out")
	}
}

// TestMergeRelativePaths: shards run with paths relative to their folder
// record them so; a merge from another folder is refused naming the input
// and what to do (exit 2, nothing written), and one from the shards'
// folder merges.
func TestMergeRelativePaths(t *testing.T) {
	s := newSmallStudy(t)
	run := func(dir string, args ...string) (string, int) {
		cmd := exec.Command(areasweepBin, args...)
		cmd.Dir = dir
		var se bytes.Buffer
		cmd.Stderr = &se
		err := cmd.Run()
		if ee, ok := err.(*exec.ExitError); ok {
			return se.String(), ee.ExitCode()
		} else if err != nil {
			t.Fatal(err)
		}
		return se.String(), 0
	}
	for i := 1; i <= 2; i++ {
		if se, code := run(s.dir, "run", "--model", "m=model.tif", "--occurrences", "occ.csv", "--region", "region.geojson", "--iterations", "10",
			"--region-buffers=-40,60", "--point-buffers", "40", "--hull-buffers", "0", "--quiet", "--shard", fmt.Sprintf("%d/2", i), "--out", fmt.Sprintf("shards/%d", i)); code != 0 {
			t.Fatalf("shard %d: exit %d: %s", i, code, se)
		}
	}
	elsewhere := t.TempDir()
	out := filepath.Join(elsewhere, "merged")
	se, code := run(elsewhere, "merge", "--quiet", "--out", out, filepath.Join(s.dir, "shards", "1"), filepath.Join(s.dir, "shards", "2"))
	if code != 2 || !strings.Contains(se, "occ.csv") || !strings.Contains(se, "relative to the folder the shards ran in ("+s.dir+")") || !strings.Contains(se, elsewhere) ||
		!strings.Contains(se, "run the merge from "+s.dir+",") {
		t.Fatalf("merge from another folder: exit %d: %s", code, se)
	}
	// From another folder holding files of the same names, one of them
	// not the file the shards read: the message names both folders, not
	// the file as changed.
	for _, f := range []string{"model.tif", "region.geojson", "occ.csv"} {
		b, err := os.ReadFile(filepath.Join(s.dir, f))
		if err != nil {
			t.Fatal(err)
		}
		if f == "occ.csv" {
			b = append(b, '\n')
		}
		if err := os.WriteFile(filepath.Join(elsewhere, f), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	se, code = run(elsewhere, "merge", "--quiet", "--out", out, filepath.Join(s.dir, "shards", "1"), filepath.Join(s.dir, "shards", "2"))
	if code != 2 || !strings.Contains(se, "occ.csv is not the file the shards read") || !strings.Contains(se, "the shards ran in "+s.dir+" and read occ.csv there, this merge runs in "+elsewhere) ||
		strings.Contains(se, "changed since") {
		t.Fatalf("merge from another folder with other files: exit %d: %s", code, se)
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("the refused merge created --out")
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("the refused merge created --out")
	}
	if se, code := run(s.dir, "merge", "--quiet", "--out", out, "shards/1", "shards/2"); code != 0 {
		t.Fatalf("merge from the shards' folder: exit %d: %s", code, se)
	}
	// From a current folder that was removed: no empty folder named
	// ("is not found from : run the merge ..."), the folder said gone.
	gone := filepath.Join(elsewhere, "gone")
	cmd := exec.Command("sh", "-c", `mkdir "$1" && cd "$1" && rmdir "$1" && shift && exec "$@"`, "sh", gone, areasweepBin,
		"merge", "--quiet", "--out", out+"-gone", filepath.Join(s.dir, "shards", "1"), filepath.Join(s.dir, "shards", "2"))
	var gse bytes.Buffer
	cmd.Stderr = &gse
	err := cmd.Run()
	msg := strings.TrimSpace(gse.String())
	if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != 2 || strings.Contains(msg, "\n") || strings.Contains(msg, "from :") ||
		!strings.Contains(msg, "occ.csv, recorded relative to the folder the shards ran in ("+s.dir+"), is not found") || !strings.Contains(msg, "the current folder no longer exists") {
		t.Fatalf("merge from a removed folder: %v: %s", err, msg)
	}
	// From the right folder, with one input renamed since the shards ran:
	// the message names that input as missing, not the folder as wrong.
	if err := os.Rename(filepath.Join(s.dir, "model.tif"), filepath.Join(s.dir, "model-old.tif")); err != nil {
		t.Fatal(err)
	}
	out2 := filepath.Join(elsewhere, "merged2")
	se, code = run(s.dir, "merge", "--quiet", "--out", out2, "shards/1", "shards/2")
	if code != 2 || !strings.Contains(se, "model.tif is missing from "+s.dir) || !strings.Contains(se, "removed or renamed") || strings.Contains(se, "run the merge from that folder") {
		t.Fatalf("merge with an input renamed: exit %d: %s", code, se)
	}
	if _, err := os.Stat(out2); err == nil {
		t.Error("the refused merge created --out")
	}
}

// TestMergeRefusesChangedSidecars: a file read with an input (here the
// first model's .aux.xml and .prj) is recorded in results.json with its
// own SHA-256, shards run with it merge into exactly the single run's
// files, and merge refuses, naming the input, shards of which one ran
// without it, and sidecars changed or removed after the shards ran.
func TestMergeRefusesChangedSidecars(t *testing.T) {
	s := newSmallStudy(t)
	without := runShards(t, s, filepath.Join(s.dir, "without"), 2)
	aux := s.model + ".aux.xml"
	prj := strings.TrimSuffix(s.model, filepath.Ext(s.model)) + ".prj"
	auxText := []byte("<PAMDataset></PAMDataset>\n")
	os.WriteFile(aux, auxText, 0o644)
	os.WriteFile(prj, []byte("a projection file areasweep records but GDAL does not read for a GeoTIFF\n"), 0o644)
	with := runShards(t, s, filepath.Join(s.dir, "with"), 2)
	single := filepath.Join(s.dir, "single")
	if _, se, code := runBin(t, s.shardArgs(t, single)...); code != 0 {
		t.Fatalf("single run: exit %d: %s", code, se)
	}
	var rec *report.Input
	res := loadResults(t, single)
	for i, in := range res.Inputs {
		if in.Role == "model:m" {
			rec = &res.Inputs[i]
		}
	}
	wantAux := fmt.Sprintf("%x", sha256.Sum256(auxText))
	if rec == nil || len(rec.Sidecars) != 2 || rec.Sidecars[0].Path != prj || rec.Sidecars[1].Path != aux || rec.Sidecars[1].SHA256 != wantAux {
		t.Fatalf("model m's record %+v, want sidecars %s and %s (SHA-256 %s)", rec, prj, aux, wantAux)
	}

	merged := filepath.Join(s.dir, "merged")
	if _, se, code := runBin(t, append([]string{"merge", "--quiet", "--out", merged}, with...)...); code != 0 {
		t.Fatalf("merge: exit %d: %s", code, se)
	}
	for _, f := range []string{"results.json", "scores.csv"} {
		a, _ := os.ReadFile(filepath.Join(single, f))
		b, _ := os.ReadFile(filepath.Join(merged, f))
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s: merged differs from the single run", f)
		}
	}

	refuse := func(t *testing.T, name string, files []string, want ...string) {
		t.Helper()
		out := filepath.Join(s.dir, "out-"+name)
		_, se, code := runBin(t, append([]string{"merge", "--quiet", "--out", out}, files...)...)
		if code != 2 {
			t.Fatalf("exit %d, want 2: %s", code, se)
		}
		for _, w := range want {
			if !strings.Contains(se, w) {
				t.Errorf("message lacks %q: %s", w, se)
			}
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%s was created", out)
		}
	}
	t.Run("one shard without", func(t *testing.T) {
		refuse(t, "mixed", []string{without[0], with[1]}, `"model:m" has other sidecar files`)
	})
	t.Run("sidecar changed since", func(t *testing.T) {
		os.WriteFile(aux, []byte("<PAMDataset><Metadata/></PAMDataset>\n"), 0o644)
		defer os.WriteFile(aux, auxText, 0o644)
		refuse(t, "changed", with, "model:m", s.model, "not those the shards read", filepath.Base(aux))
	})
	t.Run("sidecar removed since", func(t *testing.T) {
		os.Remove(aux)
		defer os.WriteFile(aux, auxText, 0o644)
		refuse(t, "removed", with, "model:m", "not those the shards read")
	})
}

// TestVirtualRasterSourcesRecorded: a model given as a virtual raster
// (VRT) is read from its source file, so results.json records the source
// among the VRT's sidecars with its SHA-256 (GDAL's file list: no name
// beside the VRT tells it).
func TestVirtualRasterSourcesRecorded(t *testing.T) {
	s := newSmallStudy(t)
	vrt := filepath.Join(s.dir, "virtual.vrt")
	virtualRaster(t, s.model, vrt)
	out := filepath.Join(s.dir, "out")
	if _, se, code := runBin(t, s.args(out, "--model", "v="+vrt)...); code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	b, _ := os.ReadFile(s.model)
	want := report.Sidecar{Path: s.model, SHA256: fmt.Sprintf("%x", sha256.Sum256(b))}
	for _, in := range loadResults(t, out).Inputs {
		if in.Role == "model:v" {
			if len(in.Sidecars) != 1 || in.Sidecars[0] != want {
				t.Fatalf("model v's sidecars %+v, want %+v", in.Sidecars, want)
			}
			return
		}
	}
	t.Fatal("no input model:v in results.json")
}
