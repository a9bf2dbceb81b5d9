package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestUnusualValidInputs runs the binary on inputs that are valid but
// written the way other tools write them, and checks that each run
// succeeds and scores exactly as the plain run does (scores.csv byte for
// byte): a GBIF-style tab-separated download whose text holds bare
// quotes, inputs in a folder whose name holds spaces and non-ASCII
// letters, and a second model as an ESRI ASCII grid whose .prj writes
// WGS84 otherwise than the GeoTIFF's EPSG:4326, or as an ESRI BIL whose
// header, nodata and CRS are in sidecar files. It also re-renders the
// report given the results.json file rather than its folder.
func TestUnusualValidInputs(t *testing.T) {
	s := newSmallStudy(t)
	run := smallRunScores
	outs := t.TempDir()
	want := run(t, filepath.Join(outs, "plain"), "--model", "m="+s.model, "--model", "sq="+s.model2, "--occurrences", s.occ, "--region", s.region)

	t.Run("GBIF-style download", func(t *testing.T) {
		csv, _ := os.ReadFile(s.occ)
		lines := strings.Split(strings.TrimSuffix(string(csv), "\n"), "\n")
		var b strings.Builder
		b.WriteString("gbifID\tlocality\tdecimalLongitude\tdecimalLatitude\tbasisOfRecord\trole\n")
		for i, l := range lines[1:] {
			c := strings.Split(l, ",")
			loc := []string{`5 km N of "Big Rock", by the ford`, `"Holotype" site`, `12" stone`}[i%3]
			b.WriteString(strings.Join([]string{"10" + c[0][:2], loc, c[0], c[1], "HUMAN_OBSERVATION", c[2]}, "\t") + "\n")
		}
		occ := filepath.Join(s.dir, "occurrence.txt")
		os.WriteFile(occ, []byte(b.String()), 0o644)
		got := run(t, filepath.Join(outs, "gbif"), "--model", "m="+s.model, "--model", "sq="+s.model2, "--occurrences", occ, "--region", s.region)
		if !bytes.Equal(got, want) {
			t.Error("scores.csv differs from the run on the comma-separated table")
		}
	})

	t.Run("paths with spaces and accents", func(t *testing.T) {
		dir := filepath.Join(s.dir, "données d'étude", "run #1")
		os.MkdirAll(dir, 0o755)
		names := map[string]string{}
		for _, p := range []string{s.model, s.model2, s.occ, s.region} {
			b, _ := os.ReadFile(p)
			n := filepath.Join(dir, "ç "+filepath.Base(p))
			os.WriteFile(n, b, 0o644)
			names[p] = n
		}
		// The region's file name is recorded in scores.csv (file=...):
		// keep it.
		b, _ := os.ReadFile(s.region)
		os.WriteFile(filepath.Join(dir, filepath.Base(s.region)), b, 0o644)
		got := run(t, filepath.Join(s.dir, "données d'étude", "sortie ä"), "--model", "m="+names[s.model], "--model", "sq="+names[s.model2],
			"--occurrences", names[s.occ], "--region", filepath.Join(dir, filepath.Base(s.region)))
		if !bytes.Equal(got, want) {
			t.Error("scores.csv differs from the run on plain paths")
		}
	})

	t.Run("ESRI ASCII grid beside a GeoTIFF", func(t *testing.T) {
		src, err := godal.Open(s.model2)
		if err != nil {
			t.Fatal(err)
		}
		asc := filepath.Join(s.dir, "model2.asc")
		ds, err := src.Translate(asc, []string{"-of", "AAIGrid", "-co", "SIGNIFICANT_DIGITS=9"})
		src.Close()
		if err != nil {
			t.Fatal(err)
		}
		ds.Close()
		os.Remove(asc + ".aux.xml") // the CRS must come from the .prj alone
		prj, err := os.ReadFile(filepath.Join(s.dir, "model2.prj"))
		if err != nil || !strings.Contains(string(prj), "GCS_WGS_1984") {
			t.Fatalf("the ASCII grid's .prj is not written in ESRI's words: %q, %v", prj, err)
		}
		got := run(t, filepath.Join(outs, "asc"), "--model", "m="+s.model, "--model", "sq="+asc, "--occurrences", s.occ, "--region", s.region)
		if !bytes.Equal(got, want) {
			t.Error("scores.csv differs from the run on the GeoTIFF")
		}
	})

	t.Run("ESRI BIL with its .hdr and .prj", func(t *testing.T) {
		src, err := godal.Open(s.model2)
		if err != nil {
			t.Fatal(err)
		}
		bil := filepath.Join(s.dir, "model2.bil")
		ds, err := src.Translate(bil, []string{"-of", "EHdr"})
		src.Close()
		if err != nil {
			t.Fatal(err)
		}
		ds.Close()
		os.Remove(bil + ".aux.xml")
		for _, side := range []string{"model2.hdr", "model2.prj"} {
			if _, err := os.Stat(filepath.Join(s.dir, side)); err != nil {
				t.Fatalf("no %s beside the .bil: %v", side, err)
			}
		}
		got := run(t, filepath.Join(outs, "bil"), "--model", "m="+s.model, "--model", "sq="+bil, "--occurrences", s.occ, "--region", s.region)
		if !bytes.Equal(got, want) {
			t.Error("scores.csv differs from the run on the GeoTIFF")
		}
	})

	t.Run("report given results.json", func(t *testing.T) {
		res := filepath.Join(outs, "plain", "results.json")
		if _, se, code := runBin(t, "report", res, "--force"); code != 0 {
			t.Fatalf("exit %d: %s", code, se)
		}
	})
}

// smallRunScores runs a small family (20 iterations, two region buffers,
// one point buffer, the hull) into out with args added, fails the test on
// any exit but 0, and returns the run's scores.csv.
func smallRunScores(t *testing.T, out string, args ...string) []byte {
	t.Helper()
	base := []string{"run", "--iterations", "20", "--region-buffers=-40,60", "--point-buffers", "40", "--hull-buffers", "0", "--quiet", "--out", out}
	_, se, code := runBin(t, append(base, args...)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	b, err := os.ReadFile(filepath.Join(out, "scores.csv"))
	if err != nil {
		t.Fatal(err)
	}
	return b
}
