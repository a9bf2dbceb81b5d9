package pipeline

import (
	"math"
	"slices"
	"testing"

	"areasweep/extent"
)

// TestNullSites checks that the distance-only null's sites are the
// training points' places, each once, in the order of their first point:
// with --no-thin, 20 points at one place were 20 candidate sites, above
// nullmodel's limit of 16 per super-tile, and every cell was then measured
// against each copy (17 s instead of 0.4 s on 800,000 cells). The expected
// lists are the inputs with the repeats struck out by hand.
func TestNullSites(t *testing.T) {
	negZero := math.Copysign(0, -1)
	for _, tc := range []struct {
		name       string
		in         []extent.LonLat
		lats, lons []float64
	}{
		{"one point", []extent.LonLat{{Lon: 10, Lat: 50}}, []float64{50}, []float64{10}},
		{"20 copies of one place", slices.Repeat([]extent.LonLat{{Lon: -137.498125, Lat: -39.998125}}, 20),
			[]float64{-39.998125}, []float64{-137.498125}},
		{"repeats interleaved, first order kept",
			[]extent.LonLat{{Lon: 1, Lat: 2}, {Lon: 3, Lat: 4}, {Lon: 1, Lat: 2}, {Lon: 5, Lat: 6}, {Lon: 3, Lat: 4}},
			[]float64{2, 4, 6}, []float64{1, 3, 5}},
		{"same longitude, other latitude", []extent.LonLat{{Lon: 1, Lat: 2}, {Lon: 1, Lat: 2.000000001}},
			[]float64{2, 2.000000001}, []float64{1, 1}},
		{"swapped coordinates are two places", []extent.LonLat{{Lon: 1, Lat: 2}, {Lon: 2, Lat: 1}},
			[]float64{2, 1}, []float64{1, 2}},
		{"-0 and +0 kept as given", []extent.LonLat{{Lon: 0, Lat: negZero}, {Lon: 0, Lat: 0}},
			[]float64{negZero, 0}, []float64{0, 0}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			lats, lons := nullSites(tc.in)
			if !slices.Equal(lats, tc.lats) || !slices.Equal(lons, tc.lons) {
				t.Fatalf("nullSites = %v, %v; want %v, %v", lats, lons, tc.lats, tc.lons)
			}
		})
	}
}
