package main

import (
	"bytes"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"
)

// The names of a run's lock file and staging folders (package outdir),
// spelled out here as a user sees them.
const (
	stagePrefix = ".areasweep-partial-"
	lockSuffix  = ".areasweep-lock"
)

// slowArgs is a good run made slow by its bootstrap (a million iterations
// per model and extent), so that a signal or a second run lands while it
// is still scoring.
func slowArgs(s *smallStudy, out string, extra ...string) []string {
	a := []string{"run", "--model", "m=" + s.model, "--occurrences", s.occ, "--region", s.region, "--iterations", "1000000",
		"--region-buffers=60", "--point-buffers", "40", "--hull-buffers", "0", "--quiet", "--out", out}
	return append(a, extra...)
}

// waitForStage waits until a staging folder of out exists (the run has
// passed its checks and is working) and returns it.
func waitForStage(t *testing.T, out string) string {
	t.Helper()
	deadline := time.Now().Add(60 * time.Second)
	for time.Now().Before(deadline) {
		for _, pat := range []string{filepath.Join(out, stagePrefix+"*"), filepath.Join(filepath.Dir(out), "."+filepath.Base(out)+"."+stagePrefix[1:]+"*")} {
			if m, _ := filepath.Glob(pat); len(m) > 0 {
				return m[0]
			}
		}
		time.Sleep(5 * time.Millisecond)
	}
	t.Fatal("the run never made its staging folder")
	return ""
}

// TestSignalsKeepEarlierResults runs a good analysis, then starts a second
// one with --force on the same --out and stops it with SIGTERM or SIGINT
// in the middle. The earlier results must be byte-identical, nothing
// staged may be left, and the exit code must be 128 + the signal number.
func TestSignalsKeepEarlierResults(t *testing.T) {
	s := newSmallStudy(t)
	out := filepath.Join(t.TempDir(), "res")
	if _, se, code := runBin(t, s.args(out)...); code != 0 {
		t.Fatalf("first run: exit %d: %s", code, se)
	}
	want := treeSums(t, out)
	// SIGQUIT (Ctrl-\) was left to Go's runtime: every goroutine's stack
	// on standard error, exit 2, the staging folder left (helper hS).
	for _, sig := range []syscall.Signal{syscall.SIGTERM, syscall.SIGINT, syscall.SIGHUP, syscall.SIGQUIT} {
		t.Run(sig.String(), func(t *testing.T) {
			cmd := exec.Command(areasweepBin, slowArgs(s, out, "--force")...)
			var se bytes.Buffer
			cmd.Stderr = &se
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			stage := waitForStage(t, out)
			time.Sleep(100 * time.Millisecond) // inside the scoring
			cmd.Process.Signal(sig)
			code := exitCode(cmd.Wait())
			if code != 128+int(sig) {
				t.Errorf("exit %d, want %d; stderr %s", code, 128+int(sig), se.String())
			}
			if !strings.Contains(se.String(), "stopped by") || forbidden.MatchString(se.String()) {
				t.Errorf("stderr: %s", se.String())
			}
			if _, err := os.Stat(stage); err == nil {
				t.Errorf("staging folder %s left behind", stage)
			}
			if got := treeSums(t, out); !sameSums(want, got) {
				t.Errorf("earlier results changed: %d files before, %d after", len(want), len(got))
			}
			if l := leftovers(filepath.Dir(out)); len(l) > 0 {
				t.Errorf("left behind: %v", l)
			}
		})
	}
}

