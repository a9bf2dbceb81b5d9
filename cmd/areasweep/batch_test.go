package main

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"sync"
	"testing"

	"areasweep/cmd/internal/smallstudy"
)

// batchShared holds the inputs the batch tests share and the plain runs
// they compare with, made once: the same input paths give the same
// results.json, so one plain run of a study serves every test.
var batchShared struct {
	once  sync.Once
	s     *smallStudy
	err   error
	mu    sync.Mutex
	plain map[string]string
}

// sharedStudy returns newSmallStudy's inputs copied into a folder that
// lives as long as the test binary's temporary folder.
func sharedStudy(t *testing.T) *smallStudy {
	t.Helper()
	batchShared.once.Do(func() {
		s := newSmallStudy(t)
		dir := filepath.Join(filepath.Dir(areasweepBin), "batch-inputs")
		if batchShared.err = os.MkdirAll(dir, 0o755); batchShared.err != nil {
			return
		}
		c := *s
		c.dir = dir
		for _, p := range []*string{&c.model, &c.model2, &c.occ, &c.region, &c.far} {
			b, err := os.ReadFile(*p)
			if err != nil {
				batchShared.err = err
				return
			}
			*p = filepath.Join(dir, filepath.Base(*p))
			if batchShared.err = os.WriteFile(*p, b, 0o644); batchShared.err != nil {
				return
			}
		}
		batchShared.s, batchShared.plain = &c, map[string]string{}
	})
	if batchShared.err != nil {
		t.Fatal(batchShared.err)
	}
	return batchShared.s
}

// plainRun returns the --out folder of a plain run with the settings of a
// row of the batch tests' tables (seed and models), running it once.
func plainRun(t *testing.T, s *smallStudy, seed string, models ...string) string {
	t.Helper()
	key := seed + " " + strings.Join(models, " ")
	batchShared.mu.Lock()
	defer batchShared.mu.Unlock()
	if out, ok := batchShared.plain[key]; ok {
		return out
	}
	out := filepath.Join(s.dir, fmt.Sprintf("plain-%d", len(batchShared.plain)))
	if _, se, code := runBin(t, s.studyArgs(out, seed, models...)...); code != 0 {
		t.Fatalf("plain run (seed %s, models %v): exit %d: %s", seed, models, code, se)
	}
	batchShared.plain[key] = out
	return out
}

// batchTable writes a study table of three small studies on s's inputs
// and returns its path: alpha (two models), beta (one model, another
// seed) and broken, whose occurrences all lie outside the raster, so it
// passes every check of the table and fails when it runs.
func batchTable(t *testing.T, s *smallStudy) string {
	t.Helper()
	return smallstudy.BatchTable(t, s.dir)
}

// studyArgs is the run command line equivalent to a row of batchTable.
func (s *smallStudy) studyArgs(out, seed string, models ...string) []string {
	a := []string{"run", "--occurrences", s.occ, "--region", s.region, "--region-buffers=-40,60", "--point-buffers", "40",
		"--hull-buffers", "0", "--e", "0.05", "--iterations", "30", "--seed", seed, "--quiet", "--out", out}
	for _, m := range models {
		a = append(a, "--model", m)
	}
	return a
}

