package nullmodel

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"areasweep/extent/geodesy"
)

// golden is testdata/nullmodel/golden.json, written by golden.py from
// pyproj, scikit-learn and numpy (see that script).
type golden struct {
	Grid struct {
		West, North, Deg float64
		Width, Height    int
	}
	Train []struct{ Lat, Lon float64 }
	Test  []struct {
		Lat, Lon      float64
		Cell          int
		NearestTrainM float64 `json:"nearest_train_m"`
	}
	DistanceM []float64 `json:"distance_m"`
	Mask      []uint64
	Extents   []struct {
		Name              string
		Bit               uint64
		TestPoints        int     `json:"test_points"`
		TestMeanM         float64 `json:"test_mean_m"`
		TestMedianM       float64 `json:"test_median_m"`
		BackgroundMeanM   float64 `json:"background_mean_m"`
		BackgroundMedianM float64 `json:"background_median_m"`
		RatioMean         float64 `json:"ratio_mean"`
		RatioMedian       float64 `json:"ratio_median"`
		AUC               float64
	}
}

func loadGolden(t *testing.T) *golden {
	t.Helper()
	data, err := os.ReadFile(filepath.Join("..", "..", "testdata", "nullmodel", "golden.json"))
	if err != nil {
		t.Fatal(err)
	}
	var g golden
	if err := json.Unmarshal(data, &g); err != nil {
		t.Fatal(err)
	}
	return &g
}

// TestGoldenDistances checks every cell's distance, and the test points'
// distances to the nearest training point, against pyproj's
// Geod(ellps="WGS84").inv (golden.py), to 1 micrometre (our tolerance;
// both sides run Karney's algorithm, accurate to 15 nm), and the
// sorting-bias ratios against numpy: means to 1e-9 relative (integer area
// weights and millimetre rounding), the cells' median to 0.11% (one bin of
// Background's histogram, 0.1%, plus rounding).
func TestGoldenDistances(t *testing.T) {
	g := loadGolden(t)
	lats := make([]float64, len(g.Train))
	lons := make([]float64, len(g.Train))
	for i, p := range g.Train {
		lats[i], lons[i] = p.Lat, p.Lon
	}
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		t.Fatal(err)
	}
	w, h := g.Grid.Width, g.Grid.Height
	f := New(ix, lonLatGrid(g.Grid.West, g.Grid.North, g.Grid.Deg))
	dist := make([]float64, w*h)
	f.Distances(0, 0, w, h, nil, dist)
	if len(g.DistanceM) != w*h {
		t.Fatalf("%d golden distances for %d cells", len(g.DistanceM), w*h)
	}
	for i, want := range g.DistanceM {
		if math.Abs(dist[i]-want) > 1e-6 {
			t.Errorf("cell %d: %.9f m, pyproj %.9f m", i, dist[i], want)
		}
	}
	var bg Background
	wts := make([]int64, w)
	for r := range h {
		top := g.Grid.North - float64(r)*g.Grid.Deg
		a := geodesy.CellArea(top-g.Grid.Deg, top, g.Grid.Deg)
		for c := range wts {
			wts[c] = int64(math.Round(a * 4096))
		}
		addMasked(&bg, dist[r*w:(r+1)*w], g.Mask[r*w:(r+1)*w], wts)
	}
	testD := make([]float64, len(g.Test))
	for i, p := range g.Test {
		_, testD[i] = ix.Nearest(p.Lat, p.Lon, 0)
		if math.Abs(testD[i]-p.NearestTrainM) > 1e-6 {
			t.Errorf("test point %d: %.9f m to the nearest training point, pyproj %.9f m", i, testD[i], p.NearestTrainM)
		}
	}
	rel := func(a, b float64) float64 { return math.Abs(a-b) / math.Abs(b) }
	for k, e := range g.Extents {
		var in []float64
		for i, p := range g.Test {
			if g.Mask[p.Cell]&e.Bit != 0 {
				in = append(in, testD[i])
			}
		}
		sb := bg.SortingBias(k, in)
		if !sb.Defined || sb.TestN != e.TestPoints {
			t.Fatalf("%s: %+v, want %d test points", e.Name, sb, e.TestPoints)
		}
		if rel(sb.TestMeanM, e.TestMeanM) > 1e-12 || rel(sb.TestMedianM, e.TestMedianM) > 1e-12 {
			t.Errorf("%s: test mean %.6f median %.6f, numpy %.6f and %.6f", e.Name, sb.TestMeanM, sb.TestMedianM, e.TestMeanM, e.TestMedianM)
		}
		if rel(sb.BackgroundMeanM, e.BackgroundMeanM) > 1e-9 || rel(sb.RatioMean, e.RatioMean) > 1e-9 {
			t.Errorf("%s: background mean %.6f ratio %.9f, numpy %.6f and %.9f", e.Name, sb.BackgroundMeanM, sb.RatioMean, e.BackgroundMeanM, e.RatioMean)
		}
		if rel(sb.BackgroundMedianM, e.BackgroundMedianM) > 1.1e-3 || rel(sb.RatioMedian, e.RatioMedian) > 1.1e-3 {
			t.Errorf("%s: background median %.3f ratio %.6f, numpy %.3f and %.6f", e.Name, sb.BackgroundMedianM, sb.RatioMedian, e.BackgroundMedianM, e.RatioMedian)
		}
	}
}