// TestConcurrentRunRefused: while one run writes to --out, a second run
// on the same --out is refused with exit 2, naming the first run's
// process, and changes nothing.
func TestConcurrentRunRefused(t *testing.T) {
	s := newSmallStudy(t)
	out := filepath.Join(t.TempDir(), "res")
	first := exec.Command(areasweepBin, slowArgs(s, out)...)
	if err := first.Start(); err != nil {
		t.Fatal(err)
	}
	defer first.Process.Kill()
	waitForStage(t, out)
	_, se, code := runBin(t, s.args(out, "--force")...)
	if code != 2 || !strings.Contains(se, "is in use") || !strings.Contains(se, "process "+strconv.Itoa(first.Process.Pid)) {
		t.Errorf("second run: exit %d, stderr %s", code, se)
	}
	first.Process.Signal(syscall.SIGTERM)
	first.Wait()
	if _, err := os.Stat(out); err == nil {
		t.Error("--out exists although neither run finished")
	}
	if l := leftovers(filepath.Dir(out)); len(l) > 0 {
		t.Errorf("left behind: %v", l)
	}
	// Once the first run is gone the same --out works.
	if _, se, code := runBin(t, s.args(out)...); code != 0 {
		t.Errorf("run after the first one stopped: exit %d: %s", code, se)
	}
}

// TestDeadStagingRemoved: a run killed with SIGKILL (as a scheduler does
// at a task's time limit, after the grace time) leaves its staging folder
// and lock file; the same command run again works without cleaning by
// hand, removes that folder (its owner record names this --out and a
// dead process) and nothing else: a folder of the same name holding no
// record (a user's, or an earlier version's staging folder) and a staging
// folder of another --out stay, and the log says which were left. The
// same holds inside an existing --out (run --force).
func TestDeadStagingRemoved(t *testing.T) {
	s := newSmallStudy(t)
	parent := t.TempDir()
	out := filepath.Join(parent, "res")
	kill := func(args []string) string {
		t.Helper()
		cmd := exec.Command(areasweepBin, args...)
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		stage := waitForStage(t, out)
		time.Sleep(100 * time.Millisecond) // inside the scoring
		cmd.Process.Signal(syscall.SIGKILL)
		cmd.Wait()
		if _, err := os.Stat(filepath.Join(stage, ".areasweep-owner")); err != nil {
			t.Fatalf("the killed run's staging folder %s holds no owner record: %v", stage, err)
		}
		return stage
	}
	stage := kill(slowArgs(s, out))
	keep := []string{
		filepath.Join(parent, ".res.areasweep-partial-mine"), // a user's folder of that name
		filepath.Join(parent, ".res.partial-456"),            // an earlier version's name, no record
		filepath.Join(parent, ".other.areasweep-partial-99999-789"),
	}
	for _, d := range keep {
		os.MkdirAll(filepath.Join(d, "figures"), 0o755)
		os.WriteFile(filepath.Join(d, "results.json"), []byte("half"), 0o644)
	}
	if _, se, code := runBin(t, s.args(out)...); code != 0 {
		t.Fatalf("run after the kill: exit %d: %s", code, se)
	}
	if _, err := os.Stat(stage); err == nil {
		t.Errorf("the killed run's staging folder %s kept", stage)
	}
	for _, d := range keep {
		if _, err := os.Stat(filepath.Join(d, "results.json")); err != nil {
			t.Errorf("%s removed: %v", d, err)
		}
	}
	if _, err := os.Stat(filepath.Join(parent, ".res"+lockSuffix)); err == nil {
		t.Error("lock file kept after the run")
	}
	log, _ := os.ReadFile(filepath.Join(out, "run.log"))
	for _, w := range []string{"removed 1 staging folder(s)", "note: left 2 folder(s) named like staging folders", keep[0], keep[1]} {
		if !strings.Contains(string(log), w) {
			t.Errorf("run.log lacks %q:\n%s", w, log)
		}
	}
	for _, d := range keep {
		os.RemoveAll(d) // so that waitForStage finds the next run's
	}
	want := treeSums(t, out)
	stage = kill(slowArgs(s, out, "--force"))
	if filepath.Dir(stage) != out {
		t.Fatalf("staging folder %s, want it inside %s", stage, out)
	}
	got := treeSums(t, out)
	for p := range got {
		if strings.HasPrefix(p, stage+string(filepath.Separator)) {
			delete(got, p) // its own staging folder, hidden in --out
		}
	}
	if !sameSums(want, got) {
		t.Error("the killed --force run changed --out")
	}
	if _, se, code := runBin(t, s.args(out, "--force")...); code != 0 {
		t.Fatalf("run --force after the kill: exit %d: %s", code, se)
	}
	if _, err := os.Stat(stage); err == nil {
		t.Errorf("the killed run's staging folder %s kept", stage)
	}
	if l := leftovers(out); len(l) > 0 {
		t.Errorf("left in --out: %v", l)
	}
}

