package pipeline

import (
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/extent"
	"areasweep/report"
)

// TestOnGridCommand: models on two grids are refused with the gdalwarp
// command that puts the second onto the first's grid. Its -te is the
// first grid's west, south, east and north edges (20 + 120 x 0.05 = 26,
// -40 - 100 x 0.05 = -45, by hand), and -t_srs is added when the CRSs
// differ. Where gdalwarp is installed, the command is run on a raster
// half a cell east of the grid, and its output is on the grid.
func TestOnGridCommand(t *testing.T) {
	extent.Register()
	first, err := extent.NewGrid(120, 100, [6]float64{20, 0.05, 0, -40, 0, -0.05}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer first.Close()
	dir := t.TempDir()
	other := filepath.Join(dir, "shifted.tif")
	got := onGridCommand(first, "m.tif", other, false)
	want := "gdalwarp -te 20 -45 26 -40 -tr 0.05 0.05 -r bilinear " + other + " " + filepath.Join(dir, "shifted_on_grid.tif")
	if !strings.HasPrefix(got, want) {
		t.Errorf("got %q, want %q...", got, want)
	}
	if c := onGridCommand(first, "m.tif", other, true); !strings.HasPrefix(c, "gdalwarp -t_srs EPSG:4326 -te 20 -45 26 -40 ") {
		t.Errorf("another CRS: %q", c)
	}
	if _, err := exec.LookPath("gdalwarp"); err != nil {
		t.Skip("gdalwarp is not installed")
	}
	ds, err := godal.Create(godal.GTiff, other, 1, godal.Float32, 120, 100)
	if err != nil {
		t.Fatal(err)
	}
	ds.SetGeoTransform([6]float64{20.025, 0.05, 0, -40, 0, -0.05})
	sr, _ := godal.NewSpatialRefFromEPSG(4326)
	ds.SetSpatialRef(sr)
	ds.Close()
	args := strings.Fields(strings.SplitN(got, " (", 2)[0])
	if out, err := exec.Command(args[0], append([]string{"-q"}, args[1:]...)...).CombinedOutput(); err != nil {
		t.Fatalf("%s: %v %s", got, err, out)
	}
	g, err := extent.OpenGrid(filepath.Join(dir, "shifted_on_grid.tif"))
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	if d := first.SameAs(g); d != "" {
		t.Errorf("the command's output is not on the grid: %s", d)
	}
}

// TestSwappedOnGrid: points whose longitude and latitude are both in
// range but in each other's columns (22.3, -42.5 written as -42.5,
// 22.3) miss a grid of 20..26 E, 40..45 S; swapped back, each lies on it
// (by hand: -42.5 is within 40..45 S, 22.3 within 20..26 E), and a
// point swapped onto no part of it is not counted. Longitudes count
// modulo 360 (a grid of 170..190 E holds -175).
func TestSwappedOnGrid(t *testing.T) {
	g, err := extent.NewGrid(120, 100, [6]float64{20, 0.05, 0, -40, 0, -0.05}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	pts := []report.Point{{Lon: -42.5, Lat: 22.3}, {Lon: -40.01, Lat: 25.99}, {Lon: 22.3, Lat: -42.5}, {Lon: -50, Lat: 22}}
	// By hand: 22.3 E is column (22.3-20)/0.05 = 46, 42.5 S row 50;
	// 25.99 E column 119, 40.01 S row 0.
	if got, want := swappedOnGrid(pts, g), []int{50*120 + 46, 119, -1, -1}; !slices.Equal(got, want) {
		t.Errorf("swapped points' cells: %v, want %v", got, want)
	}
	e, err := extent.NewGrid(200, 100, [6]float64{170, 0.1, 0, -10, 0, -0.1}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer e.Close()
	// By hand: 185 E is column 150 both ways, 15 S row 50.
	if got, want := swappedOnGrid([]report.Point{{Lon: -15, Lat: -175}, {Lon: -15, Lat: 185}}, e), []int{50*200 + 150, 50*200 + 150}; !slices.Equal(got, want) {
		t.Errorf("across 180: %v, want %v", got, want)
	}
}

// TestUllrCommand: a model whose cells lie within half a cell of the
// first's but further than extent.SameGridTolerance is refused with, as
// well as gdalwarp, the gdal_translate -a_ullr command that gives it the
// first grid's corners (west 10 W, north 50 N, east -10 + 600/120 = -5,
// south 50 - 400/120 = 46.666..., by hand). Where gdal_translate is
// installed, the command is run on an ESRI ASCII grid whose header writes
// that 30 arcsecond grid in 6 decimals (cellsize 0.008333: cells up to
// 0.024 of a cell off), and its output is on the grid.
func TestUllrCommand(t *testing.T) {
	extent.Register()
	first, err := extent.NewGrid(600, 400, [6]float64{-10, 1.0 / 120, 0, 50, 0, -1.0 / 120}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer first.Close()
	dir := t.TempDir()
	asc := filepath.Join(dir, "rounded.asc")
	got := ullrCommand(first, asc)
	want := "gdal_translate -a_ullr -10 50 -5 46.666666666666664 " + asc + " " + filepath.Join(dir, "rounded_grid.tif")
	if !strings.HasPrefix(got, want) {
		t.Errorf("got %q, want %q...", got, want)
	}
	if _, err := exec.LookPath("gdal_translate"); err != nil {
		t.Skip("gdal_translate is not installed")
	}
	var b strings.Builder
	b.WriteString("ncols 600\nnrows 400\nxllcorner -10.000000\nyllcorner 46.666667\ncellsize 0.008333\nNODATA_value -9999\n")
	row := strings.Repeat("0.5 ", 600)
	for range 400 {
		b.WriteString(row + "\n")
	}
	if err := os.WriteFile(asc, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	g, err := extent.NewGrid(600, 400, [6]float64{-10, 0.008333, 0, 46.666667 + 400*0.008333, 0, -0.008333}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	if d := first.SameAs(g); d == "" {
		t.Fatal("the 6-decimal header's grid (0.024 of a cell off) taken for the first grid")
	}
	args := strings.Fields(strings.SplitN(got, ",", 2)[0])
	if out, err := exec.Command(args[0], append([]string{"-q", "-a_srs", "EPSG:4326"}, args[1:]...)...).CombinedOutput(); err != nil {
		t.Fatalf("%s: %v %s", got, err, out)
	}
	fixed, err := extent.OpenGrid(filepath.Join(dir, "rounded_grid.tif"))
	if err != nil {
		t.Fatal(err)
	}
	defer fixed.Close()
	if s := first.GridShift(fixed); s > 1e-6 {
		t.Errorf("the command's output is %g of a cell off the grid", s)
	}
}
