package main

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestHiddenFloorThroughRun: a model of many values whose western quarter
// is a floor at 0.05 with one cell at 0.01 below it (an unmasked fill
// value the minimum does not show), and no test point on the floor. The
// pass lists the floor among the model's smallest values with its exact
// area, so the area-random test places it as a point mass on every extent
// that holds the whole raster (the base region covers it: a p, no note)
// and refuses it on a user extent holding part of it, the note naming
// 0.05 (before, both were computed with the floor spread continuously,
// the test too liberal there). The same study split into two shards of
// rows and merged writes the same results.json byte for byte.
func TestHiddenFloorThroughRun(t *testing.T) {
	dir := t.TempDir()
	const w, h = 120, 80
	gt := [6]float64{10, 0.05, 0, 48, 0, -0.05}
	rng := rand.New(rand.NewPCG(41, 42))
	vals := make([]float64, w*h)
	for r := 0; r < h; r++ {
		for c := 0; c < w; c++ {
			v := 0.1 + 0.8*math.Exp(-(math.Pow(float64(c-80)/30, 2)+math.Pow(float64(r-40)/25, 2))) + 1e-3*rng.Float64()
			if c < 30 {
				v = 0.05
			}
			vals[r*w+c] = float64(float32(v))
		}
	}
	vals[0] = float64(float32(0.01))
	model := filepath.Join(dir, "model.tif")
	writeRaster(t, model, w, h, gt, vals, true)
	var occ strings.Builder
	occ.WriteString("lon,lat,role\n")
	for i := 0; i < 40; i++ {
		role := "test"
		if i%2 == 0 {
			role = "train"
		}
		c, r := 35+rng.IntN(w-35), rng.IntN(h)
		fmt.Fprintf(&occ, "%.4f,%.4f,%s\n", 10+0.05*(float64(c)+0.5), 48-0.05*(float64(r)+0.5), role)
	}
	occPath := filepath.Join(dir, "occ.csv")
	poly := func(name string, x0, y0, x1, y1 float64) string {
		p := filepath.Join(dir, name+".geojson")
		body := fmt.Sprintf(`{"type":"FeatureCollection","crs":{"type":"name","properties":{"name":"urn:ogc:def:crs:OGC:1.3:CRS84"}},"features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[%g,%g],[%g,%g],[%g,%g],[%g,%g],[%g,%g]]]}}]}`, x0, y0, x1, y0, x1, y1, x0, y1, x0, y0)
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	if err := os.WriteFile(occPath, []byte(occ.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	region := poly("region", 9.9, 43.9, 16.1, 48.1)
	west := poly("west", 9.9, 43.9, 13, 48.1)
	base := []string{"--model", "m=" + model, "--occurrences", occPath, "--region", region, "--extra", "west=" + west,
		"--iterations", "200", "--no-distance-null", "--quiet"}
	single := filepath.Join(dir, "single")
	if _, se, code := runBin(t, append([]string{"run", "--out", single}, base...)...); code != 0 {
		t.Fatalf("run: exit %d: %s", code, se)
	}
	res := loadResults(t, single)
	var whole, part int
	for _, sc := range res.Scores {
		if sc.Model != "m" || !sc.Scored {
			continue
		}
		for _, pr := range sc.PartialROC {
			if !pr.Defined {
				continue
			}
			switch sc.Extent {
			case "base":
				if pr.PRandom == 0 || pr.PRandomNote != "" {
					t.Errorf("base, E = %g: p_random %g, note %q; want a p (the base holds the whole raster, so the floor's area in it is known)", pr.E, pr.PRandom, pr.PRandomNote)
				}
				whole++
			case "user_west":
				if pr.PRandom != 0 || !strings.HasPrefix(pr.PRandomNote, "the model's value 0.05, which no test point takes, holds up to") {
					t.Errorf("user_west, E = %g: p_random %g, note %q; want refused, naming the floor 0.05", pr.E, pr.PRandom, pr.PRandomNote)
				}
				part++
			}
		}
	}
	if whole == 0 || part == 0 {
		t.Fatalf("defined ratios on the base %d, on the western extent %d: the test sees neither case", whole, part)
	}
	if mergedDiffers(t, dir, single, base) {
		t.Error("the merged results.json differs from the single run's")
	}
}

// TestPlateauPastRisingRowsThroughRun: a model whose first row holds its
// smallest values, rising along it and from row to row, with a plateau at
// 0.5 over a quarter of the raster that no test point takes. The pass
// meets the 16 smallest values first and skips every later cell by the
// full list's bound; the list must still be cut, so that the plateau (a
// value of long runs above it) is refused on every extent, naming 0.5, in
// one run as in two shards of rows merged (the list was left uncut in one
// run, the plateau was taken as listed, p_random computed with its area
// spread continuously; the merge cut it and refused: results differed).
func TestPlateauPastRisingRowsThroughRun(t *testing.T) {
	dir := t.TempDir()
	const w, h = 120, 80
	gt := [6]float64{10, 0.05, 0, 48, 0, -0.05}
	vals := make([]float64, w*h)
	onPlateau := func(r, c int) bool { return r >= 20 && r < 60 && c >= 40 && c < 100 }
	for r := 0; r < h; r++ {
		for c := 0; c < w; c++ {
			v := 0.1 + 0.01*float64(r) + 1e-4*float64(c)
			if onPlateau(r, c) {
				v = 0.5
			}
			vals[r*w+c] = float64(float32(v))
		}
	}
	model := filepath.Join(dir, "model.tif")
	writeRaster(t, model, w, h, gt, vals, true)
	rng := rand.New(rand.NewPCG(5, 6))
	var occ strings.Builder
	occ.WriteString("lon,lat,role\n")
	for i := 0; i < 60; {
		c, r := rng.IntN(w), rng.IntN(h)
		if onPlateau(r, c) {
			continue
		}
		role := "test"
		if i%2 == 0 {
			role = "train"
		}
		fmt.Fprintf(&occ, "%.4f,%.4f,%s\n", 10+0.05*(float64(c)+0.5), 48-0.05*(float64(r)+0.5), role)
		i++
	}
	occPath := filepath.Join(dir, "occ.csv")
	if err := os.WriteFile(occPath, []byte(occ.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	region := filepath.Join(dir, "region.geojson")
	if err := os.WriteFile(region, []byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[9.9,43.9],[16.1,43.9],[16.1,48.1],[9.9,48.1],[9.9,43.9]]]}}]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	base := []string{"--model", "m=" + model, "--occurrences", occPath, "--region", region, "--region-buffers=-20",
		"--e", "0.05,0.5", "--iterations", "100", "--no-distance-null", "--quiet", "--workers", "1"}
	single := filepath.Join(dir, "single")
	if _, se, code := runBin(t, append([]string{"run", "--out", single}, base...)...); code != 0 {
		t.Fatalf("run: exit %d: %s", code, se)
	}
	defined := 0
	for _, sc := range loadResults(t, single).Scores {
		for _, pr := range sc.PartialROC {
			if !pr.Defined {
				continue
			}
			defined++
			if pr.PRandom != 0 || !strings.HasPrefix(pr.PRandomNote, "the model's value 0.5, which no test point takes, holds up to") {
				t.Errorf("%s, E = %g: p_random %g, note %q; want refused, naming the plateau 0.5", sc.Extent, pr.E, pr.PRandom, pr.PRandomNote)
			}
		}
	}
	if defined == 0 {
		t.Fatal("no defined ratio: the test sees nothing")
	}
	if mergedDiffers(t, dir, single, base) {
		t.Error("the merged results.json differs from the single run's")
	}
}