// TestOutputsHonourUmask: folders are made 0777 &^ umask and files
// 0666 &^ umask, like mkdir and touch do (the staging folder used to
// leave --out at 0700).
func TestOutputsHonourUmask(t *testing.T) {
	s := newSmallStudy(t)
	old := syscall.Umask(0o027)
	defer syscall.Umask(old)
	out := filepath.Join(t.TempDir(), "new", "res")
	if _, se, code := runBin(t, s.args(out)...); code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	for path, want := range map[string]os.FileMode{out: 0o750, filepath.Dir(out): 0o750, filepath.Join(out, "figures"): 0o750, filepath.Join(out, "results.json"): 0o640, filepath.Join(out, "report.html"): 0o640, filepath.Join(out, "figures", "metrics_vs_area.svg"): 0o640} {
		st, err := os.Stat(path)
		if err != nil {
			t.Fatal(err)
		}
		if st.Mode().Perm() != want {
			t.Errorf("%s has mode %v, want %v", path, st.Mode().Perm(), want)
		}
	}
}

// TestInfiniteCellsAreNoData: a model with +Inf and -Inf cells scores
// exactly like the same model with those cells set to the nodata value,
// whichever blocks they sit in.
func TestInfiniteCellsAreNoData(t *testing.T) {
	s := newSmallStudy(t)
	f := &badFixture{smallStudy: s}
	wgs := `GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["degree",0.0174532925199433]]`
	infAt := map[int]float64{5: math.Inf(1), 17*48 + 30: math.Inf(-1), 31*48 + 1: math.Inf(1)}
	withInf := f.rasterWith(t, "inf.tif", s.gt, wgs, func(i int) float64 {
		if v, ok := infAt[i]; ok {
			return v
		}
		return s.vals[i]
	})
	withNoData := f.rasterWith(t, "holes.tif", s.gt, wgs, func(i int) float64 {
		if _, ok := infAt[i]; ok {
			return math.NaN()
		}
		return s.vals[i]
	})
	var got [2]string
	for k, m := range []string{withInf, withNoData} {
		out := filepath.Join(t.TempDir(), "res")
		args := []string{"run", "--model", "m=" + m, "--occurrences", s.occ, "--region", s.region, "--iterations", "20", "--quiet", "--out", out}
		if _, se, code := runBin(t, args...); code != 0 {
			t.Fatalf("%s: exit %d: %s", m, code, se)
		}
		b, _ := os.ReadFile(filepath.Join(out, "scores.csv"))
		got[k] = string(b)
	}
	if got[0] != got[1] || got[0] == "" {
		t.Error("infinite cells are not scored as no data")
	}
}

// TestCrashReport: a recovered panic prints one line asking for a report,
// exits 3 and writes the trace into a run.log, not to the terminal.
func TestCrashReport(t *testing.T) {
	var buf bytes.Buffer
	code := reportCrash("index out of range [3] with length 2", []byte("goroutine 1 [running]:\nmain.x()"), &buf)
	msg := buf.String()
	if code != exitInternal || strings.Count(msg, "\n") != 1 || !strings.Contains(msg, "please report") || strings.Contains(msg, "goroutine") {
		t.Fatalf("exit %d, message %q", code, msg)
	}
	i := strings.LastIndex(msg, "with ")
	path := strings.TrimSpace(msg[i+len("with "):])
	b, err := os.ReadFile(path)
	if err != nil || !strings.Contains(string(b), "goroutine 1 [running]") || filepath.Base(path) != "run.log" {
		t.Fatalf("trace file %s: %v %q", path, err, b)
	}
	os.RemoveAll(filepath.Dir(path))
}

