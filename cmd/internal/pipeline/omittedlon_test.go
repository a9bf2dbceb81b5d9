package pipeline

import (
	"math"
	"path/filepath"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/extent/vocab"
	"areasweep/metrics"
	"areasweep/report"
)

// TestOmittedPointsOnGridTurn: omitted_points.gpkg puts each test point on
// the longitude turn of the cell it was scored on, so that the points lie
// on extents.gpkg's outlines, which are in the grid's coordinates. On a
// grid running 165°..195° a point given at −170° was written at −170°, a
// whole turn west of the outlines (which run to 195°): the layer spanned
// −180°..180° and a GIS drew the points on the other side of the map. A
// projected grid keeps the longitudes as given. Expected longitudes worked
// by hand (−170.25 + 360 = 189.75).
func TestOmittedPointsOnGridTurn(t *testing.T) {
	geo := report.Grid{Width: 300, Height: 240, GeoTransform: [6]float64{165, 0.1, 0, -28, 0, -0.1}, CRS: "EPSG:4326", Geographic: true}
	west := report.Grid{Width: 300, Height: 240, GeoTransform: [6]float64{-195, 0.1, 0, -28, 0, -0.1}, CRS: "EPSG:4326", Geographic: true}
	proj := report.Grid{Width: 300, Height: 240, GeoTransform: [6]float64{-1.5e6, 1e4, 0, 1e6, 0, -1e4}, CRS: "EPSG:3031"}
	points := []report.Point{
		// col 247: cell 189.7..189.8, given at -170.25
		{ID: 2, Role: vocab.RoleTest, Lon: -170.25, Lat: -40.05, Row: 120, Col: 247, Status: vocab.PointScored, NearestTrainKm: 3},
		// col 50: cell 170.0..170.1, given at 170.05
		{ID: 3, Role: vocab.RoleTest, Lon: 170.05, Lat: -40.05, Row: 120, Col: 50, Status: vocab.PointScored, NearestTrainKm: 4},
	}
	for _, tc := range []struct {
		name string
		grid report.Grid
		pts  []report.Point
		want []float64
	}{
		{"east of 180", geo, points, []float64{189.75, 170.05}},
		// The same cells on a grid running -195..-165 (col 247: -170.3..-170.2; col 50: -190..-189.9).
		{"west of -180", west, points, []float64{-170.25, -189.95}},
		{"projected", proj, points, []float64{-170.25, 170.05}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := &report.Results{Grid: tc.grid, Points: tc.pts,
				Omissions: []report.Omission{{Model: "m", Threshold: metrics.ThresholdMTP, Omitted: []int{3}}}}
			path := filepath.Join(t.TempDir(), "omitted_points.gpkg")
			if err := writeOmittedGPKG(path, r); err != nil {
				t.Fatal(err)
			}
			ds, err := godal.Open(path, godal.VectorOnly())
			if err != nil {
				t.Fatal(err)
			}
			defer ds.Close()
			layer := ds.Layers()[0]
			for i := 0; ; i++ {
				ft := layer.NextFeature()
				if ft == nil {
					if i != len(tc.want) {
						t.Fatalf("%d features, want %d", i, len(tc.want))
					}
					break
				}
				b, err := ft.Geometry().Bounds()
				if err != nil {
					t.Fatal(err)
				}
				line := ft.Fields()["line"].Int()
				omit := ft.Fields()["omit_m_minimum_training_presence"].Int()
				ft.Close()
				if math.Abs(b[0]-tc.want[i]) > 1e-9 || math.Abs(b[1]-tc.pts[i].Lat) > 1e-12 {
					t.Errorf("point of line %d at (%v, %v), want (%v, %v)", line, b[0], b[1], tc.want[i], tc.pts[i].Lat)
				}
				if line != int64(tc.pts[i].ID) || omit != int64(i) {
					t.Errorf("feature %d: line %d omit %d", i, line, omit)
				}
			}
		})
	}
}
