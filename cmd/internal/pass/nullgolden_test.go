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
	"areasweep/extent/vocab"
	"areasweep/metrics"
)

// TestNullGoldenAUC scores the distance-only null on the grid, extents and
// points of testdata/nullmodel/golden.json through the pass (Virtual, true
// cell areas in integer units) and checks each extent's area-weighted AUC
// against scikit-learn's roc_auc_score with sample_weight (golden.py), to
// 1e-9 (our tolerance: the integer rounding of cell areas moves the AUC by
// about 1e-13), and the sorting-bias tally fed from the pass's rows (the
// bracket midpoints) against numpy's background mean and median.
func TestNullGoldenAUC(t *testing.T) {
	data, err := os.ReadFile(filepath.Join("..", "..", "..", "testdata", "nullmodel", "golden.json"))
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
			Name              string
			Bit               uint64
			AUC               float64
			BackgroundMeanM   float64 `json:"background_mean_m"`
			BackgroundMedianM float64 `json:"background_median_m"`
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
	v := NewVirtual(g, DistanceNull(g, ix))
	var members []extent.Member
	for _, e := range gd.Extents {
		members = append(members, extent.Member{ID: e.Name, Status: vocab.StatusOK})
	}
	fam := maskFamily(g, members, gd.Mask)
	cells := make([]int, len(gd.Test))
	for i, p := range gd.Test {
		cells[i] = p.Cell
	}
	vals, ok, err := v.Sample(g, cells)
	if err != nil {
		t.Fatal(err)
	}
	layout, err := metrics.NewLayout(vals, 4096, metrics.WithHistFloor(DistanceNullFloor(DistanceNull(g, ix), g, 4096)))
	if err != nil {
		t.Fatal(err)
	}
	// The sorting-bias tally sees the pass's values, as the run's does.
	var bg nullmodel.Background
	accs, _, err := v.Score(g, fam, layout, Options{Workers: 2, Rows: bruteTally(g, fam, &bg)})
	if err != nil {
		t.Fatal(err)
	}
	for k, e := range gd.Extents {
		// Tolerances (our choice, see nullmodel.BracketTol): the pass hands
		// the tally midpoints within 0.1% of each distance, so the mean is
		// within 0.1% and the median within 0.1% plus one histogram bin
		// (0.098%) of numpy's exact values.
		if m := bg.Mean(k); math.Abs(m-e.BackgroundMeanM) > nullmodel.BracketTol*e.BackgroundMeanM {
			t.Errorf("%s: background mean %.3f m, numpy %.3f m", e.Name, m, e.BackgroundMeanM)
		}
		if m := bg.Median(k); math.Abs(m-e.BackgroundMedianM) > (nullmodel.BracketTol+1.0/1024)*e.BackgroundMedianM {
			t.Errorf("%s: background median %.3f m, numpy %.3f m", e.Name, m, e.BackgroundMedianM)
		}
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

// cellField is a Field read from one value per grid cell (row-major).
type cellField struct {
	width int
	vals  []float64
}

func (f cellField) Fill(x0, y0, w, h int, _ []uint64, dst []float64) {
	for r := 0; r < h; r++ {
		copy(dst[r*w:(r+1)*w], f.vals[(y0+r)*f.width+x0:(y0+r)*f.width+x0+w])
	}
}

// TestNullGoldenModelMinusNull scores the generated model of
// testdata/nullmodel/golden.json (model_value per cell) and the
// distance-only null through the pass, compares them per extent with the
// paired machinery (metrics.NewEvaluator, metrics.Compare) and checks the
// AUC difference model minus null, its SE and 95% interval against the
// numpy computation from the placements in golden.py, to 1e-9 (our
// tolerance, as for the AUC above: integer cell areas), and the model's
// AUC against scikit-learn.
func TestNullGoldenModelMinusNull(t *testing.T) {
	data, err := os.ReadFile(filepath.Join("..", "..", "..", "testdata", "nullmodel", "golden.json"))
	if err != nil {
		t.Fatal(err)
	}
	var gd struct {
		Grid struct {
			West, North, Deg float64
			Width, Height    int
		}
		Train      []struct{ Lat, Lon float64 }
		Test       []struct{ Cell int }
		Mask       []uint64
		ModelValue []float64 `json:"model_value"`
		Extents    []struct {
			Name           string
			Bit            uint64
			ModelAUC       float64 `json:"model_auc"`
			ModelMinusNull struct {
				Diff, SE, Low, High float64
			} `json:"model_minus_null"`
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
	var members []extent.Member
	for _, e := range gd.Extents {
		members = append(members, extent.Member{ID: e.Name, Status: vocab.StatusOK})
	}
	fam := maskFamily(g, members, gd.Mask)
	cells := make([]int, len(gd.Test))
	for i, p := range gd.Test {
		cells[i] = p.Cell
	}
	set := metrics.Settings{Iterations: 1, Seed: 1}
	evals := func(v *Virtual, opts ...metrics.LayoutOption) ([]*metrics.Evaluator, []metrics.Scores) {
		vals, ok, err := v.Sample(g, cells)
		if err != nil {
			t.Fatal(err)
		}
		layout, err := metrics.NewLayout(vals, 4096, opts...)
		if err != nil {
			t.Fatal(err)
		}
		accs, _, err := v.Score(g, fam, layout, Options{Workers: 2})
		if err != nil {
			t.Fatal(err)
		}
		var evs []*metrics.Evaluator
		var scs []metrics.Scores
		for k, e := range gd.Extents {
			var test []float64
			var ids []int
			for i, c := range cells {
				if ok[i] && gd.Mask[c]&e.Bit != 0 {
					test, ids = append(test, vals[i]), append(ids, i)
				}
			}
			sc, err := metrics.Score(accs[k], nil, test, set)
			if err != nil {
				t.Fatal(err)
			}
			ev, err := metrics.NewEvaluator(accs[k], test, ids, nil, set)
			if err != nil {
				t.Fatal(err)
			}
			evs, scs = append(evs, ev), append(scs, sc)
		}
		return evs, scs
	}
	model, modelScores := evals(NewVirtual(g, cellField{gd.Grid.Width, gd.ModelValue}))
	nf := DistanceNull(g, ix)
	null, _ := evals(NewVirtual(g, nf), metrics.WithHistFloor(DistanceNullFloor(nf, g, 4096)))
	d := metrics.Draws{N: len(cells), B: 20, Seed: 7}
	for k, e := range gd.Extents {
		if math.Abs(modelScores[k].AUC-e.ModelAUC) > 1e-9 {
			t.Errorf("%s: model AUC %.12f, scikit-learn %.12f", e.Name, modelScores[k].AUC, e.ModelAUC)
		}
		cmp, err := metrics.Compare(model[k], null[k], d)
		if err != nil {
			t.Fatal(err)
		}
		w := e.ModelMinusNull
		got := cmp.AUC
		if !got.Defined || math.Abs(got.Diff-w.Diff) > 1e-9 || math.Abs(got.SE-w.SE) > 1e-9 || math.Abs(got.Low-w.Low) > 1e-9 || math.Abs(got.High-w.High) > 1e-9 {
			t.Errorf("%s: model minus null %+v, numpy %+v", e.Name, got, w)
		}
	}
}
