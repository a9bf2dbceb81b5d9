package pass

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"areasweep/extent"
	"areasweep/extent/geodesy"
	"areasweep/extent/nullmodel"
	"areasweep/metrics"
)

// TestNullGoldenAUC scores the distance-only null on the grid, extents and
// points of testdata/nullmodel/golden.json through the pass (Virtual, true
// cell areas in integer units) and checks each extent's area-weighted AUC
// against scikit-learn's roc_auc_score with sample_weight (golden.py), to
// 1e-9 (our tolerance: the integer rounding of cell areas moves the AUC by
// about 1e-13).
func TestNullGoldenAUC(t *testing.T) {
	data, err := os.ReadFile(filepath.Join("..", "..", "testdata", "nullmodel", "golden.json"))
	if err != nil {
		t.Fatal(err)
	}
	var gd struct {
		Grid struct {
			West, North, Deg float64
			Width, Height    int
		}
		Train []struct{ Lat, Lon float64 }
		Test  []struct {
			Cell int
		}
		Mask    []uint64
		Extents []struct {
			Name string
			Bit  uint64
			AUC  float64
		}
	}
	if err := json.Unmarshal(data, &gd); err != nil {
		t.Fatal(err)
	}
	g, err := extent.NewGrid(gd.Grid.Width, gd.Grid.Height, [6]float64{gd.Grid.West, gd.Grid.Deg, 0, gd.Grid.North, 0, -gd.Grid.Deg}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	var lats, lons []float64
	for _, p := range gd.Train {
		lats, lons = append(lats, p.Lat), append(lons, p.Lon)
	}
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		t.Fatal(err)
	}
	v := NewVirtual(g, nullmodel.New(ix, CellCentres(g)))
	fam := &extent.Family{Grid: g, Mask: gd.Mask}
	for _, e := range gd.Extents {
		fam.Members = append(fam.Members, extent.Member{ID: e.Name, Status: extent.StatusOK})
	}
	cells := make([]int, len(gd.Test))
	for i, p := range gd.Test {
		cells[i] = p.Cell
	}
	vals, ok, err := v.Sample(g, cells)
	if err != nil {
		t.Fatal(err)
	}
	layout, err := metrics.NewLayout(vals, -3e6, 0, 4096)
	if err != nil {
		t.Fatal(err)
	}
	accs, _, err := v.Score(g, fam, layout, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	for k, e := range gd.Extents {
		var test []float64
		for i, c := range cells {
			if ok[i] && gd.Mask[c]&e.Bit != 0 {
				test = append(test, vals[i])
			}
		}
		sc, err := metrics.Score(accs[k], nil, test, metrics.Settings{Iterations: 1, Seed: 1})
		if err != nil {
			t.Fatal(err)
		}
		if !sc.Scored || math.Abs(sc.AUC-e.AUC) > 1e-9 {
			t.Errorf("%s: AUC %.12f, scikit-learn %.12f", e.Name, sc.AUC, e.AUC)
		}
	}
}
