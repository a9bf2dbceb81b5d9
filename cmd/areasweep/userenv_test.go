package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestUserGDALEnvironment: GDAL settings a user may have in the
// environment neither change the outputs nor put GDAL's own text on the
// terminal. Each case ran the small study differently before:
//
//   - CPL_DEBUG=ON: GDAL's debug lines ("GDAL: GDAL: GDALOpen(...)
//     succeeds as GTiff.") were printed on standard error by the GDAL
//     binding, 30 to 130 of them a run;
//   - OGR_SQLITE_JOURNAL=WAL, OGR_SQLITE_PRAGMA=page_size=1024: the
//     GeoPackages were written in another journal mode or page size, so
//     extents.gpkg and omitted_points.gpkg were not the bytes of the same
//     run without them (the README promises the same bytes);
//   - OSR_WKT_FORMAT=WKT1_ESRI: results.json recorded the grid's CRS as
//     ESRI WKT rather than EPSG:4326, and the GeoPackages held other CRS
//     text; GDAL_TIFF_ENDIANNESS=BIG wrote extents.tif big-endian;
//   - GDAL_CACHEMAX=-5 (any negative number): GDAL raised "Invalid value
//     for GDAL_CACHEMAX. Using default value" at the first block read,
//     which failed the run (exit 2) blaming the model as damaged.
//
// The expected outputs are those of the same run without the variable.
func TestUserGDALEnvironment(t *testing.T) {
	s := newSmallStudy(t)
	ref := filepath.Join(s.dir, "ref")
	if _, se, code := runBin(t, s.args(ref)...); code != 0 {
		t.Fatalf("reference run: exit %d: %s", code, se)
	}
	want := outputFiles(ref)
	for _, tc := range []struct{ name, key, value string }{
		{"debug", "CPL_DEBUG", "ON"},
		{"wal", "OGR_SQLITE_JOURNAL", "WAL"},
		{"pragma", "OGR_SQLITE_PRAGMA", "page_size=1024"},
		{"cachemax", "GDAL_CACHEMAX", "-5"},
		{"wkt", "OSR_WKT_FORMAT", "WKT1_ESRI"},
		{"endianness", "GDAL_TIFF_ENDIANNESS", "BIG"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Setenv(tc.key, tc.value) // the binary inherits it
			out := filepath.Join(s.dir, tc.name)
			// Without --quiet: the progress lines are on standard error,
			// where a library's own lines would show.
			args := s.args(out)
			args = args[:len(args)-3]
			args = append(args, "--out", out)
			_, se, code := runBin(t, args...)
			if code != 0 {
				t.Fatalf("%s=%s: exit %d: %s", tc.key, tc.value, code, se)
			}
			for _, l := range strings.Split(se, "\n") {
				if strings.HasPrefix(l, "GDAL:") || strings.Contains(l, "GDAL_CACHEMAX") {
					t.Errorf("%s=%s: a library's line on standard error: %s", tc.key, tc.value, l)
					break
				}
			}
			got := outputFiles(out)
			for name, b := range want {
				if !bytes.Equal(got[name], b) {
					t.Errorf("%s=%s: %s differs from the run without it", tc.key, tc.value, name)
				}
			}
			if len(got) != len(want) {
				t.Errorf("%s=%s: %d files, want %d", tc.key, tc.value, len(got), len(want))
			}
		})
	}
}

