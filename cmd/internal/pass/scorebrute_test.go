package pass

import (
	"bytes"
	"fmt"
	"maps"
	"math"
	"reflect"
	"slices"
	"strings"
	"testing"

	"areasweep/extent"
	"areasweep/extent/vocab"
	"areasweep/metrics"
)

// memSource serves blocks of a grid of float32 values held in memory, as
// a GDAL band of Float32 tiles hands them over (converted to float64), so
// that a benchmark of the pass's scoring sees no decompression.
type memSource struct {
	w    int
	vals []float32
}

func (s memSource) ReadBlock(x0, y0, w, h int, buf []float64) error {
	for y := 0; y < h; y++ {
		row := s.vals[(y0+y)*s.w+x0 : (y0+y)*s.w+x0+w]
		dst := buf[y*w : (y+1)*w]
		for x, v := range row {
			dst[x] = float64(v)
		}
	}
	return nil
}

func (memSource) Close() error { return nil }

// benchFamilies returns the families BenchmarkScoreMem scores: the
// NullVsRaster family (8 members holding every cell, 8 groups), and a
// family shaped like a run's: a chain of three nested discs (region and
// buffers), an ellipse (hull), the whole grid, and three disjoint bands
// inside the largest disc (ecoregions), so 8 members in 6 groups; and 60
// overlapping discs, each its own group.
func benchFamilies(g *extent.Grid) map[string]*extent.Family {
	w, h := g.Width, g.Height
	cx, cy := float64(w)/2, float64(h)/2
	disc := func(row int, rx, ry float64) (int32, int32, bool) {
		dy := (float64(row) + 0.5 - cy) / ry
		if math.Abs(dy) >= 1 {
			return 0, 0, false
		}
		dx := rx * math.Sqrt(1-dy*dy)
		return int32(math.Ceil(cx - dx)), int32(math.Ceil(cx + dx)), true
	}
	var members []extent.Member
	for k := 0; k < 8; k++ {
		members = append(members, extent.Member{ID: fmt.Sprint(k), Status: vocab.StatusOK})
	}
	run := extent.NewFamilyFromRuns(g, members, func(k, row int) []int32 {
		r := float64(h) * [3]float64{0.25, 0.35, 0.45}[min(k, 2)]
		switch {
		case k < 3: // nested discs
			if a, b, ok := disc(row, r, r); ok {
				return []int32{a, b}
			}
		case k == 3: // hull
			if a, b, ok := disc(row, 0.45*float64(w), 0.3*float64(h)); ok {
				return []int32{a, b}
			}
		case k == 4: // whole grid
			return []int32{0, int32(w)}
		default: // bands of the largest disc
			a, b, ok := disc(row, r, r)
			if !ok {
				return nil
			}
			third := (b - a) / 3
			lo := a + int32(k-5)*third
			hi := lo + third
			if k == 7 {
				hi = b
			}
			return []int32{lo, hi}
		}
		return nil
	})
	run.Chains["region"] = []int{0, 1, 2}
	// 60 overlapping discs, each its own group: many edges in most rows
	// (the overlay's worst case).
	var many []extent.Member
	for k := 0; k < 60; k++ {
		many = append(many, extent.Member{ID: fmt.Sprint(k), Status: vocab.StatusOK})
	}
	discs := extent.NewFamilyFromRuns(g, many, func(k, row int) []int32 {
		fx, fy, fr := float64((k*37)%60)/60, float64((k*23)%60)/60, 0.1+float64((k*13)%60)/200
		dy := (float64(row) + 0.5 - fy*float64(h)) / (fr * float64(h))
		if math.Abs(dy) >= 1 {
			return nil
		}
		dx := fr * float64(h) * math.Sqrt(1-dy*dy)
		a, b := max(0, int32(math.Ceil(fx*float64(w)-dx))), min(int32(w), int32(math.Ceil(fx*float64(w)+dx)))
		if a >= b {
			return nil
		}
		return []int32{a, b}
	})
	return map[string]*extent.Family{"full8": fullFamily(g, 8), "run8": run, "discs60": discs}
}

