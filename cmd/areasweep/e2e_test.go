package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/cmd/internal/smallstudy"
	"areasweep/extent/vocab"
	"areasweep/report"
)

// binary is the areasweep executable built once for the end-to-end tests.
var areasweepBin string

func TestMain(m *testing.M) {
	dir, err := os.MkdirTemp("", "areasweep-e2e-")
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	areasweepBin = filepath.Join(dir, "areasweep")
	out, err := exec.Command("go", "build", "-o", areasweepBin, ".").CombinedOutput()
	if err != nil {
		fmt.Fprintf(os.Stderr, "build areasweep: %v\n%s", err, out)
		os.Exit(1)
	}
	godal.RegisterAll()
	code := m.Run()
	os.RemoveAll(dir)
	os.Exit(code)
}

// runBin runs the built binary and returns stdout, stderr and exit code.
func runBin(t *testing.T, args ...string) (string, string, int) {
	t.Helper()
	return runExe(t, areasweepBin, args...)
}

// exitCode is the exit code of a finished command from the error its Run
// or Wait returned: 0 for none, the code of an exit error, -1 when the
// command did not start or its end could not be read.
func exitCode(err error) int {
	if err == nil {
		return 0
	}
	if ee, ok := err.(*exec.ExitError); ok {
		return ee.ExitCode()
	}
	return -1
}

// smallStudy is smallstudy.Study (the tiny generated study: see there)
// with the names these tests use.
type smallStudy struct {
	dir, model, model2, occ, region, far string
	vals                                 []float64 // row-major, NaN = no data
	w, h                                 int
	gt                                   [6]float64
}

const smallNoData = smallstudy.NoData

// writeRaster writes vals as a tiled Float32 GeoTIFF (smallstudy.WriteRaster).
func writeRaster(t *testing.T, path string, w, h int, gt [6]float64, vals []float64, withCRS bool) {
	t.Helper()
	smallstudy.WriteRaster(t, path, w, h, gt, vals, withCRS)
}

// newSmallStudy writes smallstudy's study into a temporary folder.
func newSmallStudy(t *testing.T) *smallStudy {
	t.Helper()
	g := smallstudy.New(t, t.TempDir())
	return &smallStudy{dir: g.Dir, model: g.Model, model2: g.Model2, occ: g.Occ, region: g.Region, far: g.Far, vals: g.Vals, w: g.W, h: g.H, gt: g.GT}
}

// cellAreaKm2 is the WGS84 area of a latitude-longitude cell by the
// authalic-latitude formula A = R_q^2 dlon (sin b2 - sin b1), written here
// independently of the geodesy package (Snyder 1987, USGS PP 1395, eq. 3-11
// and 3-13).
func cellAreaKm2(lat1, lat2, dlonDeg float64) float64 {
	a := 6378.137
	f := 1 / 298.257223563
	e2 := f * (2 - f)
	e := math.Sqrt(e2)
	q := func(phi float64) float64 {
		s := math.Sin(phi)
		return (1 - e2) * (s/(1-e2*s*s) - 1/(2*e)*math.Log((1-e*s)/(1+e*s)))
	}
	qp := q(math.Pi / 2)
	rq2 := a * a * qp / 2
	beta := func(lat float64) float64 { return math.Asin(q(lat*math.Pi/180) / qp) }
	return rq2 * dlonDeg * math.Pi / 180 * (math.Sin(beta(lat2)) - math.Sin(beta(lat1)))
}

// bruteAUC is the area-weighted Mann-Whitney AUC by the definition, over
// every pair (presence, background cell).
func bruteAUC(pres []float64, bg []float64, w []float64) float64 {
	num, den := 0.0, 0.0
	for _, p := range pres {
		for i, v := range bg {
			switch {
			case v < p:
				num += w[i]
			case v == p:
				num += w[i] / 2
			}
			den += w[i]
		}
	}
	return num / den
}

// readBands reads every band of a Byte GeoTIFF.
func readBands(t *testing.T, path string) (names []string, bands [][]byte) {
	t.Helper()
	ds, err := godal.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer ds.Close()
	st := ds.Structure()
	for _, b := range ds.Bands() {
		buf := make([]byte, st.SizeX*st.SizeY)
		if err := b.Read(0, 0, buf, st.SizeX, st.SizeY); err != nil {
			t.Fatal(err)
		}
		names = append(names, b.Description())
		bands = append(bands, buf)
	}
	return names, bands
}

