package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestBatchUnreadableInputForce: a finished study one of whose recorded
// input files cannot be read (here a symbolic link to itself, which stat
// refuses with "too many levels of symbolic links": the tests run as root,
// which reads a file of mode 000) is not taken as finished nor as made
// from other inputs. --force does not get past it, and the message says
// so (GDAL would skip an unreadable sidecar such as a mask without a word,
// so a run made then could silently differ); a SLURM plan leaves it out,
// with or without --force, instead of submitting a task that fails on the
// same check. Made readable again, the study is finished as before.
func TestBatchUnreadableInputForce(t *testing.T) {
	dir, table := inputsStudy(t)
	out := filepath.Join(t.TempDir(), "runs")
	if _, se, code := runBin(t, "batch", table, "--out", out); code != 0 {
		t.Fatalf("first run: exit %d: %s", code, se)
	}
	results := filepath.Join(out, "a", "results.json")
	first, _ := os.ReadFile(results)
	aux := filepath.Join(dir, "model.tif.aux.xml")
	auxBytes, _ := os.ReadFile(aux)
	os.Remove(aux)
	if err := os.Symlink(aux, aux); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name  string
		args  []string
		code  int
		words []string
		not   []string
	}{
		{"without --force", nil, 1, []string{"2 of 2 studies failed", "the model m file " + aux + " cannot be read to check", "make it readable", "move it away"}, []string{"--force runs them again", "batch: "}},
		{"with --force", []string{"--force"}, 1, []string{"2 of 2 studies failed", aux + " cannot be read to check", "--force does not get past this", "never skips reading an input", "each line says what to do"}, []string{"a: started", "b: started"}},
		{"--slurm", []string{"--slurm"}, 0, []string{"not submitted: a: the model m file " + aux + " cannot be read", "not submitted: b:", "2 tasks, 0 not finished"}, nil},
		{"--slurm --force", []string{"--slurm", "--force"}, 0, []string{"not submitted: a:", "--force does not get past this", "2 tasks, 0 not finished"}, []string{"submit with"}},
	} {
		so, se, code := runBin(t, append([]string{"batch", table, "--out", out}, c.args...)...)
		all := so + se
		if code != c.code {
			t.Errorf("%s: exit %d, want %d: %s", c.name, code, c.code, all)
		}
		for _, w := range c.words {
			if !strings.Contains(all, w) {
				t.Errorf("%s: output lacks %q:\n%s", c.name, w, all)
			}
		}
		for _, w := range c.not {
			if strings.Contains(all, w) {
				t.Errorf("%s: output holds %q:\n%s", c.name, w, all)
			}
		}
		if m := forbidden.FindString(all); m != "" {
			t.Errorf("%s: output holds %q", c.name, m)
		}
		if got, _ := os.ReadFile(results); !bytes.Equal(got, first) {
			t.Fatalf("%s: a's results.json changed", c.name)
		}
	}
	os.Remove(aux)
	if err := os.WriteFile(aux, auxBytes, 0o644); err != nil {
		t.Fatal(err)
	}
	laterTime(t, aux)
	if _, se, code := runBin(t, "batch", table, "--out", out); code != 0 || !strings.Contains(se, "a: already finished, skipped") {
		t.Errorf("readable again: exit %d: %s", code, se)
	}
}