// TestBrokenPipe: a run whose standard error (or output) is a pipe that
// its reader closed, as with `areasweep run ... 2>&1 | head`, used to be
// killed by SIGPIPE at its next progress line (exit 141), leaving its
// staging folder and lock file beside --out and no outputs. A broken pipe
// now only loses the lines (run.log keeps them): the run finishes, exit 0,
// with the outputs of the same run written to a terminal.
func TestBrokenPipe(t *testing.T) {
	s := newSmallStudy(t)
	ref := filepath.Join(s.dir, "ref")
	if _, se, code := runBin(t, s.args(ref)...); code != 0 {
		t.Fatalf("reference run: exit %d: %s", code, se)
	}
	want, _ := os.ReadFile(filepath.Join(ref, "results.json"))
	for _, stream := range []string{"stderr", "stdout"} {
		t.Run(stream, func(t *testing.T) {
			out := filepath.Join(s.dir, stream)
			args := s.args(out)
			args = args[:len(args)-3] // without --quiet: the progress lines
			args = append(args, "--out", out)
			r, w, err := os.Pipe()
			if err != nil {
				t.Fatal(err)
			}
			r.Close() // the reader is gone before the first line
			cmd := exec.Command(areasweepBin, args...)
			var other bytes.Buffer
			if stream == "stderr" {
				cmd.Stderr, cmd.Stdout = w, &other
			} else {
				cmd.Stdout, cmd.Stderr = w, &other
			}
			err = cmd.Run()
			w.Close()
			if code := exitCode(err); code != 0 {
				t.Fatalf("exit %d (%v), want 0; other stream:\n%s", code, err, other.String())
			}
			got, _ := os.ReadFile(filepath.Join(out, "results.json"))
			if len(got) == 0 || !bytes.Equal(got, want) {
				t.Error("results.json missing or not that of the same run")
			}
			entries, _ := os.ReadDir(s.dir)
			for _, e := range entries {
				if strings.HasPrefix(e.Name(), "."+stream+".") {
					t.Errorf("left beside --out: %s", e.Name())
				}
			}
		})
	}
}

// TestPROJDataMissing: PROJ_DATA or PROJ_LIB in the environment naming a
// folder without PROJ's database (proj.db) failed run with PROJ's own
// text, blaming the model ("model m: PATH: PROJ cannot make EPSG:4326 (is
// proj-data installed?): PROJ: proj_create_from_database: Cannot find
// proj.db"), the demo with exit 1 as a failed write of its folder, and a
// batch study by study (exit 1). Each now refuses before anything is
// written (exit 2), in one line naming the variable and what to do.
func TestPROJDataMissing(t *testing.T) {
	s := newSmallStudy(t)
	empty := t.TempDir()
	table := filepath.Join(s.dir, "studies.csv")
	os.WriteFile(table, []byte("id,model,occurrences,region\nsp1,m="+s.model+","+s.occ+","+s.region+"\n"), 0o644)
	for _, tc := range []struct {
		name, env string
		args      func(out string) []string
	}{
		{"run PROJ_DATA missing", "PROJ_DATA=" + filepath.Join(empty, "gone"), func(out string) []string { return s.args(out) }},
		{"run PROJ_LIB empty", "PROJ_LIB=" + empty, func(out string) []string { return s.args(out) }},
		{"extents", "PROJ_DATA=" + empty, func(out string) []string { return append([]string{"extents"}, s.args(out)[1:]...) }},
		{"demo", "PROJ_DATA=" + empty, func(out string) []string { return []string{"demo", "--quiet", "--out", out} }},
		{"batch", "PROJ_DATA=" + empty, func(out string) []string { return []string{"batch", table, "--quiet", "--out", out} }},
	} {
		t.Run(tc.name, func(t *testing.T) {
			out := filepath.Join(s.dir, strings.ReplaceAll(tc.name, " ", "_"))
			cmd := exec.Command(areasweepBin, tc.args(out)...)
			cmd.Env = append(os.Environ(), tc.env)
			var so, se bytes.Buffer
			cmd.Stdout, cmd.Stderr = &so, &se
			if code := exitCode(cmd.Run()); code != 2 {
				t.Fatalf("exit %d, want 2; stderr:\n%s", code, se.String())
			}
			lines := strings.Split(strings.TrimSpace(se.String()), "\n")
			if len(lines) != 1 || !strings.HasPrefix(lines[0], "areasweep: PROJ") {
				t.Errorf("stderr is not one areasweep: line about PROJ:\n%s", se.String())
			}
			key, _, _ := strings.Cut(tc.env, "=")
			for _, want := range []string{key + "=", "proj.db", "unset it"} {
				if !strings.Contains(se.String(), want) {
					t.Errorf("stderr does not say %q:\n%s", want, se.String())
				}
			}
			if strings.Contains(se.String(), "proj_create") || strings.Contains(se.String(), "model m") {
				t.Errorf("stderr holds PROJ's words or blames the model:\n%s", se.String())
			}
			if _, err := os.Stat(out); !os.IsNotExist(err) {
				t.Errorf("%s was created", out)
			}
		})
	}
}

