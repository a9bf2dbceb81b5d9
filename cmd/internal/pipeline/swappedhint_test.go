package pipeline

import (
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/cmd/internal/pass"
	"areasweep/extent"
	"areasweep/extent/vocab"
	"areasweep/report"
)

// TestNoTestPointSwappedHint: on a land-only layout (180 W..180 E, 60 S..90 N,
// 1 degree cells) with data only in a box 100..60 W, 20..60 N, an
// Antarctic species at 75 S whose longitudes lie within +-90 misses the
// raster; swapped, all eight of its points land on the grid, but only one
// (longitude 30, swapped to 75 W, 30 N) on data. The run said the
// columns were probably swapped; now it says where the points and the
// raster lie. Points truly in the box written swapped (longitude 30..50,
// latitude -80) are still named as swapped. Test points off the raster
// beside training points on it are told as such: it said every point lay
// outside. Test points on no-data cells of the raster (three at 70 N, one
// off it at 80 S) beside training points on data: it said only "no test
// point falls on a cell with data ...; nothing can be scored", with no
// word of where they lay or what to do; now it counts them by fate,
// names their lines and says what to do. Coordinates by hand.
func TestNoTestPointSwappedHint(t *testing.T) {
	extent.Register()
	dir := t.TempDir()
	p := filepath.Join(dir, "land.tif")
	const w, h = 360, 150
	ds, err := godal.Create(godal.GTiff, p, 1, godal.Float32, w, h)
	if err != nil {
		t.Fatal(err)
	}
	gt := [6]float64{-180, 1, 0, 90, 0, -1}
	if err := ds.SetGeoTransform(gt); err != nil {
		t.Fatal(err)
	}
	sr, err := godal.NewSpatialRefFromEPSG(4326)
	if err != nil {
		t.Fatal(err)
	}
	if err := ds.SetSpatialRef(sr); err != nil {
		t.Fatal(err)
	}
	sr.Close()
	b := ds.Bands()[0]
	if err := b.SetNoData(-9999); err != nil {
		t.Fatal(err)
	}
	buf := make([]float32, w*h)
	for r := range h {
		for c := range w {
			lon, lat := -180+float64(c)+0.5, 90-float64(r)-0.5
			buf[r*w+c] = -9999
			if lon > -100 && lon < -60 && lat > 20 && lat < 60 {
				buf[r*w+c] = 0.5
			}
		}
	}
	if err := b.Write(0, 0, buf, w, h); err != nil {
		t.Fatal(err)
	}
	if err := ds.Close(); err != nil {
		t.Fatal(err)
	}
	g, err := extent.NewGrid(w, h, gt, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	for _, c := range []struct {
		name      string
		lons      []float64
		lat       float64
		train     int // scored training points, on the raster
		want, not string
		nodata    int // the first nodata test points lie on no-data cells (at 70 N), not off the raster
	}{
		{"antarctic", []float64{-55, -40, -25, -10, 5, 30, 70, 85}, -75, 0,
			"check that the points and the raster cover the same area (the points lie at latitudes -75 to -75, longitudes -55 to 85; the raster covers latitudes -60 to 90, longitudes -180 to 180)", "swapped", 0},
		{"swapped", []float64{30, 35, 40, 45, 50}, -80, 0,
			"with longitude and latitude swapped, 5 of the 5 points would lie on cells with data", "cover the same area", 0},
		// Training points on the raster, test points off it: it said
		// "every point lies outside the raster".
		{"test points only", []float64{30, 35}, -80, 3,
			"every test point (2) lies outside the raster " + p + ", while 3 training point(s) lie on it; nothing can be scored; check the test records' coordinates, or hold out records that lie on the raster as role test (the points lie at latitudes -80 to -80, longitudes 30 to 35;", "every point", 0},
		// Test points on no-data cells, one off the raster.
		{"test points on no data", []float64{10, 20, 25, 30}, -80, 2,
			"pts.csv: no test point falls on a cell with data of m (" + p + "); nothing can be scored: of the 4 test records, 3 on no-data cells of m (lines 2, 3, 4) and 1 outside the raster (line 5); hold out records that lie on cells with data as role test, or, if those cells should hold data, check the raster's nodata value (gdalinfo)", "every test point", 3},
	} {
		r, err := pass.Open(p)
		if err != nil {
			t.Fatal(err)
		}
		s := &Study{o: &Options{}, log: &Log{}, res: &report.Results{}, grid: g, models: []namedPath{{Name: "m", Path: p}}}
		s.o.Occurrences = "pts.csv"
		for i, lon := range c.lons {
			pt := report.Point{ID: i + 2, Role: vocab.RoleTest, Lon: lon, Lat: c.lat, Status: vocab.PointOutsideRaster}
			if i < c.nodata {
				pt.Lat, pt.Status = 70, vocab.PointNoData
			}
			s.points = append(s.points, pt)
		}
		s.res.PointCounts.OutsideRaster = len(c.lons) - c.nodata
		s.res.PointCounts.NoData = c.nodata
		for i := range c.train {
			s.points = append(s.points, report.Point{ID: 100 + i, Role: vocab.RoleTrain, Lon: -80, Lat: 40, Status: vocab.PointScored})
		}
		s.res.PointCounts.Train = c.train
		msg := s.noTestPoint(r).Error()
		r.Close()
		if !strings.Contains(msg, c.want) || strings.Contains(msg, c.not) {
			t.Errorf("%s: %q, want it to say %q and not %q", c.name, msg, c.want, c.not)
		}
	}
}