// TestVersionAndHelp: --version works, help shows readable types and
// defaults, and extents shows only the flags that shape the family.
func TestVersionAndHelp(t *testing.T) {
	so, se, code := runBin(t, "--version")
	if code != 0 || !strings.HasPrefix(so, "areasweep ") || se != "" {
		t.Errorf("--version: exit %d, %q %q", code, so, se)
	}
	vo, _, _ := runBin(t, "version")
	if vo != so {
		t.Errorf("version %q and --version %q differ", vo, so)
	}
	run, _, _ := runBin(t, "run", "--help")
	for _, bad := range []string{"float64Slice", "[0.05", "stringArray"} {
		if strings.Contains(run, bad) {
			t.Errorf("run --help shows %q", bad)
		}
	}
	for _, good := range []string{"--e LIST", "(default 0.05)", "--model NAME=PATH", "(default -50,50,100,250,500)"} {
		if !strings.Contains(run, good) {
			t.Errorf("run --help lacks %q", good)
		}
	}
	root, _, _ := runBin(t, "--help")
	if !strings.Contains(root, "Exit codes:") || !strings.Contains(root, "please report") {
		t.Errorf("--help does not list the exit codes:\n%s", root)
	}
	ext, _, _ := runBin(t, "extents", "--help")
	for _, hidden := range []string{"--iterations", "--thresholds", "--e ", "--workers", "--fraction", "--seed"} {
		if strings.Contains(ext, hidden) {
			t.Errorf("extents --help shows %s, which it does not use", hidden)
		}
	}
}

