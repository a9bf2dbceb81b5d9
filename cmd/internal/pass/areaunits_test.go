package pass

import (
	"math"
	"testing"

	"areasweep/extent"
)

// TestAreaUnits checks the integer area weights the passes add: on grids
// of small cells each cell's weight must be its area to within 4.7e-10 of
// it (2^-31, half a unit of 2^30 units), where the fixed unit of 1/4096
// m^2 rounded a 1 m cell (0.79 m^2, 3222 units) by up to 1.6e-4 of its
// area and moved the AUC of such a study by 3e-7 against
// sklearn.metrics.roc_auc_score with the cell areas as weights (the
// independent check made while fixing it, not kept). Grids of cells of
// 512 m and more keep AreaUnitsPerKm2 (their outputs are unchanged), and
// no grid exceeds the whole Earth's 2.1e18 units.
func TestAreaUnits(t *testing.T) {
	for _, tc := range []struct {
		name  string
		w, h  int
		gt    [6]float64
		crs   string
		fixed bool // keeps AreaUnitsPerKm2
	}{
		{"1 m cells", 200, 150, [6]float64{10.123456, 1e-5, 0, 50.654321, 0, -1e-5}, "EPSG:4326", false},
		{"20 m cells", 300, 200, [6]float64{10, 2e-4, 0, 50, 0, -2e-4}, "EPSG:4326", false},
		{"30 m UTM cells", 100, 80, [6]float64{400000, 30, 0, 5600000, 0, -30}, "EPSG:32633", false},
		{"0.05 degree cells", 120, 90, [6]float64{10, 0.05, 0, 50, 0, -0.05}, "EPSG:4326", true},
		{"whole globe, 1 degree", 360, 180, [6]float64{-180, 1, 0, 90, 0, -1}, "EPSG:4326", true},
		{"1 km LAEA cells", 100, 100, [6]float64{4000000, 1000, 0, 3200000, 0, -1000}, "EPSG:3035", true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			g, err := extent.NewGrid(tc.w, tc.h, tc.gt, tc.crs)
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			u := AreaUnits(g)
			if tc.fixed != (u == AreaUnitsPerKm2) {
				t.Errorf("units %g per km2, AreaUnitsPerKm2 %g (want kept: %v)", u, float64(AreaUnitsPerKm2), tc.fixed)
			}
			total := 0.0
			worst := 0.0
			for r := 0; r < g.Height; r++ {
				areas, weights := RowWeights(g, r, 0, g.Width, nil, nil)
				for c, a := range areas {
					total += float64(weights[c])
					worst = math.Max(worst, math.Abs(float64(weights[c])/u-a)/a)
				}
			}
			if !tc.fixed && worst > 4.7e-10 {
				t.Errorf("a cell's weight is %.3g of its area off", worst)
			}
			if total > maxGridUnits {
				t.Errorf("the grid holds %g units, beyond %g", total, maxGridUnits)
			}
		})
	}
}