// TestScoreMatchesCellByCell: the pass's accumulators are byte for byte
// those of adding every valid cell of each member one at a time, in row
// order, with metrics.Accumulator.Add (the reference), on families of
// nested, overlapping, disjoint and identical members, blocks that do not
// divide the grid, 1 and 2 workers and a row range. The values have no
// data (the no-data value, NaN, both infinities), -0, ties at layout
// values and a range that grows from block to block, so that every path of
// the scoring (and every widening of the histograms) is taken. The pass's
// statistics and valid cells are checked the same way.
func TestScoreMatchesCellByCell(t *testing.T) {
	// Cell areas constant along rows (latitude-longitude, equal-area),
	// varying along them (Mercator: area factors per block of cells), and
	// constant but for the cells a world map's outline cuts (Mollweide
	// 50 km, the whole map and beyond: its rows' shortcut of one weight
	// must not take those).
	for _, grid := range []struct {
		crs string
		gt  [6]float64
	}{
		{"EPSG:4326", [6]float64{-20, 0.05, 0, 70, 0, -0.05}},
		{"EPSG:6933", [6]float64{-2e6, 5000, 0, 6e6, 0, -5000}},
		{"EPSG:3857", [6]float64{-2e6, 5000, 0, 9e6, 0, -5000}},
		{"ESRI:54009", [6]float64{-17500000, 50000, 0, 11500000, 0, -50000}},
	} {
		t.Run(grid.crs, func(t *testing.T) { scoreMatchesCellByCell(t, grid.crs, grid.gt) })
	}
}