func loadResults(t *testing.T, dir string) *report.Results {
	t.Helper()
	r, err := report.Load(filepath.Join(dir, "results.json"))
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func (s *smallStudy) args(out string, extra ...string) []string {
	a := []string{"run", "--model", "m=" + s.model, "--model", "sq=" + s.model2, "--occurrences", s.occ, "--region", s.region,
		"--region-buffers=-40,60,150", "--point-buffers", "40,80", "--hull-buffers", "0,50", "--e", "0.05,0.2",
		"--iterations", "50", "--seed", "9", "--membership-tif", "--quiet", "--out", out}
	return append(a, extra...)
}

// TestRunAgainstBruteForce checks every extent's AUC, cell count, area and
// the nested-ring mix against a brute-force computation from the raw cells.
func TestRunAgainstBruteForce(t *testing.T) {
	s := newSmallStudy(t)
	out := filepath.Join(s.dir, "out")
	_, se, code := runBin(t, s.args(out)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	res := loadResults(t, out)
	names, bands := readBands(t, filepath.Join(out, "extents.tif"))
	if len(names) != len(res.Extents) {
		t.Fatalf("extents.tif has %d bands, results %d extents", len(names), len(res.Extents))
	}
	// Scored test points' values.
	var test []float64
	for _, p := range res.Points {
		if p.Role == vocab.RoleTest && p.Status == vocab.PointScored {
			test = append(test, s.vals[p.Row*s.w+p.Col])
		}
	}
	if res.PointCounts.OutsideRaster != 1 {
		t.Errorf("outside_raster = %d, want 1 (the point at lon 30)", res.PointCounts.OutsideRaster)
	}
	areaRow := make([]float64, s.h)
	for r := range areaRow {
		top := 48 - float64(r)*0.25
		areaRow[r] = cellAreaKm2(top-0.25, top, 0.25)
	}
	scores := map[string]report.Score{}
	for _, sc := range res.Scores {
		scores[sc.Model+"/"+sc.Extent] = sc
	}
	bgOf := func(band []byte) (vals, w []float64, inside func(r, c int) bool) {
		for i, b := range band {
			if b == 1 && !math.IsNaN(s.vals[i]) {
				vals = append(vals, s.vals[i])
				w = append(w, areaRow[i/s.w])
			}
		}
		return vals, w, func(r, c int) bool { return band[r*s.w+c] == 1 }
	}
	for k, e := range res.Extents {
		if names[k] != e.ID {
			t.Fatalf("band %d is %q, extent %q", k, names[k], e.ID)
		}
		if e.Status != vocab.StatusOK {
			continue
		}
		vals, w, inside := bgOf(bands[k])
		area := 0.0
		for _, x := range w {
			area += x
		}
		if int64(len(vals)) != e.Cells {
			t.Errorf("%s: cells %d, brute force %d", e.ID, e.Cells, len(vals))
		}
		if math.Abs(area-e.AreaKm2) > 1e-9*area {
			t.Errorf("%s: area %.6f km2, authalic-latitude formula %.6f", e.ID, e.AreaKm2, area)
		}
		var pres []float64
		for _, p := range res.Points {
			if p.Role == vocab.RoleTest && p.Status == vocab.PointScored && inside(p.Row, p.Col) {
				pres = append(pres, s.vals[p.Row*s.w+p.Col])
			}
		}
		sc := scores["m/"+e.ID]
		if sc.TestPoints+sc.TestOutside != len(test) {
			t.Errorf("%s: %d test points inside + %d outside, want %d in all", e.ID, sc.TestPoints, sc.TestOutside, len(test))
		}
		if len(pres) == 0 {
			if sc.Scored {
				t.Errorf("%s: scored without test points", e.ID)
			}
			continue
		}
		// Minimum training presence: from all scored training points, the
		// same on every extent; omission and area fraction by brute force.
		mtp := math.Inf(1)
		for _, p := range res.Points {
			if p.Role == vocab.RoleTrain && p.Status == vocab.PointScored {
				mtp = math.Min(mtp, s.vals[p.Row*s.w+p.Col])
			}
		}
		omitted, above := 0, 0.0
		for _, v := range pres {
			if v < mtp {
				omitted++
			}
		}
		for i, v := range vals {
			if v >= mtp {
				above += w[i]
			}
		}
		if th := sc.Thresholds[0]; th.Name != "minimum_training_presence" || th.Value != mtp ||
			th.Omission != float64(omitted)/float64(len(pres)) || math.Abs(th.AreaFraction-above/area) > 1e-9 {
			t.Errorf("%s: MTP threshold %+v; brute force value %v omission %v area fraction %v", e.ID, th, mtp, float64(omitted)/float64(len(pres)), above/area)
		}
		want := bruteAUC(pres, vals, w)
		if !sc.Scored || math.Abs(sc.AUC-want) > 1e-9 {
			t.Errorf("%s: auc %.12f, brute force %.12f (scored %v %s)", e.ID, sc.AUC, want, sc.Scored, sc.NotScored)
		}
		ones := make([]float64, len(w))
		for i := range ones {
			ones[i] = 1
		}
		if wantU := bruteAUC(pres, vals, ones); math.Abs(sc.AUCUnweighted-wantU) > 1e-9 {
			t.Errorf("%s: auc_unweighted %.12f, brute force %.12f", e.ID, sc.AUCUnweighted, wantU)
		}
		// Squaring keeps the ranking: same AUC and partial ROC (property).
		sq := scores["sq/"+e.ID]
		if math.Abs(sq.AUC-sc.AUC) > 1e-12 || math.Abs(sq.PartialROC[0].Ratio-sc.PartialROC[0].Ratio) > 1e-9 {
			t.Errorf("%s: squared model auc %.12f / pROC %.9f, model %.12f / %.9f", e.ID, sq.AUC, sq.PartialROC[0].Ratio, sc.AUC, sc.PartialROC[0].Ratio)
		}
	}
	// Rings: recompute the ring AUC from the raw cells of outer minus inner.
	idx := map[string]int{}
	for k, e := range res.Extents {
		idx[e.ID] = k
	}
	if len(res.Rings) == 0 {
		t.Fatal("no rings in results")
	}
	for _, rg := range res.Rings {
		if rg.Model != "m" {
			continue
		}
		in, outer := bands[idx[rg.Inner]], bands[idx[rg.Outer]]
		ring := make([]byte, len(in))
		for i := range ring {
			if outer[i] == 1 && in[i] == 0 {
				ring[i] = 1
			}
			if in[i] == 1 && outer[i] == 0 {
				t.Fatalf("%s is not inside %s at cell %d", rg.Inner, rg.Outer, i)
			}
		}
		vals, w, _ := bgOf(ring)
		_, _, insideOuter := bgOf(outer)
		var pres []float64
		for _, p := range res.Points {
			if p.Role == vocab.RoleTest && p.Status == vocab.PointScored && insideOuter(p.Row, p.Col) {
				pres = append(pres, s.vals[p.Row*s.w+p.Col])
			}
		}
		if len(vals) > 0 {
			if want := bruteAUC(pres, vals, w); math.Abs(rg.AUCRing-want) > 1e-9 {
				t.Errorf("ring %s-%s: auc %.12f, brute force %.12f", rg.Outer, rg.Inner, rg.AUCRing, want)
			}
		}
		mix := (rg.InnerAreaKm2*rg.AUCInner + rg.RingAreaKm2*rg.AUCRing) / (rg.InnerAreaKm2 + rg.RingAreaKm2)
		if math.Abs(mix-rg.AUCOuter) > 1e-9 {
			t.Errorf("ring %s-%s: mix %.12f, outer %.12f", rg.Outer, rg.Inner, mix, rg.AUCOuter)
		}
	}
	_ = test
	checkGeoPackage(t, filepath.Join(out, "extents.gpkg"), res, 0.25*0.25)
	// Reading the inputs must not write beside them (GDAL .aux.xml files).
	if side, _ := filepath.Glob(filepath.Join(s.dir, "*.aux.xml")); len(side) > 0 {
		t.Errorf("the run wrote beside its inputs: %v", side)
	}
	for _, f := range []string{"results.json", "scores.csv", "extents.gpkg", "run.log", "omitted_points.gpkg"} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Errorf("output %s missing: %v", f, err)
		}
	}
	// run.log in pass order: each pass's scores before the next pass's
	// lines, the null's sorting bias before the outputs.
	logText, err := os.ReadFile(filepath.Join(out, "run.log"))
	if err != nil {
		t.Fatal(err)
	}
	at := -1
	for _, line := range []string{"\nm: read once", "\nm on base: AUC", "\nm: scores on", "\nsq: read once", "\nsq on base: AUC", "\nsq: scores on",
		"\ndistance_null: computed cell by cell", "\ndistance_null (distance-only null) on base: AUC", "\ndistance_null: scores on", "\nsorting bias on base:",
		"\nextents.gpkg written", "\nanalysis in"} {
		i := strings.Index(string(logText), line)
		if i <= at {
			t.Errorf("run.log: %q at %d, after the line before it (%d):\n%s", line, i, at, logText)
		}
		at = i
	}
}