// treeFiles maps every regular file under dir (relative path) to its
// bytes, leaving out run.log (it holds timings) and the batch's own
// folder.
func treeFiles(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	out := map[string][]byte{}
	err := filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		if d.IsDir() && rel == batchMarker {
			return filepath.SkipDir
		}
		if d.Type().IsRegular() && d.Name() != "run.log" {
			b, err := os.ReadFile(p)
			if err != nil {
				return err
			}
			out[rel] = b
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// readSummary reads summary.csv as records keyed by column name.
func readSummary(t *testing.T, dir string) []map[string]string {
	t.Helper()
	f, err := os.Open(filepath.Join(dir, "summary.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var rows []map[string]string
	for _, r := range recs[1:] {
		m := map[string]string{}
		for i, c := range recs[0] {
			m[c] = r[i]
		}
		rows = append(rows, m)
	}
	return rows
}

// TestBatch runs a batch of three small studies, one failing at run time:
// exit 1, the two others complete and byte-identical to plain runs with
// the same settings, the failed one listed with its error in the summary;
// --jobs 1 and --jobs 2 give the same bytes; a second run skips the
// finished studies and retries the failed one, leaving the same summary.
func TestBatch(t *testing.T) {
	s := sharedStudy(t)
	table := batchTable(t, s)
	tmp := t.TempDir()
	outs := []string{filepath.Join(tmp, "jobs1"), filepath.Join(tmp, "jobs2")}
	for i, jobs := range []string{"1", "2"} {
		so, se, code := runBin(t, "batch", table, "--out", outs[i], "--jobs", jobs)
		if code != 1 {
			t.Fatalf("--jobs %s: exit %d, want 1 (one study fails)\n%s", jobs, code, se)
		}
		if !strings.Contains(so, "summary: "+filepath.Join(outs[i], "summary.html")) || !strings.Contains(se, "1 of 3 studies failed: broken") ||
			!strings.Contains(se, "running the same command again retries it, once what its line names is fixed") {
			t.Errorf("--jobs %s: stdout %q stderr %q", jobs, so, se)
		}
		// The failed study's line names its row of the table (line 10:
		// six shared lines, the header, alpha, beta, broken).
		if want := "\n  broken: " + table + " line 10: "; !strings.Contains(se, want) {
			t.Errorf("--jobs %s: stderr lacks the failed study's table line %q:\n%s", jobs, want, se)
		}
		if forbidden.MatchString(se) {
			t.Errorf("--jobs %s: raw library text on stderr: %s", jobs, se)
		}
		// The answer: the summary's count sentence on standard error,
		// as in summary_methods.md.
		answer := ""
		for _, l := range strings.Split(se, "\n") {
			if a, ok := strings.CutPrefix(l, "answer: "); ok {
				answer = a
			}
		}
		md, _ := os.ReadFile(filepath.Join(outs[i], "summary_methods.md"))
		if !strings.HasPrefix(answer, "AUC was ") || !strings.Contains(string(md), answer) {
			t.Errorf("--jobs %s: answer line %q, want the count sentence of summary_methods.md", jobs, answer)
		}
	}
	a, b := treeFiles(t, outs[0]), treeFiles(t, outs[1])
	var names []string
	for n := range a {
		names = append(names, n)
	}
	slices.Sort(names)
	for _, n := range names {
		if !bytes.Equal(a[n], b[n]) {
			t.Errorf("%s differs between --jobs 1 and --jobs 2", n)
		}
	}
	if len(a) != len(b) {
		t.Errorf("--jobs 1 wrote %d files, --jobs 2 %d", len(a), len(b))
	}
	for _, want := range []string{"alpha/results.json", "alpha/scores.csv", "alpha/report.html", "alpha/.areasweep-done", "beta/results.json",
		"summary.csv", "summary_verdicts.csv", "summary.html", "summary_methods.md", "summary_figures/extent_effect.svg", "summary_figures/extent_effect.pdf", "summary_figures/extent_effect.png"} {
		if _, ok := a[want]; !ok {
			t.Errorf("batch wrote no %s", want)
		}
	}
	if _, err := os.Stat(filepath.Join(outs[0], "broken")); err == nil {
		t.Error("the failed study left a folder")
	}

	// Each study equals a plain run with the same settings.
	for _, c := range []struct {
		id, seed string
		models   []string
	}{{"alpha", "9", []string{"m=" + s.model, "sq=" + s.model2}}, {"beta", "11", []string{"m=" + s.model}}} {
		plain := plainRun(t, s, c.seed, c.models...)
		for _, f := range []string{"results.json", "scores.csv"} {
			want, _ := os.ReadFile(filepath.Join(plain, f))
			if got := a[c.id+"/"+f]; len(want) == 0 || !bytes.Equal(got, want) {
				t.Errorf("%s/%s differs from a plain run with the same settings", c.id, f)
			}
		}
	}

	// The summary: one row per study and model, the failed study with the
	// run's own message.
	rows := readSummary(t, outs[0])
	var keys []string
	for _, r := range rows {
		keys = append(keys, r["study"]+"/"+r["model"]+"/"+r["status"])
	}
	if want := []string{"alpha/m/ok", "alpha/sq/ok", "beta/m/ok", "broken//failed"}; !slices.Equal(keys, want) {
		t.Errorf("summary rows %v, want %v", keys, want)
	}
	if e := rows[3]["error"]; !strings.Contains(e, "outside") {
		t.Errorf("broken's error in the summary: %q", e)
	}
	alpha := loadResults(t, filepath.Join(outs[0], "alpha"))
	// A study that warned says so on its progress line, with the count.
	_, se0, _ := runBin(t, "batch", table, "--out", filepath.Join(tmp, "warned"), "--jobs", "1")
	var line string
	for _, l := range strings.Split(se0, "\n") {
		if strings.Contains(l, "alpha: finished in") {
			line = l
		}
	}
	if n := len(alpha.Warnings); n > 0 != strings.Contains(line, fmt.Sprintf(", with %d warning", n)) || n == 0 && strings.Contains(line, "warning") {
		t.Errorf("alpha has %d warnings; its progress line: %q", n, line)
	}
	for _, sc := range alpha.Scores {
		if sc.Model == "m" && sc.Extent == alpha.Sensitivity.BaseExtent {
			if got := rows[0]["auc_base"]; got != fmt.Sprint(sc.AUC) && got != strings.TrimSuffix(fmt.Sprintf("%v", sc.AUC), ".0") {
				t.Errorf("alpha/m auc_base %s, results.json says %v", got, sc.AUC)
			}
		}
	}
	page, _ := os.ReadFile(filepath.Join(outs[0], "summary.html"))
	for _, want := range []string{`href="./alpha/report.html"`, `href="./beta/report.html"`, "<strong>broken</strong>"} {
		if !bytes.Contains(page, []byte(want)) {
			t.Errorf("summary.html lacks %s", want)
		}
	}

	// Again: the finished studies are skipped, the failed one retried.
	before := treeFiles(t, outs[0])
	_, se, code := runBin(t, "batch", table, "--out", outs[0], "--jobs", "2")
	if code != 1 {
		t.Fatalf("second run: exit %d\n%s", code, se)
	}
	for _, want := range []string{"alpha: already finished, skipped", "beta: already finished, skipped", "broken: started", "broken: failed"} {
		if !strings.Contains(se, want) {
			t.Errorf("second run: stderr lacks %q:\n%s", want, se)
		}
	}
	after := treeFiles(t, outs[0])
	for n, b := range before {
		if !bytes.Equal(after[n], b) {
			t.Errorf("second run changed %s", n)
		}
	}

	// --summary-only rewrites the same summary from the folders, with the
	// error the run recorded.
	if err := os.Remove(filepath.Join(outs[0], "summary.csv")); err != nil {
		t.Fatal(err)
	}
	if _, se, code := runBin(t, "batch", table, "--out", outs[0], "--summary-only"); code != 1 {
		t.Fatalf("--summary-only: exit %d\n%s", code, se)
	}
	if got, _ := os.ReadFile(filepath.Join(outs[0], "summary.csv")); !bytes.Equal(got, before["summary.csv"]) {
		t.Errorf("--summary-only wrote another summary.csv:\n%s\nwant\n%s", got, before["summary.csv"])
	}
}

// TestBatchBadTable checks that bad rows are all reported, by line and
// column, with exit 2, before anything runs: --out is not created.
func TestBatchBadTable(t *testing.T) {
	s := sharedStudy(t)
	table := filepath.Join(s.dir, "bad.csv")
	body := `# iterations: 30
id,model,occurrences,region,e
ok1,m=model.tif,occ.csv,region.geojson,0.05
nofile,m=missing.tif,occ.csv,region.geojson,0.05
badE,m=model.tif,occ.csv,region.geojson,1.5
summary.csv,m=model.tif,occ.csv,region.geojson,0.05
`
	if err := os.WriteFile(table, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(t.TempDir(), "out")
	_, se, code := runBin(t, "batch", table, "--out", out)
	if code != 2 {
		t.Fatalf("exit %d, want 2\n%s", code, se)
	}
	for _, re := range []string{
		`bad.csv line 5, study "badE", column "e": --e value 1.5 is outside \(0,1\)`,
		`bad.csv line 6, study "summary.csv", column "id": .*summary file`,
	} {
		if !regexp.MustCompile(re).MatchString(se) {
			t.Errorf("stderr lacks %q:\n%s", re, se)
		}
	}
	if strings.Contains(se, `"ok1"`) || strings.Contains(se, `"nofile"`) {
		t.Errorf("the good row, or the row whose input is missing (its study alone fails), is reported:\n%s", se)
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("--out was created for a bad table")
	}
	// A syntax problem of the table itself, and a flag problem.
	if err := os.WriteFile(table, []byte("id,model,colour\nx,m=model.tif,red\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, se, code := runBin(t, "batch", table, "--out", out); code != 2 || !strings.Contains(se, `column "colour"`) {
		t.Errorf("unknown column: exit %d\n%s", code, se)
	}
	if _, se, code := runBin(t, "batch", table, "--out", out, "--jobs", "0"); code != 2 || !strings.Contains(se, "--jobs") {
		t.Errorf("--jobs 0: exit %d\n%s", code, se)
	}
	// An --only id the table does not hold; a --shard without --only.
	good := filepath.Join(s.dir, "good.csv")
	if err := os.WriteFile(good, []byte("id,model,occurrences,region\nok1,m=model.tif,occ.csv,region.geojson\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, se, code := runBin(t, "batch", good, "--out", out, "--only", "nosuch"); code != 2 || !strings.Contains(se, "--only names nosuch") {
		t.Errorf("--only nosuch: exit %d\n%s", code, se)
	}
	if _, se, code := runBin(t, "batch", good, "--out", out, "--shards", "2", "--shard", "1"); code != 2 || !strings.Contains(se, "--shard 1 needs --only") {
		t.Errorf("--shard without --only: exit %d\n%s", code, se)
	}
	// An existing folder that is not a batch's is refused.
	other := filepath.Join(t.TempDir(), "other")
	os.MkdirAll(other, 0o755)
	os.WriteFile(filepath.Join(other, "notes.txt"), []byte("mine"), 0o644)
	if _, se, code := runBin(t, "batch", good, "--out", other); code != 2 || !strings.Contains(se, "not a batch's folder") {
		t.Errorf("foreign --out: exit %d\n%s", code, se)
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("--out was created by a refused command")
	}
}

// TestBatchMemoryBudget checks that a study whose memory need alone
// exceeds --memory is refused with the figures and what to do, without
// stopping the batch (it still writes the summary; exit 1). Every run
// that scores needs at least the 128 MiB of blocks kept from a model's
// sampling and GDAL's 16 MB block cache (pipeline.Estimate), so a budget
// of 1 MiB refuses each study.
func TestBatchMemoryBudget(t *testing.T) {
	s := sharedStudy(t)
	table := batchTable(t, s)
	out := filepath.Join(t.TempDir(), "tight")
	_, se, code := runBin(t, "batch", table, "--out", out, "--memory", "1M")
	if code != 1 {
		t.Fatalf("exit %d, want 1\n%s", code, se)
	}
	rows := readSummary(t, out)
	if len(rows) != 3 {
		t.Fatalf("summary rows %v", rows)
	}
	for _, r := range rows[:2] {
		if r["status"] != "failed" || !strings.Contains(r["error"], "needs more memory than the budget") || !strings.Contains(r["error"], "--memory") {
			t.Errorf("study %s: %q %q", r["study"], r["status"], r["error"])
		}
	}
	if _, se, code := runBin(t, "batch", table, "--out", out, "--memory", "lots"); code != 2 || !strings.Contains(se, "--memory") {
		t.Errorf("--memory lots: exit %d\n%s", code, se)
	}
	// Under 1 MiB (the budget's unit) it is refused at once, not study by
	// study as "needs more than the budget of 0 MiB".
	for _, m := range []string{"1K", "2048"} {
		if _, se, code := runBin(t, "batch", table, "--out", filepath.Join(t.TempDir(), "tiny"), "--memory", m); code != 2 || !strings.Contains(se, "--memory \""+m+"\" is less than 1 MiB") {
			t.Errorf("--memory %s: exit %d\n%s", m, code, se)
		}
	}
}

// TestBatchShards runs the batch of batchTable with every study split into
// two shards of grid rows, merged into the study's folder: the studies
// equal plain runs byte for byte, the broken study fails in its shards
// and is listed, and a second run skips everything finished.
func TestBatchShards(t *testing.T) {
	s := sharedStudy(t)
	table := batchTable(t, s)
	out := filepath.Join(t.TempDir(), "sharded")
	_, se, code := runBin(t, "batch", table, "--out", out, "--shards", "2", "--jobs", "2")
	if code != 1 {
		t.Fatalf("exit %d, want 1\n%s", code, se)
	}
	for _, want := range []string{"alpha: shard 1/2 started", "alpha: shard 2/2 started", "alpha: merge of 2 shards finished", "broken: shard 1/2 failed"} {
		if !strings.Contains(se, want) {
			t.Errorf("stderr lacks %q:\n%s", want, se)
		}
	}
	for _, c := range []struct {
		id, seed string
		models   []string
	}{{"alpha", "9", []string{"m=" + s.model, "sq=" + s.model2}}, {"beta", "11", []string{"m=" + s.model}}} {
		plain := plainRun(t, s, c.seed, c.models...)
		for _, f := range []string{"results.json", "scores.csv", "report.html"} {
			want, _ := os.ReadFile(filepath.Join(plain, f))
			got, err := os.ReadFile(filepath.Join(out, c.id, f))
			if err != nil || len(want) == 0 || !bytes.Equal(got, want) {
				t.Errorf("%s/%s from 2 shards differs from a plain run (%v)", c.id, f, err)
			}
		}
	}
	rows := readSummary(t, out)
	if len(rows) != 4 || rows[3]["status"] != "failed" || !strings.HasPrefix(rows[3]["error"], "shard 1/2: ") {
		t.Errorf("summary rows %v", rows)
	}
	_, se, code = runBin(t, "batch", table, "--out", out, "--shards", "2", "--jobs", "2")
	if code != 1 || !strings.Contains(se, "alpha: already finished, skipped") || strings.Contains(se, "alpha: shard") {
		t.Errorf("second run: exit %d\n%s", code, se)
	}
}

// TestBatchShardCountChanged: a study split into 2 shards, one of which
// finished, then run with --shards 3, is run in 3 shards and merged. Before,
// the shard folder kept the partial file of the split into 2, the merge was
// given the folders, and refused them as a mix of splits (exit 1) on every
// rerun, advising to give files the user does not name.
func TestBatchShardCountChanged(t *testing.T) {
	s := sharedStudy(t)
	table := batchTable(t, s)
	out := filepath.Join(t.TempDir(), "runs")
	if _, se, code := runBin(t, "batch", table, "--out", out, "--shards", "2", "--only", "beta", "--shard", "1"); code != 0 {
		t.Fatalf("shard 1/2: exit %d: %s", code, se)
	}
	if _, se, code := runBin(t, "batch", table, "--out", out, "--shards", "3", "--only", "beta"); code != 0 {
		t.Fatalf("--shards 3: exit %d, want 0: %s", code, se)
	}
	plain := plainRun(t, s, "11", "m="+s.model)
	want, _ := os.ReadFile(filepath.Join(plain, "results.json"))
	got, err := os.ReadFile(filepath.Join(out, "beta", "results.json"))
	if err != nil || len(want) == 0 || !bytes.Equal(got, want) {
		t.Errorf("beta/results.json from 3 shards differs from a plain run (%v)", err)
	}
}
