package pipeline

import (
	"os/exec"
	"path/filepath"
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
	if n := swappedOnGrid(pts, g); n != 2 {
		t.Errorf("swapped points on the grid: %d, want 2", n)
	}
	e, err := extent.NewGrid(200, 100, [6]float64{170, 0.1, 0, -10, 0, -0.1}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer e.Close()
	if n := swappedOnGrid([]report.Point{{Lon: -15, Lat: -175}, {Lon: -15, Lat: 185}}, e); n != 2 {
		t.Errorf("across 180: %d, want 2", n)
	}
}