// TestRunReproducible checks byte-identical results.json on 1 and 2 cores.
func TestRunReproducible(t *testing.T) {
	s := newSmallStudy(t)
	var got [][]byte
	for _, w := range []string{"1", "2"} {
		out := filepath.Join(s.dir, "out"+w)
		// The Go runtime's core count too (the default of --workers and
		// the report's renderings in parallel): 1, then 3.
		t.Setenv("GOMAXPROCS", map[string]string{"1": "1", "2": "3"}[w])
		if _, se, code := runBin(t, s.args(out, "--workers", w)...); code != 0 {
			t.Fatalf("exit %d: %s", code, se)
		}
		b, err := os.ReadFile(filepath.Join(out, "results.json"))
		if err != nil {
			t.Fatal(err)
		}
		got = append(got, b)
	}
	if !bytes.Equal(got[0], got[1]) {
		t.Error("results.json differs between --workers 1 and --workers 2")
	}
	for _, f := range []string{"extents.gpkg", "scores.csv", "report.html"} {
		a, _ := os.ReadFile(filepath.Join(s.dir, "out1", f))
		b, _ := os.ReadFile(filepath.Join(s.dir, "out2", f))
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s differs between --workers 1 and --workers 2 (or is empty)", f)
		}
	}
	// Every other file too (run.log times the phases): methods.md, the
	// figures in every format, omitted_points.gpkg, extents.tif.
	f1, f2 := outputFiles(filepath.Join(s.dir, "out1")), outputFiles(filepath.Join(s.dir, "out2"))
	for _, want := range []string{"methods.md", "omitted_points.gpkg", "extents.tif", filepath.Join("figures", "roc_curves.pdf"), filepath.Join("figures", "extent_maps.png")} {
		if len(f1[want]) == 0 {
			t.Errorf("%s missing or empty", want)
		}
	}
	for name, a := range f1 {
		if b, ok := f2[name]; !ok || !bytes.Equal(a, b) {
			t.Errorf("%s differs between --workers 1 and --workers 2 (or is missing from one)", name)
		}
	}
	if len(f1) != len(f2) {
		t.Errorf("--workers 1 wrote %d files, --workers 2 wrote %d", len(f1), len(f2))
	}
	var any map[string]any
	if err := json.Unmarshal(got[0], &any); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"schema_version", "settings", "inputs", "software", "seed", "extents", "scores"} {
		if _, ok := any[k]; !ok {
			t.Errorf("results.json lacks %q", k)
		}
	}
}