// TestGDALSkipNeededDriver: GDAL_SKIP (or OGR_SKIP) naming a driver
// areasweep needs refused the inputs in misleading words: with GTiff
// skipped every model was "not a raster GDAL can read ... check that it
// opens in a GIS", with GPKG skipped the region GeoPackage was read by
// GDAL's plain SQLite driver and refused as 'layer "gpkg_contents" has no
// geometry'. Each now refuses before anything is written (exit 2), naming
// the driver and the variable; a driver areasweep does not need may be
// skipped as before.
func TestGDALSkipNeededDriver(t *testing.T) {
	s := newSmallStudy(t)
	table := filepath.Join(s.dir, "studies.csv")
	os.WriteFile(table, []byte("id,model,occurrences,region\nsp1,m="+s.model+","+s.occ+","+s.region+"\n"), 0o644)
	for _, tc := range []struct {
		name, env, driver string
		args              func(out string) []string
	}{
		{"run GTiff", "GDAL_SKIP=GTiff", "GTiff", func(out string) []string { return s.args(out) }},
		{"run GPKG", "GDAL_SKIP=SQLite GPKG", "GPKG", func(out string) []string { return s.args(out) }},
		{"run OGR_SKIP", "OGR_SKIP=GPKG", "GPKG", func(out string) []string { return s.args(out) }},
		{"demo", "GDAL_SKIP=GTiff", "GTiff", func(out string) []string { return []string{"demo", "--quiet", "--out", out} }},
		{"batch", "GDAL_SKIP=GPKG", "GPKG", func(out string) []string { return []string{"batch", table, "--quiet", "--out", out} }},
		{"run JP2OpenJPEG", "GDAL_SKIP=JP2OpenJPEG", "", func(out string) []string { return s.args(out) }},
	} {
		t.Run(tc.name, func(t *testing.T) {
			out := filepath.Join(s.dir, strings.ReplaceAll(tc.name, " ", "_"))
			cmd := exec.Command(areasweepBin, tc.args(out)...)
			cmd.Env = append(os.Environ(), tc.env)
			var se bytes.Buffer
			cmd.Stderr = &se
			code := exitCode(cmd.Run())
			if tc.driver == "" {
				if code != 0 {
					t.Fatalf("exit %d, want 0; stderr:\n%s", code, se.String())
				}
				return
			}
			if code != 2 {
				t.Fatalf("exit %d, want 2; stderr:\n%s", code, se.String())
			}
			lines := strings.Split(strings.TrimSpace(se.String()), "\n")
			if len(lines) != 1 || !strings.HasPrefix(lines[0], "areasweep: GDAL's "+tc.driver+" driver") {
				t.Errorf("stderr is not one areasweep: line about the %s driver:\n%s", tc.driver, se.String())
			}
			key, _, _ := strings.Cut(tc.env, "=")
			if !strings.Contains(se.String(), key+"=") {
				t.Errorf("stderr does not name %s:\n%s", key, se.String())
			}
			if _, err := os.Stat(out); !os.IsNotExist(err) {
				t.Errorf("%s was created", out)
			}
		})
	}
}