// TestBatchKilledStudyRerun: a study's task killed with SIGKILL (as SLURM
// does at the time limit, after the grace time) while it runs, into a new
// study folder (a) or into one that already exists, empty (b, as an
// earlier array script made it). The summary does not count either as
// finished, and the same batch command run again, without --force and
// without cleaning by hand, runs both, removes the killed runs' staging
// folders and leaves nothing else behind.
func TestBatchKilledStudyRerun(t *testing.T) {
	dir, _ := inputsStudy(t)
	table := filepath.Join(dir, "slow.csv")
	body := "# region-buffers: 60\n# point-buffers: 40\n# hull-buffers: 0\n# e: 0.05\n# iterations: 1000\n" +
		"id,model,occurrences,region\n" +
		"a,m=model.tif,occ.csv,region.geojson\n" +
		"b,m=model.tif,occ_b.csv,region.geojson\n"
	if err := os.WriteFile(table, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(t.TempDir(), "runs")
	if err := os.MkdirAll(filepath.Join(out, "b"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.MkdirAll(filepath.Join(out, batchMarker), 0o755); err != nil {
		t.Fatal(err)
	}
	var stages []string
	for _, id := range []string{"a", "b"} {
		cmd := exec.Command(areasweepBin, "batch", table, "--out", out, "--only", id, "--jobs", "1", "--quiet")
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		stage := waitForStage(t, filepath.Join(out, id))
		time.Sleep(50 * time.Millisecond) // past the owner record, inside the run
		cmd.Process.Signal(syscall.SIGKILL)
		cmd.Wait()
		if _, err := os.Stat(stage); err != nil {
			t.Fatalf("%s: the killed task left no staging folder (%v): the kill came too late to test anything", id, err)
		}
		stages = append(stages, stage)
		if _, err := os.Stat(filepath.Join(out, id, ".areasweep-done")); err == nil {
			t.Fatalf("%s: a completion marker beside a killed run", id)
		}
	}
	_, se, code := runBin(t, "batch", table, "--out", out, "--summary-only")
	if code != 1 || !strings.Contains(se, "2 of 2 studies failed") {
		t.Errorf("summary after the kills: exit %d, want 1 with both studies unfinished: %s", code, se)
	}
	for _, r := range readSummary(t, out) {
		if r["status"] != "failed" || !strings.Contains(r["error"], "not finished") {
			t.Errorf("summary row %v; want the killed study listed as not finished", r)
		}
	}
	if _, se, code := runBin(t, "batch", table, "--out", out); code != 0 {
		t.Fatalf("the same command after the kills: exit %d: %s", code, se)
	}
	for _, p := range stages {
		if _, err := os.Stat(p); err == nil {
			t.Errorf("the killed run's staging folder %s kept", p)
		}
	}
	if l := leftovers(out); len(l) > 0 {
		t.Errorf("left behind: %v", l)
	}
	for _, r := range readSummary(t, out) {
		if r["status"] != "ok" {
			t.Errorf("summary row %v after the rerun", r)
		}
	}
}

// TestBatchMarkerArrivesWithOutputs: a study's completion marker is moved
// into place with its outputs, not written after them. Into a new study
// folder (a) no moment shows the outputs without the marker or the marker
// without them (one rename): a task killed after its outputs arrived used
// to leave a folder without a marker, which a re-run refused without
// --force as not made by areasweep. Into a folder that exists, empty (b),
// the entries are moved one by one and the marker last: no moment shows
// the marker without every output. A watcher polls the study folder while
// the batch runs.
func TestBatchMarkerArrivesWithOutputs(t *testing.T) {
	_, table := inputsStudy(t)
	out := filepath.Join(t.TempDir(), "runs")
	if err := os.MkdirAll(filepath.Join(out, "b"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.MkdirAll(filepath.Join(out, batchMarker), 0o755); err != nil {
		t.Fatal(err)
	}
	exists := func(p string) bool { _, err := os.Stat(p); return err == nil }
	for _, id := range []string{"a", "b"} {
		cmd := exec.Command(areasweepBin, "batch", table, "--out", out, "--only", id, "--jobs", "1", "--quiet")
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		done := make(chan error, 1)
		go func() { done <- cmd.Wait() }()
		sightings, bare, early := 0, 0, 0
		marker := filepath.Join(out, id, ".areasweep-done")
	watch:
		for {
			select {
			case err := <-done:
				if err != nil {
					t.Fatalf("%s: %v", id, err)
				}
				break watch
			default:
			}
			time.Sleep(50 * time.Microsecond) // leave the run most of a core
			m := exists(marker)
			all := true
			for _, n := range []string{"results.json", "scores.csv", "report.html", "run.log"} {
				all = all && exists(filepath.Join(out, id, n))
			}
			res := exists(filepath.Join(out, id, "results.json"))
			if m && !all {
				early++
			}
			if res && !exists(marker) { // checked after results.json: the rename brings both
				bare++
			}
			if res {
				sightings++
			}
		}
		if early > 0 {
			t.Errorf("%s: the marker was seen %d times before every output was in place", id, early)
		}
		if id == "a" && bare > 0 {
			t.Errorf("%s: results.json seen %d times, %d of them without the completion marker", id, sightings, bare)
		}
		if !exists(marker) {
			t.Errorf("%s: no marker after the run", id)
		}
	}
}

// TestSidecarInOutRefused: a file GDAL reads with a raster counts as an
// input for the --out check whatever its kind, so --force never writes
// where one lies. The model is named through a symbolic link in the
// folder given as --out (data/model.tif, pointing to the raster in
// store/), so that the sidecar beside the link, which GDAL finds by the
// link's name, is the only input in that folder: a check of the model's
// own (resolved) folder alone would let the run write there. One case
// per name GDAL looks for (inputs.Sidecars; GDAL's own file list adds a
// virtual raster's sources, covered by the bad-input table). The
// contents are such that GDAL's reading of the model does not fail on
// them (a world file with the model's own geotransform, a .prj with its
// CRS; PAM, hence .aux and .aux.xml, is off in areasweep).
func TestSidecarInOutRefused(t *testing.T) {
	s := newSmallStudy(t)
	wgs := `GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["degree",0.0174532925199433]]`
	world := "0.25\n0\n0\n-0.25\n10.125\n47.875\n" // the small study's geotransform, cell centre of the first cell
	for _, c := range []struct{ name, body string }{
		{"model.aux", "not read: PAM is off"},
		{"model.tif.aux.xml", "<PAMDataset></PAMDataset>\n"},
		{"model.prj", wgs},
		{"model.tfw", world},
		{"model.tifw", world},
		{"model.wld", world},
		{"model.hdr", "ENVI\n"},
		{"model.tif.hdr", "ENVI\n"},
	} {
		t.Run(c.name, func(t *testing.T) {
			root := t.TempDir()
			data, store := filepath.Join(root, "data"), filepath.Join(root, "store")
			for _, d := range []string{data, store} {
				os.MkdirAll(d, 0o755)
			}
			b, err := os.ReadFile(s.model)
			if err != nil {
				t.Fatal(err)
			}
			os.WriteFile(filepath.Join(store, "model.tif"), b, 0o644)
			if err := os.Symlink(filepath.Join(store, "model.tif"), filepath.Join(data, "model.tif")); err != nil {
				t.Fatal(err)
			}
			side := filepath.Join(data, c.name)
			os.WriteFile(side, []byte(c.body), 0o644)
			before := treeSums(t, data)
			_, se, code := runBin(t, "run", "--model", "m="+filepath.Join(data, "model.tif"), "--occurrences", s.occ, "--region", s.region,
				"--iterations", "5", "--out", data, "--force", "--quiet")
			if code != 2 || !strings.Contains(se, "holds the input "+side) || !strings.Contains(se, "whatever --force says") {
				t.Errorf("exit %d, want 2 naming %s as an input: %s", code, side, se)
			}
			if !sameSums(before, treeSums(t, data)) || len(leftovers(root)) > 0 {
				t.Errorf("the refused run changed %s: %v", data, leftovers(root))
			}
		})
	}
}

// TestBatchFoldersHonourUmask: the folders a batch makes (--out, its own
// .areasweep-batch, the SLURM plan's logs, each study's figures, the
// summary's figures) are made 0777 less the umask, as the README says
// and as run's are: under umask 002, on storage a group shares, they are
// group-writable (0775), not 0755.
func TestBatchFoldersHonourUmask(t *testing.T) {
	_, table := inputsStudy(t)
	old := syscall.Umask(0o002)
	defer syscall.Umask(old)
	root := t.TempDir()
	out, plan := filepath.Join(root, "runs"), filepath.Join(root, "plan")
	if _, se, code := runBin(t, "batch", table, "--out", out, "--quiet"); code != 0 {
		t.Fatalf("batch: exit %d: %s", code, se)
	}
	if _, se, code := runBin(t, "batch", table, "--out", plan, "--slurm"); code != 0 {
		t.Fatalf("batch --slurm: exit %d: %s", code, se)
	}
	for _, p := range []string{out, filepath.Join(out, batchMarker), filepath.Join(out, "a"), filepath.Join(out, "a", "figures"),
		filepath.Join(out, "summary_figures"), filepath.Join(plan, batchMarker, "slurm", "logs")} {
		st, err := os.Stat(p)
		if err != nil {
			t.Fatal(err)
		}
		if st.Mode().Perm() != 0o775 {
			t.Errorf("%s has mode %v, want 0775 (0777 less the umask 002)", p, st.Mode().Perm())
		}
	}
}

// TestBatchSummaryOnlyClosingLine: --summary-only runs no study, so its
// closing line must not say that running the same command again retries
// the failed studies, or that --force (with the same command) runs them:
// both ran nothing. It names the batch command without --summary-only.
func TestBatchSummaryOnlyClosingLine(t *testing.T) {
	dir, table := inputsStudy(t)
	out := filepath.Join(t.TempDir(), "runs")
	for _, c := range []struct {
		name    string
		prepare func()
		want    string
	}{
		// b never ran: not finished, retried by the batch command.
		{"not run", func() {
			if _, se, code := runBin(t, "batch", table, "--out", out, "--only", "a", "--quiet"); code != 0 {
				t.Fatalf("--only a: exit %d: %s", code, se)
			}
		}, "running the batch command again without --summary-only retries it"},
		// b finished, then its occurrence file changed: only --force runs it.
		{"made from other inputs", func() {
			if _, se, code := runBin(t, "batch", table, "--out", out, "--quiet"); code != 0 {
				t.Fatalf("whole batch: exit %d: %s", code, se)
			}
			occ := filepath.Join(dir, "occ_b.csv")
			b, err := os.ReadFile(occ)
			if err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(occ, append(b, '\n'), 0o644); err != nil {
				t.Fatal(err)
			}
			laterTime(t, occ)
		}, "the batch command with --force and without --summary-only runs it again"},
	} {
		c.prepare()
		_, se, code := runBin(t, "batch", table, "--out", out, "--summary-only", "--quiet")
		if code != 1 || !strings.Contains(se, "1 of 2 studies failed: b") {
			t.Fatalf("%s: --summary-only exit %d, want 1 with b failed: %s", c.name, code, se)
		}
		if !strings.Contains(se, c.want) {
			t.Errorf("%s: closing line lacks %q:\n%s", c.name, c.want, se)
		}
		if strings.Contains(se, "running the same command again") || strings.Contains(se, "and --force runs it again") {
			t.Errorf("%s: closing line tells to run --summary-only again, which runs nothing:\n%s", c.name, se)
		}
	}
}