// TestRunErrors checks that bad input gives exit 2, a message naming the
// problem, and no output directory.
func TestRunErrors(t *testing.T) {
	s := newSmallStudy(t)
	noCRS := filepath.Join(s.dir, "nocrs.tif")
	writeRaster(t, noCRS, s.w, s.h, s.gt, s.vals, false)
	other := filepath.Join(s.dir, "other.tif")
	writeRaster(t, other, s.w-1, s.h, s.gt, s.vals[:(s.w-1)*s.h], true)
	write := func(name, body string) string {
		p := filepath.Join(s.dir, name)
		os.WriteFile(p, []byte(body), 0o644)
		return p
	}
	noCoords := write("nocoords.csv", "a,b,role\n1,2,train\n")
	badNum := write("badnum.csv", "lon,lat,role\n13,43,train\n13,abc,test\n")
	badLat := write("badlat.csv", "lon,lat,role\n13,43,train\n13,95,test\n")
	swapped := write("swapped.csv", "lon,lat,role\n43,13,train\n44,120,test\n")
	notADir := write("notadir", "x")
	base := func(out string) []string {
		return []string{"run", "--model", "m=" + s.model, "--occurrences", s.occ, "--region", s.region, "--iterations", "5", "--quiet", "--out", out}
	}
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"missing model file", []string{"run", "--model", "m=" + filepath.Join(s.dir, "nope.tif"), "--occurrences", s.occ, "--region", s.region}, "nope.tif does not exist"},
		{"no CRS", []string{"run", "--model", "m=" + noCRS, "--occurrences", s.occ, "--region", s.region}, "no coordinate reference system"},
		{"grids differ", []string{"run", "--model", "m=" + s.model, "--model", "o=" + other, "--occurrences", s.occ, "--region", s.region}, "size 48x32 vs 47x32"},
		{"header without coordinates", []string{"run", "--model", "m=" + s.model, "--occurrences", noCoords, "--region", s.region}, "longitude"},
		{"bad number", []string{"run", "--model", "m=" + s.model, "--occurrences", badNum, "--region", s.region}, "line 3"},
		{"latitude out of range", []string{"run", "--model", "m=" + s.model, "--occurrences", badLat, "--region", s.region}, "95"},
		{"swapped columns", []string{"run", "--model", "m=" + s.model, "--occurrences", swapped, "--region", s.region}, "swapped"},
		{"region not overlapping", []string{"run", "--model", "m=" + s.model, "--occurrences", s.occ, "--region", s.far}, "region covers no cell of the raster: "},
		{"E outside (0,1)", []string{"run", "--model", "m=" + s.model, "--occurrences", s.occ, "--region", s.region, "--e", "1.5"}, "outside (0,1)"},
		{"iterations < 1", []string{"run", "--model", "m=" + s.model, "--occurrences", s.occ, "--region", s.region, "--iterations", "0"}, "--iterations is 0; it must be between 1"},
		{"out is a file", base(notADir), "not a directory"},
		{"unknown flag", []string{"run", "--modle", "x"}, "unknown flag"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			args := c.args
			out := filepath.Join(s.dir, "err-"+strings.ReplaceAll(c.name, " ", "_"))
			if !contains(args, "--out") {
				args = append(append([]string{}, args...), "--out", out, "--quiet")
			}
			_, se, code := runBin(t, args...)
			if code != 2 {
				t.Errorf("exit %d, want 2; stderr: %s", code, se)
			}
			if !strings.Contains(se, c.want) {
				t.Errorf("stderr %q does not contain %q", se, c.want)
			}
			if _, err := os.Stat(out); err == nil && c.name != "out is a file" {
				t.Errorf("%s was created despite the error", out)
			}
		})
	}
	// An existing non-empty output directory needs --force.
	out := filepath.Join(s.dir, "exists")
	os.MkdirAll(out, 0o755)
	os.WriteFile(filepath.Join(out, "keep.txt"), []byte("mine"), 0o644)
	_, se, code := runBin(t, base(out)...)
	if code != 2 || !strings.Contains(se, "--force") {
		t.Errorf("existing out: exit %d, stderr %q", code, se)
	}
	if b, _ := os.ReadFile(filepath.Join(out, "keep.txt")); string(b) != "mine" {
		t.Error("existing out was touched without --force")
	}
	// --force does not replace a results.json no run wrote there (the
	// user's own, or a copy): refused, naming it, nothing changed.
	os.WriteFile(filepath.Join(out, "results.json"), []byte("old"), 0o644)
	if _, se, code := runBin(t, append(base(out), "--force")...); code != 2 || !strings.Contains(se, filepath.Join(out, "results.json")+", which no areasweep run wrote there") {
		t.Errorf("--force over a results.json no run wrote: exit %d: %s", code, se)
	}
	if b, _ := os.ReadFile(filepath.Join(out, "results.json")); string(b) != "old" {
		t.Error("--force replaced a results.json no run wrote")
	}
	// --force replaces areasweep's own files (an earlier run's
	// results.json, even edited since) and keeps every other file.
	os.Remove(filepath.Join(out, "results.json"))
	if _, se, code := runBin(t, append(base(out), "--force")...); code != 0 {
		t.Fatalf("--force: exit %d: %s", code, se)
	}
	os.WriteFile(filepath.Join(out, "results.json"), []byte("old"), 0o644)
	if _, se, code := runBin(t, append(base(out), "--force")...); code != 0 {
		t.Fatalf("--force: exit %d: %s", code, se)
	}
	if b, _ := os.ReadFile(filepath.Join(out, "keep.txt")); string(b) != "mine" {
		t.Error("--force deleted a file areasweep did not write")
	}
	if b, _ := os.ReadFile(filepath.Join(out, "results.json")); string(b) == "old" {
		t.Error("--force did not replace the old results.json")
	}
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// TestNotScoredWithoutTestPoints: an extent holding no test point is
// reported as not scored with the reason.
func TestNotScoredWithoutTestPoints(t *testing.T) {
	s := newSmallStudy(t)
	corner := filepath.Join(s.dir, "corner.geojson")
	os.WriteFile(corner, []byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[19,40.2],[21,40.2],[21,41.5],[19,41.5],[19,40.2]]]}}]}`), 0o644)
	out := filepath.Join(s.dir, "out")
	_, se, code := runBin(t, "run", "--model", "m="+s.model, "--occurrences", s.occ, "--region", s.region, "--extra", "corner="+corner,
		"--iterations", "5", "--quiet", "--out", out)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	res := loadResults(t, out)
	found := false
	for _, sc := range res.Scores {
		if sc.Extent == "user_corner" {
			found = true
			if sc.Scored || !strings.Contains(sc.NotScored, "no test points") {
				t.Errorf("user_corner: scored=%v reason %q", sc.Scored, sc.NotScored)
			}
		}
	}
	if !found {
		t.Error("no score entry for user_corner")
	}
}

// TestDemo runs the built-in demo and checks the effect it exists to show:
// full AUC of the good model rises from the base region to the largest
// region buffer while omission at the minimum training presence threshold
// does not change (it depends on training points only).
func TestDemo(t *testing.T) {
	out := filepath.Join(t.TempDir(), "demo")
	so, se, code := runBin(t, "demo", "--out", out, "--quiet")
	if code != 0 {
		t.Fatalf("demo exit %d: %s", code, se)
	}
	if !strings.Contains(so, "report.html") {
		t.Errorf("demo did not print where the report is: %q", so)
	}
	res := loadResults(t, out)
	get := func(model, ext string) report.Score {
		for _, sc := range res.Scores {
			if sc.Model == model && sc.Extent == ext {
				return sc
			}
		}
		t.Fatalf("no score %s/%s", model, ext)
		return report.Score{}
	}
	if res.PointCounts.Thinned == 0 {
		t.Error("demo: the scenario's duplicate records were not thinned")
	}
	b, w := get("good", "base"), get("good", "region_500km")
	if !(w.AUC > b.AUC+0.03) {
		t.Errorf("demo: AUC base %.4f, region_500km %.4f: the extent effect is not shown", b.AUC, w.AUC)
	}
	if b.Thresholds[0].Omission != w.Thresholds[0].Omission {
		t.Errorf("demo: omission at MTP changed with the extent: %v vs %v", b.Thresholds[0].Omission, w.Thresholds[0].Omission)
	}
	for _, f := range []string{"inputs/study.yaml", "inputs/model_good.tif", "results.json", "report.html", "methods.md"} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Errorf("demo output %s missing", f)
		}
	}
	validGeoPackages(t, filepath.Join(out, "extents.gpkg"), filepath.Join(out, "omitted_points.gpkg"))
	// Re-render from results.json: refused without --force, since the
	// report files exist; with --force the same bytes come back.
	before, _ := os.ReadFile(filepath.Join(out, "report.html"))
	if _, se, code := runBin(t, "report", out); code != 2 || !strings.Contains(se, "--force") {
		t.Errorf("report without --force: exit %d: %s", code, se)
	}
	if _, se, code := runBin(t, "report", out, "--force"); code != 0 {
		t.Errorf("report --force: exit %d: %s", code, se)
	}
	if after, _ := os.ReadFile(filepath.Join(out, "report.html")); !bytes.Equal(before, after) {
		t.Error("re-rendered report.html differs from the run's")
	}
}

// checkGeoPackage opens extents.gpkg as a GIS would and checks one feature
// per scored extent with its attributes, and that each outline encloses
// exactly the extent's cells (planar area in square degrees = cells x cell
// size, by construction of a cell-edge outline).
func checkGeoPackage(t *testing.T, path string, res *report.Results, cellDeg2 float64) {
	t.Helper()
	ds, err := godal.Open(path, godal.VectorOnly())
	if err != nil {
		t.Fatalf("open %s: %v", path, err)
	}
	defer ds.Close()
	var layer godal.Layer
	found := false
	for _, l := range ds.Layers() {
		if l.Name() == "extents" {
			layer, found = l, true
		}
	}
	if !found {
		t.Fatal("extents.gpkg has no layer 'extents'")
	}
	want := map[string]report.Extent{}
	for _, e := range res.Extents {
		if e.Status == vocab.StatusOK {
			want[e.ID] = e
		}
	}
	n := 0
	layer.ResetReading()
	for {
		f := layer.NextFeature()
		if f == nil {
			break
		}
		n++
		fl := f.Fields()
		id := fl["id"].String()
		e, ok := want[id]
		if !ok {
			t.Errorf("unexpected feature %q", id)
			continue
		}
		if fl["kind"].String() != string(e.Kind) || fl["cells"].Int() != e.Cells || math.Abs(fl["area_km2"].Float()-e.AreaKm2) > 1e-6*e.AreaKm2 {
			t.Errorf("%s: attributes kind %s cells %d area %.3f; want %s %d %.3f", id, fl["kind"].String(), fl["cells"].Int(), fl["area_km2"].Float(), e.Kind, e.Cells, e.AreaKm2)
		}
		if a := f.Geometry().Area(); math.Abs(a-float64(e.Cells)*cellDeg2) > 1e-9 {
			t.Errorf("%s: outline encloses %.6f square degrees, cells give %.6f", id, a, float64(e.Cells)*cellDeg2)
		}
		f.Close()
	}
	if n != len(want) {
		t.Errorf("extents.gpkg has %d features, want %d", n, len(want))
	}
}

// TestExtentsCommand: 'extents' writes the family only, with the same
// members and cells as a full run.
func TestExtentsCommand(t *testing.T) {
	s := newSmallStudy(t)
	out := filepath.Join(s.dir, "fam")
	args := s.args(out)
	args[0] = "extents"
	so, se, code := runBin(t, args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	if !strings.Contains(so, "region_150km") || !strings.Contains(so, "extents.gpkg") {
		t.Errorf("summary table missing from stdout: %q", so)
	}
	csvb, err := os.ReadFile(filepath.Join(out, "extents.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(out, "results.json")); err == nil {
		t.Error("extents wrote results.json")
	}
	full := filepath.Join(s.dir, "full")
	if _, se, code := runBin(t, s.args(full)...); code != 0 {
		t.Fatalf("run: exit %d: %s", code, se)
	}
	res := loadResults(t, full)
	for _, e := range res.Extents {
		if !strings.Contains(string(csvb), fmt.Sprintf("%s,%s,", e.ID, e.Kind)) || !strings.Contains(string(csvb), fmt.Sprintf(",%d,", e.Cells)) {
			t.Errorf("extents.csv lacks %s with %d cells", e.ID, e.Cells)
		}
	}
}

// TestOccurrencesCRS: the same points given in Web Mercator with
// --occurrences-crs EPSG:3857 give the same scores as in longitude and
// latitude (coordinates converted in the test with the spherical Mercator
// formulas that define EPSG:3857: x = a lon, y = a ln tan(pi/4 + lat/2)).
func TestOccurrencesCRS(t *testing.T) {
	s := newSmallStudy(t)
	body, err := os.ReadFile(s.occ)
	if err != nil {
		t.Fatal(err)
	}
	const a = 6378137.0
	// The small study's test points sit exactly on cell edges, where a
	// round trip through another CRS may pick the neighbouring cell; move
	// every point off the edges first (by construction).
	var sl, sb strings.Builder
	sl.WriteString("lon,lat,role\n")
	sb.WriteString("x,y,role\n")
	for _, line := range strings.Split(strings.TrimSpace(string(body)), "\n")[1:] {
		var lon, lat float64
		var role string
		f := strings.Split(line, ",")
		fmt.Sscan(f[0], &lon)
		fmt.Sscan(f[1], &lat)
		role = f[2]
		lon, lat = lon+0.0123, lat+0.0071
		sl.WriteString(fmt.Sprintf("%.6f,%.6f,%s\n", lon, lat, role))
		x := a * lon * math.Pi / 180
		y := a * math.Log(math.Tan(math.Pi/4+lat*math.Pi/360))
		sb.WriteString(fmt.Sprintf("%.4f,%.4f,%s\n", x, y, role))
	}
	moved := filepath.Join(s.dir, "occ4326.csv")
	os.WriteFile(moved, []byte(sl.String()), 0o644)
	merc := filepath.Join(s.dir, "occ3857.csv")
	os.WriteFile(merc, []byte(sb.String()), 0o644)
	run := func(occ string, extra ...string) *report.Results {
		out := filepath.Join(s.dir, "out-"+filepath.Base(occ))
		args := append([]string{"run", "--model", "m=" + s.model, "--occurrences", occ, "--region", s.region, "--iterations", "20", "--quiet", "--out", out}, extra...)
		if _, se, code := runBin(t, args...); code != 0 {
			t.Fatalf("exit %d: %s", code, se)
		}
		return loadResults(t, out)
	}
	ll, mc := run(moved), run(merc, "--occurrences-crs", "EPSG:3857")
	for i := range ll.Points {
		p, q := ll.Points[i], mc.Points[i]
		if math.Abs(p.Lon-q.Lon) > 1e-6 || math.Abs(p.Lat-q.Lat) > 1e-6 || p.Status != q.Status || p.Row != q.Row || p.Col != q.Col {
			t.Errorf("point line %d: (%v, %v, %s) vs (%v, %v, %s) via EPSG:3857", p.ID, p.Lon, p.Lat, p.Status, q.Lon, q.Lat, q.Status)
		}
	}
	if len(ll.Scores) != len(mc.Scores) {
		t.Fatalf("%d scores vs %d", len(ll.Scores), len(mc.Scores))
	}
	for i := range ll.Scores {
		if strings.HasPrefix(ll.Scores[i].Extent, "hull") {
			// The hull's outline is sampled every cell side from its
			// vertices, which moved by ~1e-9 degree through EPSG:3857: cells
			// within that sampling error of a buffer edge (the tolerance of
			// the membership rule) may change. Allow 1% of the cells.
			if d := ll.Scores[i].Cells - mc.Scores[i].Cells; d*100 > ll.Scores[i].Cells || -d*100 > ll.Scores[i].Cells {
				t.Errorf("%s: %d cells (lon/lat) vs %d (EPSG:3857)", ll.Scores[i].Extent, ll.Scores[i].Cells, mc.Scores[i].Cells)
			}
			continue
		}
		if ll.Scores[i].AUC != mc.Scores[i].AUC || ll.Scores[i].TestPoints != mc.Scores[i].TestPoints {
			t.Errorf("%s: AUC %v (lon/lat) vs %v (EPSG:3857); test points %d vs %d, cells %d vs %d", ll.Scores[i].Extent, ll.Scores[i].AUC, mc.Scores[i].AUC, ll.Scores[i].TestPoints, mc.Scores[i].TestPoints, ll.Scores[i].Cells, mc.Scores[i].Cells)
		}
	}
	if mc.Settings.OccurrencesCRS != "EPSG:3857" {
		t.Errorf("settings.occurrences_crs = %q", mc.Settings.OccurrencesCRS)
	}
}

// TestProjectedEqualAreaGrid runs on an EPSG:3035 (Lambert azimuthal
// equal-area) grid with a region and points given in longitude/latitude:
// cell areas must be the planar 10 km x 10 km = 100 km2 (equal-area
// projection), and every extent's AUC must match brute force over its
// cells from extents.tif.
func TestProjectedEqualAreaGrid(t *testing.T) {
	dir := t.TempDir()
	w, h := 60, 50
	gt := [6]float64{4000000, 10000, 0, 3000000, 0, -10000}
	vals := make([]float64, w*h)
	for r := 0; r < h; r++ {
		for c := 0; c < w; c++ {
			x, y := float64(c)-30, float64(r)-25
			vals[r*w+c] = float64(float32(math.Round(100*math.Exp(-(x*x+y*y)/300)) / 100))
		}
	}
	model := filepath.Join(dir, "laea.tif")
	ds, err := godal.Create(godal.GTiff, model, 1, godal.Float32, w, h)
	if err != nil {
		t.Fatal(err)
	}
	ds.SetGeoTransform(gt)
	sr, _ := godal.NewSpatialRefFromEPSG(3035)
	ds.SetSpatialRef(sr)
	buf := make([]float32, len(vals))
	for i, v := range vals {
		buf[i] = float32(v)
	}
	ds.Bands()[0].Write(0, 0, buf, w, h)
	ds.Close()
	// Centre of the grid in lon/lat, via PROJ in the test.
	wgs, _ := godal.NewSpatialRefFromEPSG(4326)
	tr, err := godal.NewTransform(sr, wgs)
	if err != nil {
		t.Fatal(err)
	}
	defer tr.Close()
	xs := []float64{4300000, 4150000, 4450000}
	ys := []float64{2750000, 2600000, 2900000}
	tr.TransformEx(xs, ys, nil, nil)
	clon, clat := xs[0], ys[0]
	region := filepath.Join(dir, "r.geojson")
	os.WriteFile(region, []byte(fmt.Sprintf(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[%f,%f],[%f,%f],[%f,%f],[%f,%f],[%f,%f]]]}}]}`,
		xs[1], ys[1], xs[2], ys[1], xs[2], ys[2], xs[1], ys[2], xs[1], ys[1])), 0o644)
	var sb strings.Builder
	sb.WriteString("longitude,latitude,role\n")
	for i := 0; i < 30; i++ {
		ang := float64(i) * 0.7
		rad := 0.3 + 0.04*float64(i%9)
		role := "train"
		if i%3 == 0 {
			role = "test"
		}
		sb.WriteString(fmt.Sprintf("%.5f,%.5f,%s\n", clon+rad*math.Cos(ang)+0.0123, clat+0.7*rad*math.Sin(ang)+0.0071, role))
	}
	occ := filepath.Join(dir, "occ.csv")
	os.WriteFile(occ, []byte(sb.String()), 0o644)
	out := filepath.Join(dir, "out")
	if _, se, code := runBin(t, "run", "--model", "m="+model, "--occurrences", occ, "--region", region, "--region-buffers=-30,50",
		"--point-buffers", "40", "--hull-buffers", "0", "--iterations", "20", "--membership-tif", "--quiet", "--out", out); code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	res := loadResults(t, out)
	if res.Grid.Geographic || res.Grid.CRS != "EPSG:3035" {
		t.Errorf("grid %+v", res.Grid)
	}
	names, bands := readBands(t, filepath.Join(out, "extents.tif"))
	scores := map[string]report.Score{}
	for _, sc := range res.Scores {
		if sc.Model != "m" {
			continue
		}
		scores[sc.Extent] = sc
	}
	compared := 0
	for k, e := range res.Extents {
		if names[k] != e.ID || e.Status != vocab.StatusOK {
			continue
		}
		if math.Abs(e.AreaKm2-100*float64(e.Cells)) > 1e-6 {
			t.Errorf("%s: area %.3f km2 for %d cells of 100 km2", e.ID, e.AreaKm2, e.Cells)
		}
		var bg, wt, pres []float64
		for i, b := range bands[k] {
			if b == 1 {
				bg = append(bg, vals[i])
				wt = append(wt, 1)
			}
		}
		for _, p := range res.Points {
			if p.Role == vocab.RoleTest && p.Status == vocab.PointScored && bands[k][p.Row*w+p.Col] == 1 {
				pres = append(pres, vals[p.Row*w+p.Col])
			}
		}
		if len(pres) == 0 {
			continue
		}
		compared++
		if want := bruteAUC(pres, bg, wt); math.Abs(scores[e.ID].AUC-want) > 1e-9 {
			t.Errorf("%s: auc %.12f, brute force %.12f", e.ID, scores[e.ID].AUC, want)
		}
	}
	if compared < 5 {
		t.Errorf("only %d extents with test points compared", compared)
	}
	if len(res.Rings) == 0 {
		t.Error("no nested rings on the projected grid")
	}
}

