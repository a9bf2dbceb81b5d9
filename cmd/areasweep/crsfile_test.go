package main

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestOccurrencesCRSFile: --occurrences-crs given as a file (a .prj
// holding the CRS's WKT, which GDAL reads) is an input like the others:
// results.json records it with its SHA-256 (role occurrences-crs, after
// the occurrences), and --out may not be that file. It was read and
// neither recorded nor rechecked, so a batch did not see it change. An
// authority code records no such input; a file that holds no CRS is
// refused saying what it must hold.
func TestOccurrencesCRSFile(t *testing.T) {
	s := newSmallStudy(t)
	dir := t.TempDir()
	prj := filepath.Join(dir, "wgs84.prj")
	// The WKT of EPSG:4326 (OGC WKT1, as a .prj beside a shapefile holds it).
	wkt := `GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["degree",0.0174532925199433]]`
	if err := os.WriteFile(prj, []byte(wkt), 0o644); err != nil {
		t.Fatal(err)
	}
	sum := sha256.Sum256([]byte(wkt))
	inputs := func(out string) map[string]string {
		t.Helper()
		b, err := os.ReadFile(filepath.Join(out, "results.json"))
		if err != nil {
			t.Fatal(err)
		}
		var r struct {
			Inputs []struct{ Role, Path, SHA256 string } `json:"inputs"`
		}
		if err := json.Unmarshal(b, &r); err != nil {
			t.Fatal(err)
		}
		m := map[string]string{}
		var roles []string
		for _, in := range r.Inputs {
			m[in.Role] = in.Path + " " + in.SHA256
			roles = append(roles, in.Role)
		}
		m["order"] = strings.Join(roles, ",")
		return m
	}
	for _, c := range []struct {
		crs, want string
	}{
		{prj, prj + " " + hex.EncodeToString(sum[:])},
		{"EPSG:4326", ""},
	} {
		out := filepath.Join(dir, "out"+filepath.Ext(c.crs))
		if _, se, code := runBin(t, "run", "--quiet", "--region", s.region, "--occurrences", s.occ, "--model", "m="+s.model, "--occurrences-crs", c.crs, "--iterations", "20", "--out", out); code != 0 {
			t.Fatalf("--occurrences-crs %s: exit %d: %s", c.crs, code, se)
		}
		in := inputs(out)
		if got := in["occurrences-crs"]; got != c.want {
			t.Errorf("--occurrences-crs %s: recorded %q, want %q", c.crs, got, c.want)
		}
		if c.want != "" && !strings.Contains(in["order"], "occurrences,occurrences-crs,region") {
			t.Errorf("--occurrences-crs %s: roles in the order %s", c.crs, in["order"])
		}
	}
	// A file that holds no CRS: refused, saying what the file must hold.
	garbage := filepath.Join(dir, "garbage.prj")
	if err := os.WriteFile(garbage, []byte("garbage"), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "garbage-out")
	_, se, code := runBin(t, "run", "--quiet", "--region", s.region, "--occurrences", s.occ, "--model", "m="+s.model, "--occurrences-crs", garbage, "--out", out)
	if code != 2 || !strings.Contains(se, garbage+" is a file, read for the CRS") || !strings.Contains(se, "WKT") {
		t.Errorf("--occurrences-crs holding no CRS: exit %d (want 2): %s", code, se)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("--occurrences-crs holding no CRS: %s was created", out)
	}
	// --out may not be the CRS file.
	_, se, code = runBin(t, "run", "--quiet", "--region", s.region, "--occurrences", s.occ, "--model", "m="+s.model, "--occurrences-crs", prj, "--out", prj)
	if b, _ := os.ReadFile(prj); code != 2 || string(b) != wkt {
		t.Errorf("--out = the CRS file: exit %d (want 2), file now %q: %s", code, b, se)
	}
}
