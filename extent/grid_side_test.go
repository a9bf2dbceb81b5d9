package extent

import (
	"math"
	"testing"
)

// TestMinCellSideM checks the shortest cell side of latitude-longitude
// grids in both hemispheres against pyproj's Geod(ellps="WGS84").inv
// (Karney 2013): the east-west side along the poleward edge of the row
// nearest a pole, or the north-south side where that is shorter. In the
// southern hemisphere the north-south side used to be measured from the
// poleward edge to itself, so the shortest side was 0 and the hull's
// edges were not densified for its buffers.
func TestMinCellSideM(t *testing.T) {
	tests := []struct {
		name string
		w, h int
		gt   [6]float64
		want float64 // metres, pyproj Geod.inv
	}{
		// Geod.inv(170, -20, 170.1, -20): the bottom row's south edge.
		{"southern, across 180", 200, 100, [6]float64{170, 0.1, 0, -10, 0, -0.1}, 10464.70847561311},
		// Geod.inv(0, 80, 0.1, 80): the top row's north edge.
		{"northern, 60..80", 300, 200, [6]float64{0, 0.1, 0, 80, 0, -0.1}, 1939.3483140858132},
		// Geod.inv(10, 0, 10, -0.25): the centre cell's north-south side,
		// shorter than any east-west side of 0.25 degrees at +-5.
		{"across the equator", 40, 40, [6]float64{10, 0.25, 0, 5, 0, -0.25}, 27643.570716999868},
		// Geod.inv(-180, 90 - 1/12, -180 + 1/12, 90 - 1/12): the whole
		// globe at 5 arc-minutes, whose top and bottom rows reach the
		// poles; their poleward sides have no length (the rounding left
		// 2.3e-12 m, and the hull's edges cut every 2.3e-12 m ran out of
		// memory).
		{"whole globe, poles", 4320, 2160, [6]float64{-180, 1.0 / 12, 0, 90, 0, -1.0 / 12}, 13.537686284290997},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			g, err := NewGrid(tc.w, tc.h, tc.gt, "EPSG:4326")
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			if got := g.MinCellSideM(); math.Abs(got-tc.want) > 1e-6*tc.want {
				t.Errorf("MinCellSideM = %v m, want %v (pyproj Geod.inv)", got, tc.want)
			}
		})
	}
}