// TestMultiBandModelWarns: a model raster with several bands is scored on
// its first band, exactly as a one-band raster holding that band, and the
// run says so (README: Model rasters).
func TestMultiBandModelWarns(t *testing.T) {
	s := newSmallStudy(t)
	multi := filepath.Join(s.dir, "stack.tif")
	ds, err := godal.Create(godal.GTiff, multi, 2, godal.Float32, s.w, s.h)
	if err != nil {
		t.Fatal(err)
	}
	ds.SetGeoTransform(s.gt)
	ds.SetProjection(`GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["degree",0.0174532925199433],AUTHORITY["EPSG","4326"]]`)
	for k, b := range ds.Bands() {
		b.SetNoData(smallNoData)
		buf := make([]float32, s.w*s.h)
		for i, v := range s.vals {
			switch {
			case math.IsNaN(v):
				buf[i] = smallNoData
			case k == 0:
				buf[i] = float32(v)
			default:
				buf[i] = float32(1 - v) // the second band ranks the other way
			}
		}
		if err := b.Write(0, 0, buf, s.w, s.h); err != nil {
			t.Fatal(err)
		}
	}
	if err := ds.Close(); err != nil {
		t.Fatal(err)
	}
	aucs := func(model string) (map[string]float64, []string) {
		out := filepath.Join(t.TempDir(), "out")
		_, se, code := runBin(t, "run", "--model", "m="+model, "--occurrences", s.occ, "--region", s.region,
			"--iterations", "5", "--no-distance-null", "--quiet", "--out", out)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", model, code, se)
		}
		res := loadResults(t, out)
		m := map[string]float64{}
		for _, sc := range res.Scores {
			if sc.Scored {
				m[sc.Extent] = sc.AUC
			}
		}
		return m, res.Warnings
	}
	one, w1 := aucs(s.model)
	two, w2 := aucs(multi)
	if len(one) == 0 || len(one) != len(two) {
		t.Fatalf("scored extents: %d one-band, %d two-band", len(one), len(two))
	}
	for e, a := range one {
		if two[e] != a {
			t.Errorf("%s: AUC %v on the two-band raster, %v on its first band alone", e, two[e], a)
		}
	}
	warned := func(ws []string) bool {
		for _, w := range ws {
			if strings.Contains(w, "has 2 bands; only the first is scored") && strings.Contains(w, "gdal_translate -b 2") {
				return true
			}
		}
		return false
	}
	if !warned(w2) {
		t.Errorf("no warning about the second band: %q", w2)
	}
	if warned(w1) {
		t.Errorf("one-band raster warned about bands: %q", w1)
	}

	// Split into 2 shards and merged: the same results.json, the warning
	// once in it (not once per shard) and in the report.
	base := []string{"--model", "m=" + multi, "--occurrences", s.occ, "--region", s.region, "--iterations", "5", "--no-distance-null", "--quiet"}
	single := filepath.Join(t.TempDir(), "single")
	if _, se, code := runBin(t, append([]string{"run", "--out", single}, base...)...); code != 0 {
		t.Fatalf("single run: exit %d: %s", code, se)
	}
	mdir := t.TempDir()
	merged := filepath.Join(mdir, "merged")
	if mergedDiffers(t, mdir, single, base) {
		t.Error("a two-band model: the merged results.json differs from the single run's")
	}
	n := 0
	for _, w := range loadResults(t, merged).Warnings {
		if strings.Contains(w, "has 2 bands") {
			n++
		}
	}
	if n != 1 {
		t.Errorf("merged results.json warns %d times about the bands, want once", n)
	}
	if html, _ := os.ReadFile(filepath.Join(merged, "report.html")); !strings.Contains(string(html), "has 2 bands; only the first is scored") {
		t.Error("the merged report does not show the warning about the bands")
	}
}

