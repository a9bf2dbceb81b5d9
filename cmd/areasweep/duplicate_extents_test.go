package main

import (
	"encoding/csv"
	"os"
	"path/filepath"
	"testing"
)

// TestDuplicateExtentsMeasured: an extent with exactly the cells of an
// earlier one is scored once, under the earlier id, but it is still that
// many cells of that area holding those points, and results.json and
// extents.csv say so (the README defines cells, area_km2, share_of_raster,
// train_points and test_points as the extent's own). Found by a randomized
// run of small studies: results.json gave a duplicate 0 cells, 0 km² and 0
// points (a whole_raster of no area), and extents' extents.csv gave its
// cells but 0 points.
func TestDuplicateExtentsMeasured(t *testing.T) {
	s := newSmallStudy(t)
	// Buffers of 5000 km reach every cell: each equals the whole raster.
	args := []string{"--model", "m=" + s.model, "--occurrences", s.occ, "--region", s.region,
		"--region-buffers=5000", "--point-buffers", "40,5000", "--hull-buffers", "0", "--quiet"}
	dir := t.TempDir()
	if _, se, code := runBin(t, append([]string{"run", "--iterations", "5", "--out", filepath.Join(dir, "run")}, args...)...); code != 0 {
		t.Fatalf("run: exit %d: %s", code, se)
	}
	if _, se, code := runBin(t, append([]string{"extents", "--out", filepath.Join(dir, "ext")}, args...)...); code != 0 {
		t.Fatalf("extents: exit %d: %s", code, se)
	}

	res := loadResults(t, filepath.Join(dir, "run"))
	type measure struct {
		cells, train, test int
		area, share        float64
	}
	byID := map[string]measure{}
	for _, e := range res.Extents {
		byID[e.ID] = measure{int(e.Cells), e.TrainPoints, e.TestPoints, e.AreaKm2, e.ShareOfRaster}
	}
	dups := 0
	for _, e := range res.Extents {
		if e.Status != "duplicate" {
			continue
		}
		dups++
		if got, want := byID[e.ID], byID[e.DuplicateOf]; got != want || want.cells == 0 {
			t.Errorf("results.json: duplicate %s measures %+v, %s measures %+v", e.ID, got, e.DuplicateOf, want)
		}
	}
	if dups < 2 {
		t.Fatalf("the family has %d duplicates; the test needs at least 2", dups)
	}

	f, err := os.Open(filepath.Join(dir, "ext", "extents.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	line := map[string][]string{}
	for _, r := range rows[1:] {
		line[r[col["id"]]] = r
	}
	for _, r := range rows[1:] {
		if r[col["status"]] != "duplicate" {
			continue
		}
		o := line[r[col["duplicate_of"]]]
		for _, c := range []string{"cells", "area_km2", "share_of_raster", "train_points", "test_points"} {
			if r[col[c]] != o[col[c]] {
				t.Errorf("extents.csv: duplicate %s has %s %s, %s has %s", r[col["id"]], c, r[col[c]], o[col["id"]], o[col[c]])
			}
		}
	}
}