// TestRunTMPDIRUnusableFailsEarly: a run whose temporary folder the PDF
// figures cannot use (TMPDIR missing) failed only once the report was
// drawn, after the whole scoring ("report written ..." then "writing the
// results into OUT failed: the PDF figures need the temporary folder
// ..."): hours lost on a large study. It now fails before any work, on one
// line (exit 1, as README's exit codes say), with nothing created; the
// extents command, which draws no figure, still runs.
func TestRunTMPDIRUnusableFailsEarly(t *testing.T) {
	s := newSmallStudy(t)
	tmp := filepath.Join(t.TempDir(), "gone")
	out := filepath.Join(s.dir, "out")
	args := s.args(out)
	args = args[:len(args)-3] // without --quiet: the progress lines
	args = append(args, "--out", out)
	cmd := exec.Command(areasweepBin, args...)
	cmd.Env = append(os.Environ(), "TMPDIR="+tmp)
	var se bytes.Buffer
	cmd.Stderr = &se
	if code := exitCode(cmd.Run()); code != 1 {
		t.Fatalf("exit %d, want 1; stderr:\n%s", code, se.String())
	}
	lines := strings.Split(strings.TrimSpace(se.String()), "\n")
	if len(lines) != 1 || !strings.HasPrefix(lines[0], "areasweep: the PDF figures need the temporary folder "+tmp+" (TMPDIR)") {
		t.Errorf("stderr is not the one line about TMPDIR:\n%s", se.String())
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("%s was created", out)
	}
	// A batch checked it study by study, and wrote a summary of failures.
	table := filepath.Join(s.dir, "studies.csv")
	os.WriteFile(table, []byte("id,model,occurrences,region\nsp1,m="+s.model+","+s.occ+","+s.region+"\n"), 0o644)
	bout := filepath.Join(s.dir, "batch")
	batch := exec.Command(areasweepBin, "batch", table, "--quiet", "--out", bout)
	batch.Env = cmd.Env
	se.Reset()
	batch.Stderr = &se
	if code := exitCode(batch.Run()); code != 1 || !strings.Contains(se.String(), "(TMPDIR)") {
		t.Errorf("batch: exit %d, want 1 with the message about TMPDIR; stderr:\n%s", code, se.String())
	}
	if _, err := os.Stat(bout); !os.IsNotExist(err) {
		t.Errorf("%s was created", bout)
	}
	ext := exec.Command(areasweepBin, append([]string{"extents"}, s.args(filepath.Join(s.dir, "ext"))[1:]...)...)
	ext.Env = cmd.Env
	if b, err := ext.CombinedOutput(); err != nil {
		t.Errorf("extents with TMPDIR missing: %v\n%s", err, b)
	}
}

// walEnv names the GeoPackage TestHelperPendingWAL writes to.
const walEnv = "AREASWEEP_TEST_PENDING_WAL"

// TestHelperPendingWAL is not a test: run as a child process by
// TestInputWithPendingWAL, it switches the GeoPackage named by walEnv to
// WAL mode, commits a change and exits without closing it, as a program
// (QGIS) does that still has the file open or was stopped: the change is
// left in the file's -wal beside it.
func TestHelperPendingWAL(t *testing.T) {
	path := os.Getenv(walEnv)
	if path == "" {
		t.Skip("run by TestInputWithPendingWAL")
	}
	ds, err := godal.Open(path, godal.Update(), godal.VectorOnly(), godal.ConfigOption("OGR_SQLITE_JOURNAL=WAL"))
	if err != nil {
		t.Fatal(err)
	}
	if os.Getenv(walEnv+"_CLOSE") != "" {
		// Only switch it to WAL mode (kept in its header), closed as
		// usual: no -wal file stays.
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
		os.Exit(0)
	}
	for _, sql := range []string{"PRAGMA wal_autocheckpoint=0", "CREATE TABLE note (x INTEGER)", "INSERT INTO note VALUES (1)"} {
		rs, err := ds.ExecuteSQL(sql)
		if err != nil {
			t.Fatal(err)
		}
		if rs != nil {
			rs.Close()
		}
	}
	os.Exit(0) // without closing: the change stays in the -wal file
}