func scoreMatchesCellByCell(t *testing.T, crs string, gt [6]float64) {
	w, h := 700, 460
	g, err := extent.NewGrid(w, h, gt, crs)
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	vals := make([]float32, w*h)
	for r := 0; r < h; r++ {
		for c := 0; c < w; c++ {
			v := float32(math.Round(1e4*(0.3*math.Sin(float64(c)/41)*math.Cos(float64(r)/29)+float64(r*c)/float64(w*h))) / 1e4)
			// A plateau, and a floor with a few cells below it (the
			// pass's runs and smallest values), holed by the cells below.
			switch {
			case r >= 150 && r < 200 && c >= 200 && c < 500:
				v = 0.25
			case (r*w+c)%5003 == 0:
				v = -3.5
			case r >= 300 && r < 330 && c >= 10:
				v = -3
			}
			switch {
			case (r*w+c)%89 == 0:
				v = -9999
			case (r*w+c)%61 == 0:
				v = float32(math.Copysign(0, -1))
			case (r*w+c)%113 == 0:
				v = float32(math.NaN())
			case (r*w+c)%127 == 0:
				v = float32(math.Inf(1 - 2*(r%2)))
			}
			vals[r*w+c] = v
		}
	}
	raster := &Raster{nodata: -9999, hasNodata: true, scale: 1}
	p := plan{width: w, height: h, blockW: 64, blockH: 48, decode: raster.decode,
		open: func() (Source, error) { return memSource{w: w, vals: vals}, nil }}
	var lv []float64
	for i := 0; i < len(vals); i += 997 {
		if v := float64(vals[i]); v != -9999 && !math.IsNaN(v) && !math.IsInf(v, 0) {
			lv = append(lv, float64(v))
		}
	}
	layout, err := metrics.NewLayout(append(lv, 0, 0.1, 0.5), 64)
	if err != nil {
		t.Fatal(err)
	}
	fams := benchFamilies(g)
	fams["nested"] = nestedFamily(g, 4, true)
	// The weights the pass adds, row by row.
	rowWeights := make([][]int64, h)
	cut := 0
	for r := range rowWeights {
		_, rowWeights[r] = RowWeights(g, r, 0, w, nil, nil)
		if !g.RowCellsEqual(r, 0, w) {
			cut++
		}
	}
	if crs == "ESRI:54009" && cut < 100 {
		t.Fatalf("%d rows with cells cut by the map's outline: the test does not see them", cut)
	}
	for _, name := range []string{"full8", "run8", "discs60", "nested"} {
		fam := fams[name]
		for _, rr := range []*RowRange{nil, {First: 100, End: 333}} {
			first, end := 0, h
			if rr != nil {
				first, end = rr.First, rr.End
			}
			// The statistics and the valid cells over the cells of any member.
			var wantSt Stats
			distinct := map[float64]bool{}
			nValid := 0
			wantIn := make([]bool, g.Cells())
			for r := first; r < end; r++ {
				weights := rowWeights[r]
				for c := 0; c < w; c++ {
					v := float64(vals[r*w+c])
					in := false
					for k := range fam.Members {
						in = in || fam.Has(k, r*w+c)
					}
					if !in || v == -9999 || math.IsNaN(v) || math.IsInf(v, 0) {
						continue
					}
					wantSt.AnyValid = true
					wantIn[r*w+c] = true
					wantSt.Merge(Stats{Min: v + 0, Max: v + 0, FloorArea: weights[c], Area: weights[c], AnyValid: true})
					distinct[v+0] = true
					nValid++
				}
			}
			// The smallest values with their areas, and the runs of at
			// least metrics.RunCells equal valid cells in a block's row,
			// cut where the block's cells leave every member or, in a
			// row of cells of unequal areas, change members.
			for r := first; r < end; r++ {
				weights := rowWeights[r]
				for c := 0; c < w; c++ {
					if v := float64(vals[r*w+c]); wantIn[r*w+c] {
						wantSt.Lowest.Add(v, weights[c], metrics.LowestValues)
					}
				}
				for bx := 0; bx < w; bx += p.blockW {
					bx1 := min(w, bx+p.blockW)
					equal := g.RowCellsEqual(r, bx, bx1)
					key := func(c int) string {
						var b []byte
						for k := range fam.Members {
							if fam.Has(k, r*w+c) {
								b = append(b, '1')
							} else {
								b = append(b, '0')
							}
						}
						return string(b)
					}
					for c := bx; c < bx1; {
						e := c + 1
						in := key(c) != strings.Repeat("0", len(fam.Members))
						for e < bx1 && vals[r*w+e] == vals[r*w+c] && (key(e) == key(c) || equal && in && key(e) != strings.Repeat("0", len(fam.Members))) {
							e++
						}
						if v := float64(vals[r*w+c]); in && wantIn[r*w+c] && e-c >= metrics.RunCells {
							var a int64
							for x := c; x < e; x++ {
								a += weights[x]
							}
							wantSt.Runs.Add(v, a, metrics.MaxRunValues)
						}
						c = e
					}
				}
			}
			if end-first > 300 && (len(wantSt.Runs.Masses) < 2 || wantSt.Lowest.Masses[1].Value != -3) {
				t.Fatalf("family %s: the reference's runs %v and smallest values %v miss the plateau or the floor", name, wantSt.Runs.Masses, wantSt.Lowest.Masses)
			}
			// The value set: every distinct value (-0 as +0), ascending,
			// or none past metrics.MaxSetValues or with fewer than two
			// cells per value.
			wantVals := slices.Sorted(maps.Keys(distinct))
			wantFew := len(wantVals) <= metrics.MaxSetValues && 2*len(wantVals) <= nValid
			if !wantFew {
				wantVals = nil
			}
			want := make([][]byte, len(fam.Members))
			for k := range fam.Members {
				a := layout.NewAccumulator()
				for r := first; r < end; r++ {
					weights := rowWeights[r]
					for c := 0; c < w; c++ {
						v := vals[r*w+c]
						if v != -9999 && !math.IsNaN(float64(v)) && !math.IsInf(float64(v), 0) && fam.Has(k, r*w+c) {
							a.Add(float64(v), weights[c])
						}
					}
				}
				want[k] = metrics.EncodeAccumulator(a)
			}
			for _, workers := range []int{1, 2} {
				valid := extent.NewValid(g.Width, g.Height)
				accs, st, err := score(p, g, fam, fam.Groups(), layout, Options{Workers: workers, RowRange: rr, Valid: valid})
				if err != nil {
					t.Fatal(err)
				}
				if !bytes.Equal(bitsOf(valid), bitsOf(extent.NewValidFunc(g.Width, g.Height, func(i int) bool { return wantIn[i] }))) {
					t.Errorf("family %s, rows %v, %d workers: valid cells differ", name, rr, workers)
				}
				gotVals, few := st.Values.Values()
				if few != wantFew || !slices.Equal(gotVals, wantVals) {
					t.Errorf("family %s, rows %v, %d workers: value set %v (kept %v), want %v", name, rr, workers, gotVals, few, wantVals)
				}
				st.Values = metrics.ValueSet{}
				if !reflect.DeepEqual(st.Lowest, wantSt.Lowest) {
					t.Errorf("family %s, rows %v, %d workers: smallest values %v, want %v", name, rr, workers, st.Lowest, wantSt.Lowest)
				}
				if !reflect.DeepEqual(st.Runs, wantSt.Runs) {
					t.Errorf("family %s, rows %v, %d workers: runs %v, want %v", name, rr, workers, st.Runs, wantSt.Runs)
				}
				if !reflect.DeepEqual(st, wantSt) {
					st.Lowest, st.Runs = metrics.MassList{}, metrics.MassList{}
					want := wantSt
					want.Lowest, want.Runs = metrics.MassList{}, metrics.MassList{}
					t.Errorf("family %s, rows %v, %d workers: statistics %+v, want %+v", name, rr, workers, st, want)
				}
				for k, a := range accs {
					if !bytes.Equal(metrics.EncodeAccumulator(a), want[k]) {
						t.Errorf("family %s, rows %v, %d workers: member %d (%d cells) differs from adding its cells one by one", name, rr, workers, k, a.Cells())
					}
				}
			}
		}
	}
}