// virtualRaster writes vrt, a GDAL virtual raster (VRT) of the raster src
// (gdal_translate -of VRT).
func virtualRaster(t *testing.T, src, vrt string) {
	t.Helper()
	in, err := godal.Open(src)
	if err != nil {
		t.Fatal(err)
	}
	defer in.Close()
	v, err := in.Translate(vrt, []string{"-of", "VRT"})
	if err != nil {
		t.Fatal(err)
	}
	v.Close()
}

// replaceArg returns args with every argument equal to old replaced by
// new.
func replaceArg(args []string, old, new string) []string {
	for k := range args {
		if args[k] == old {
			args[k] = new
		}
	}
	return args
}

// gpkgValidator is GDAL's GeoPackage validator (osgeo_utils, in Debian's
// python3-gdal, installed by setup.sh --test), run by Debian's own Python.
const gpkgValidator = "/usr/lib/python3/dist-packages/osgeo_utils/samples/validate_gpkg.py"

// validGeoPackages checks each GeoPackage in paths against GDAL's
// validator of the OGC GeoPackage requirements (it exits 1 naming the
// first requirement a file breaks), in a subtest of its own, which is
// skipped only outside CI when the validator is not installed.
func validGeoPackages(t *testing.T, paths ...string) {
	t.Helper()
	t.Run("GeoPackages valid (GDAL's validate_gpkg)", func(t *testing.T) {
		if _, err := os.Stat(gpkgValidator); err != nil {
			if os.Getenv("CI") == "true" {
				t.Fatalf("%s not found: CI must install Debian's python3-gdal (scripts/setup.sh --test)", gpkgValidator)
			}
			t.Skipf("%s not found: install Debian's python3-gdal to run this check (a skip is not a pass)", gpkgValidator)
		}
		for _, p := range paths {
			out, err := exec.Command("/usr/bin/python3", gpkgValidator, p).CombinedOutput()
			if err != nil || len(bytes.TrimSpace(out)) > 0 {
				t.Errorf("%s: validate_gpkg says (%v): %s", filepath.Base(p), err, out)
			}
		}
	})
}