// gpkgRegion writes the small study's region as a GeoPackage beside it
// and makes it the study's region.
func gpkgRegion(t *testing.T, s *smallStudy) {
	t.Helper()
	src, err := godal.Open(s.region, godal.VectorOnly())
	if err != nil {
		t.Fatal(err)
	}
	gpkg := filepath.Join(s.dir, "region.gpkg")
	dst, err := src.VectorTranslate(gpkg, []string{"-f", "GPKG"})
	src.Close()
	if err != nil {
		t.Fatal(err)
	}
	dst.Close()
	s.region = gpkg
}

// TestWALGeoPackageInReadOnlyFolder: a GeoPackage in WAL mode (as QGIS
// leaves one it edited) in a folder the user cannot write to (a shared
// data folder) was refused as "not a vector file GDAL can read (attempt
// to write a readonly database: this file is a WAL-enabled database. It
// cannot be opened because it is presumably read-only or in a read-only
// directory. Retrying with IMMUTABLE=YES open option)", though GDAL reads
// it so. It is now read, with GDAL's warning in run.log, and gives the
// scores of the same region in a folder the user can write to. Run as
// nobody (root writes in any folder), so only when the tests run as root.
func TestWALGeoPackageInReadOnlyFolder(t *testing.T) {
	if os.Geteuid() != 0 {
		t.Skip("needs root, to run areasweep as another user")
	}
	s := newSmallStudy(t)
	gpkgRegion(t, s)
	helper := exec.Command(os.Args[0], "-test.run=^TestHelperPendingWAL$")
	helper.Env = append(os.Environ(), walEnv+"="+s.region, walEnv+"_CLOSE=1")
	if b, err := helper.CombinedOutput(); err != nil {
		t.Fatalf("helper: %v\n%s", err, b)
	}
	ref := filepath.Join(s.dir, "ref")
	if _, se, code := runBin(t, s.args(ref)...); code != 0 {
		t.Fatalf("run as root: exit %d: %s", code, se)
	}
	// nobody reaches the binary and the inputs (root's folders, not
	// writable by nobody), and writes into a folder of its own.
	for _, d := range []string{filepath.Dir(areasweepBin), s.dir, filepath.Dir(s.dir)} {
		if err := os.Chmod(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	outs := filepath.Join(s.dir, "nobody")
	if err := os.Mkdir(outs, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.Chown(outs, 65534, 65534); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(outs, "out")
	cmd := exec.Command(areasweepBin, s.args(out)...)
	cmd.SysProcAttr = &syscall.SysProcAttr{Credential: &syscall.Credential{Uid: 65534, Gid: 65534}}
	var se bytes.Buffer
	cmd.Stderr = &se
	if code := exitCode(cmd.Run()); code != 0 {
		t.Fatalf("run as nobody: exit %d, want 0; stderr:\n%s", code, se.String())
	}
	a, _ := os.ReadFile(filepath.Join(ref, "scores.csv"))
	b, _ := os.ReadFile(filepath.Join(out, "scores.csv"))
	if len(a) == 0 || !bytes.Equal(a, b) {
		t.Error("scores.csv differs from the run that could write beside the region")
	}
	if log, _ := os.ReadFile(filepath.Join(out, "run.log")); !strings.Contains(string(log), "library warning:") {
		t.Error("run.log does not keep GDAL's warning")
	}
}

// TestInputWithPendingWAL: a region GeoPackage whose latest changes were
// still in its -wal file (QGIS had it open, or was stopped) was read as
// it was: GDAL, though reading only, wrote the changes into the input and
// removed its -wal and -shm files, so the input's bytes changed after the
// run had taken their SHA-256, and files the run did not create were
// deleted. The run now refuses it (exit 2) naming the -wal file, and the
// three files are left as they were.
func TestInputWithPendingWAL(t *testing.T) {
	s := newSmallStudy(t)
	gpkgRegion(t, s)
	cmd := exec.Command(os.Args[0], "-test.run=^TestHelperPendingWAL$")
	cmd.Env = append(os.Environ(), walEnv+"="+s.region)
	if b, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("helper: %v\n%s", err, b)
	}
	before := map[string][]byte{}
	for _, suffix := range []string{"", "-wal", "-shm"} {
		b, err := os.ReadFile(s.region + suffix)
		if err != nil {
			t.Fatalf("the helper left no %s: %v", s.region+suffix, err)
		}
		before[suffix] = b
	}
	if len(before["-wal"]) == 0 {
		t.Fatal("the helper left an empty -wal file")
	}
	out := filepath.Join(s.dir, "out")
	_, se, code := runBin(t, s.args(out)...)
	if code != 2 {
		t.Fatalf("exit %d, want 2; stderr:\n%s", code, se)
	}
	for _, want := range []string{"region: " + s.region, filepath.Base(s.region) + "-wal", "close the program"} {
		if !strings.Contains(se, want) {
			t.Errorf("stderr does not say %q:\n%s", want, se)
		}
	}
	for suffix, b := range before {
		if got, err := os.ReadFile(s.region + suffix); err != nil || !bytes.Equal(got, b) {
			t.Errorf("%s changed or was removed (%v)", s.region+suffix, err)
		}
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("%s was created", out)
	}
}

// TestRelativePathsFromLinkedFolder: in a folder entered through a
// symbolic link (the shell's $PWD is the link's path), "../x" is resolved
// as the system resolves it, from the folder the link points to, as
// mkdir, cat and GDAL do. areasweep resolved it beside the link: --out
// ../res went into another folder than `mkdir ../res` makes, and a batch
// table named ../t.csv was read (by the system) but its rows' relative
// paths were resolved beside the link, each refused as missing (exit 1).
func TestRelativePathsFromLinkedFolder(t *testing.T) {
	s := newSmallStudy(t)
	base := t.TempDir()
	real := filepath.Join(base, "real", "sub")
	if err := os.MkdirAll(real, 0o755); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(base, "link")
	if err := os.Symlink(real, link); err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{s.model, s.occ, s.region} {
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		os.WriteFile(filepath.Join(base, "real", filepath.Base(f)), b, 0o644)
	}
	table := "id,model,occurrences,region\nsp1,m=" + filepath.Base(s.model) + "," + filepath.Base(s.occ) + "," + filepath.Base(s.region) + "\n"
	os.WriteFile(filepath.Join(base, "real", "t.csv"), []byte("# iterations: 20\n"+table), 0o644)
	run := func(args ...string) (string, int) {
		cmd := exec.Command(areasweepBin, args...)
		cmd.Dir = link // the child's $PWD is the link's path, as a shell's
		var se bytes.Buffer
		cmd.Stderr = &se
		return se.String(), exitCode(cmd.Run())
	}
	in := func(name string) string { return filepath.Join("..", name) }
	if se, code := run("run", "--model", "m="+in(filepath.Base(s.model)), "--occurrences", in(filepath.Base(s.occ)), "--region", in(filepath.Base(s.region)),
		"--iterations", "20", "--quiet", "--out", "../res"); code != 0 {
		t.Fatalf("run: exit %d: %s", code, se)
	}
	if _, err := os.Stat(filepath.Join(base, "real", "res", "results.json")); err != nil {
		t.Errorf("--out ../res is not beside the folder the link points to: %v", err)
	}
	if _, err := os.Stat(filepath.Join(base, "res")); err == nil {
		t.Error("--out ../res was written beside the link")
	}
	if se, code := run("batch", "../t.csv", "--quiet", "--out", "../batch"); code != 0 {
		t.Fatalf("batch ../t.csv: exit %d: %s", code, se)
	}
	if _, err := os.Stat(filepath.Join(base, "real", "batch", "sp1", "results.json")); err != nil {
		t.Errorf("the batch's study has no results beside the folder the link points to: %v", err)
	}
}