// TestLibraryMessagesStayOffTerminal: a good run whose region needs
// GEOS's repair (a bow-tie) and holds a feature without geometry prints
// no raw GDAL or GEOS line; the repair is reported as a warning naming
// the feature, and the library's own words go to run.log only.
func TestLibraryMessagesStayOffTerminal(t *testing.T) {
	s := newSmallStudy(t)
	region := filepath.Join(s.dir, "bowtie.geojson")
	os.WriteFile(region, []byte(`{"type":"FeatureCollection","features":[`+
		`{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[12.5,41.5],[18.5,46.5],[18.5,41.5],[12.5,46.5],[12.5,41.5]]]}},`+
		`{"type":"Feature","properties":{},"geometry":null}]}`), 0o644)
	out := filepath.Join(t.TempDir(), "res")
	args := []string{"run", "--model", "m=" + s.model, "--occurrences", s.occ, "--region", region, "--iterations", "5", "--out", out}
	_, se, code := runBin(t, args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	if m := forbidden.FindString(se); m != "" {
		t.Errorf("stderr holds %q:\n%s", m, se)
	}
	for _, w := range []string{"bowtie.geojson feature 1 had invalid geometry", "bowtie.geojson feature 2 has no geometry"} {
		if !strings.Contains(se, w) {
			t.Errorf("stderr lacks %q:\n%s", w, se)
		}
	}
}

// TestConstantModelAndThinningSummary: a model with one value everywhere
// runs but is warned about, and 120 duplicate presences are summarised in
// one log line instead of one line each.
func TestConstantModelAndThinningSummary(t *testing.T) {
	s := newSmallStudy(t)
	f := &badFixture{smallStudy: s}
	wgs := `GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["degree",0.0174532925199433]]`
	flat := f.rasterWith(t, "flat.tif", s.gt, wgs, func(i int) float64 {
		if math.IsNaN(s.vals[i]) {
			return math.NaN()
		}
		return 0.5
	})
	var occ strings.Builder
	occ.WriteString("lon,lat,role\n13.1,42.6,train\n14.1,43.6,train\n15.1,42.6,train\n13.5,43.0,test\n")
	for i := 0; i < 120; i++ {
		occ.WriteString("13.5,43.0,test\n")
	}
	occPath := filepath.Join(s.dir, "dups.csv")
	os.WriteFile(occPath, []byte(occ.String()), 0o644)
	out := filepath.Join(t.TempDir(), "res")
	_, se, code := runBin(t, "run", "--model", "m="+flat, "--occurrences", occPath, "--region", s.region, "--iterations", "5", "--out", out)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	if !strings.Contains(se, "model m has the same value (0.5) on every cell") {
		t.Errorf("no warning about the constant model:\n%s", se)
	}
	// The warning says what the run does: it did not score the model (it
	// said "its AUC is 0.5" while no AUC was reported).
	if !strings.Contains(se, "so it is not scored on any extent") {
		t.Errorf("the warning does not say the model is not scored:\n%s", se)
	}
	for _, sc := range loadResults(t, out).Scores {
		if sc.Model == "m" && sc.Scored {
			t.Errorf("the constant model is scored on %s", sc.Extent)
		}
	}
	if n := strings.Count(se, "thinned:"); n != 1 || !strings.Contains(se, "and 110 more") {
		t.Errorf("%d thinned lines (want one summary):\n%s", n, se)
	}
}

// TestNoThinSharedTestCellsWarned: under --no-thin, test points that share
// a cell are counted as independent records by every interval and test, so
// the run says so, with the counts (121 test points in one cell here:
// 120 share it); thinned (the default) they are one point and the warning
// is not given.
func TestNoThinSharedTestCellsWarned(t *testing.T) {
	s := newSmallStudy(t)
	var occ strings.Builder
	occ.WriteString("lon,lat,role\n13.1,42.6,train\n14.1,43.6,train\n15.1,42.6,train\n13.9,42.9,test\n")
	for i := 0; i < 121; i++ {
		occ.WriteString("13.5,43.0,test\n")
	}
	occPath := filepath.Join(s.dir, "dups.csv")
	if err := os.WriteFile(occPath, []byte(occ.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	const want = "120 of the 122 test points scored lie in a cell with another test point (--no-thin keeps them: 2 distinct cells)"
	for _, c := range []struct {
		flags []string
		warn  bool
	}{{[]string{"--no-thin"}, true}, {nil, false}} {
		out := filepath.Join(t.TempDir(), "res")
		args := append([]string{"run", "--model", "m=" + s.model, "--occurrences", occPath, "--region", s.region, "--iterations", "5", "--out", out}, c.flags...)
		_, se, code := runBin(t, args...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", c.flags, code, se)
		}
		if got := strings.Contains(se, want); got != c.warn {
			t.Errorf("%v: warning given %v, want %v:\n%s", c.flags, got, c.warn, se)
		}
		found := false
		for _, w := range loadResults(t, out).Warnings {
			found = found || strings.Contains(w, want)
		}
		if found != c.warn {
			t.Errorf("%v: warning in results.json %v, want %v", c.flags, found, c.warn)
		}
	}
}

// TestDemoStoppedCleansInputs: the demo writes its inputs inside the run's
// staging folder, so a SIGTERM removes them with it.
func TestDemoStoppedCleansInputs(t *testing.T) {
	parent := t.TempDir()
	out := filepath.Join(parent, "demo")
	cmd := exec.Command(areasweepBin, "demo", "--out", out, "--quiet")
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	waitForStage(t, out)
	cmd.Process.Signal(syscall.SIGTERM)
	err := cmd.Wait()
	if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != 143 {
		// The demo may have finished before the signal; then it must be whole.
		if err != nil {
			t.Fatalf("demo: %v", err)
		}
		if _, err := os.Stat(filepath.Join(out, "inputs", "study.yaml")); err != nil {
			t.Fatalf("demo finished without its inputs: %v", err)
		}
	} else if _, err := os.Stat(out); err == nil {
		t.Error("stopped demo left --out behind")
	}
	entries, _ := os.ReadDir(parent)
	for _, e := range entries {
		if e.Name() != "demo" {
			t.Errorf("left behind: %s", e.Name())
		}
	}
}