// outputFiles returns the content of every file under dir but run.log
// (which times the phases), by path relative to dir.
func outputFiles(dir string) map[string][]byte {
	m := map[string][]byte{}
	filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() || d.Name() == "run.log" {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		m[rel], _ = os.ReadFile(p)
		return nil
	})
	return m
}

// mergedDiffers runs the study base (run's flags without --out) as two
// row shards in dir, merges them into dir/merged and reports whether the
// merged results.json differs from the one in single (a run of the whole
// study), or is empty.
func mergedDiffers(t *testing.T, dir, single string, base []string) bool {
	t.Helper()
	merged := filepath.Join(dir, "merged")
	margs := []string{"merge", "--quiet", "--out", merged}
	for i := 1; i <= 2; i++ {
		out := filepath.Join(dir, fmt.Sprint("shard", i))
		if _, se, code := runBin(t, append([]string{"run", "--out", out, "--shard", fmt.Sprint(i, "/2")}, base...)...); code != 0 {
			t.Fatalf("shard %d/2: exit %d: %s", i, code, se)
		}
		margs = append(margs, out)
	}
	if _, se, code := runBin(t, margs...); code != 0 {
		t.Fatalf("merge: exit %d: %s", code, se)
	}
	a, _ := os.ReadFile(filepath.Join(single, "results.json"))
	b, _ := os.ReadFile(filepath.Join(merged, "results.json"))
	return len(a) == 0 || !bytes.Equal(a, b)
}
