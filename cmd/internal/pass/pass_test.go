package pass

import (
	"bytes"
	"fmt"
	"math"
	"path/filepath"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/extent"
	"areasweep/extent/vocab"
	"areasweep/metrics"
)

// writeTestRaster writes a w x h Float32 GeoTIFF on a 0.01-degree grid with
// a smooth ramp of values and no-data on every 97th cell.
func writeTestRaster(tb testing.TB, path string, w, h int) {
	writeGridRaster(tb, path, w, h, false, func(r, c int) float32 {
		if (r*w+c)%97 == 0 {
			return -9999
		}
		return float32(math.Round(1000*(0.5+0.5*math.Sin(float64(c)/37)*math.Cos(float64(r)/53))) / 1000)
	}, "TILED=YES", "BLOCKXSIZE=256", "BLOCKYSIZE=256")
}

// createGridRaster creates a w x h GeoTIFF of type typ with the given
// creation options on the tests' grid (EPSG:4326, 0.01-degree cells from
// 0 E, 50 N, nodata -9999) and returns it and its band for writing; the
// caller closes it.
func createGridRaster(tb testing.TB, path string, w, h int, typ godal.DataType, opts ...string) (*godal.Dataset, godal.Band) {
	tb.Helper()
	extent.Register()
	ds, err := godal.Create(godal.GTiff, path, 1, typ, w, h, godal.CreationOption(opts...))
	if err != nil {
		tb.Fatal(err)
	}
	ds.SetGeoTransform([6]float64{0, 0.01, 0, 50, 0, -0.01})
	sr, _ := godal.NewSpatialRefFromEPSG(4326)
	ds.SetSpatialRef(sr)
	b := ds.Bands()[0]
	b.SetNoData(-9999)
	return ds, b
}

// writeGridRaster writes a w x h Float32 GeoTIFF (EPSG:4326, 0.01-degree
// cells from 0 E, 50 N, nodata -9999) with value(r, c) in each cell and the
// given creation options, row by row, and builds overviews when asked.
func writeGridRaster(tb testing.TB, path string, w, h int, overviews bool, value func(r, c int) float32, opts ...string) {
	tb.Helper()
	ds, b := createGridRaster(tb, path, w, h, godal.Float32, opts...)
	row := make([]float32, w)
	for r := 0; r < h; r++ {
		for c := range row {
			row[c] = value(r, c)
		}
		if err := b.Write(0, r, row, w, 1); err != nil {
			tb.Fatal(err)
		}
	}
	if overviews {
		if err := ds.BuildOverviews(godal.Levels(2, 4, 8)); err != nil {
			tb.Fatal(err)
		}
	}
	if err := ds.Close(); err != nil {
		tb.Fatal(err)
	}
}

// openTestRaster writes a w x h test raster (writeTestRaster) in a temporary
// directory and opens its grid and band.
func openTestRaster(tb testing.TB, w, h int) (*extent.Grid, *Raster) {
	tb.Helper()
	path := filepath.Join(tb.TempDir(), "m.tif")
	writeTestRaster(tb, path, w, h)
	return openPath(tb, path)
}

// openPath opens the grid and the band of the raster at path.
func openPath(tb testing.TB, path string) (*extent.Grid, *Raster) {
	tb.Helper()
	g, err := extent.OpenGrid(path)
	if err != nil {
		tb.Fatal(err)
	}
	r, err := Open(path)
	if err != nil {
		tb.Fatal(err)
	}
	return g, r
}

// fullFamily makes a family of n members each holding every valid cell.
func fullFamily(g *extent.Grid, n int) *extent.Family {
	var members []extent.Member
	for k := 0; k < n; k++ {
		members = append(members, extent.Member{ID: fmt.Sprint(k), Status: vocab.StatusOK})
	}
	return extent.NewFamilyFromRuns(g, members, func(k, row int) []int32 { return []int32{0, int32(g.Width)} })
}

// TestScoreWorkersAgree: the pass gives identical accumulators (and so
// identical scores) for 1 and 3 workers, and counts every valid cell once
// (by construction: 1 in 97 cells is no-data).
func TestScoreWorkersAgree(t *testing.T) {
	w, h := 300, 200
	g, r := openTestRaster(t, w, h)
	defer r.Close()
	fam := fullFamily(g, 3)
	layout, err := metrics.NewLayout([]float64{0.2, 0.5, 0.7, 0.9}, 256)
	if err != nil {
		t.Fatal(err)
	}
	var scores []metrics.Scores
	var previews [][]float64
	var encoded [][]byte
	for _, workers := range []int{1, 3} {
		valid := extent.NewValid(g.Width, g.Height)
		pv := NewPreview(g, 50)
		accs, st, err := r.Score(g, fam, layout, Options{Workers: workers, Valid: valid, Preview: pv})
		if err != nil {
			t.Fatal(err)
		}
		n := 0
		for i := 0; i < g.Cells(); i++ {
			if valid.Has(i) != (i%97 != 0) {
				t.Fatalf("workers=%d: cell %d valid=%v", workers, i, valid.Has(i))
			}
			if valid.Has(i) {
				n++
			}
		}
		if int64(n) != accs[0].Cells() {
			t.Errorf("workers=%d: %d valid bits, %d cells scored", workers, n, accs[0].Cells())
		}
		previews = append(previews, pv.Values)
		wantCells := int64(w*h - (w*h+96)/97)
		if accs[0].Cells() != wantCells {
			t.Errorf("workers=%d: %d cells, want %d", workers, accs[0].Cells(), wantCells)
		}
		if st.Area != accs[2].Area() {
			t.Errorf("workers=%d: stats area %d, accumulator %d", workers, st.Area, accs[2].Area())
		}
		sc, err := metrics.Score(accs[1], []float64{0.7, 0.9}, []float64{0.5, 0.9, 0.2}, metrics.Settings{Iterations: 20, Seed: 3})
		if err != nil {
			t.Fatal(err)
		}
		scores = append(scores, sc)
		var enc []byte
		for _, a := range accs {
			enc = append(enc, metrics.EncodeAccumulator(a)...)
		}
		encoded = append(encoded, enc)
		if !st.AnyValid {
			t.Errorf("workers=%d: AnyValid false", workers)
		}
	}
	if fmt.Sprint(scores[0]) != fmt.Sprint(scores[1]) {
		t.Error("scores differ between 1 and 3 workers")
	}
	if !bytes.Equal(encoded[0], encoded[1]) {
		t.Error("accumulators (fine histograms included) differ between 1 and 3 workers")
	}
	if fmt.Sprint(previews[0]) != fmt.Sprint(previews[1]) {
		t.Error("previews differ between 1 and 3 workers")
	}
}

// nestedFamily makes n members on discs of growing radius around the
// grid's centre (member k: cells within 20*(k+1) cells), chained smallest
// first when chained is true, plus one band of rows as a member of its
// own.
func nestedFamily(g *extent.Grid, n int, chained bool) *extent.Family {
	var members []extent.Member
	for k := 0; k <= n; k++ {
		members = append(members, extent.Member{ID: fmt.Sprint(k), Status: vocab.StatusOK})
	}
	cx, cy := float64(g.Width)/2, float64(g.Height)/2
	f := extent.NewFamilyFromRuns(g, members, func(k, row int) []int32 {
		if k == n {
			if row%50 < 20 {
				return []int32{int32(g.Width / 3), int32(g.Width)}
			}
			return nil
		}
		r := 20 * float64(k+1)
		dy := float64(row) + 0.5 - cy
		if math.Abs(dy) >= r {
			return nil
		}
		dx := math.Sqrt(r*r - dy*dy)
		return []int32{int32(math.Ceil(cx - dx)), int32(math.Ceil(cx + dx))}
	})
	if chained {
		for k := 0; k < n; k++ {
			f.Chains["discs"] = append(f.Chains["discs"], k)
		}
	}
	return f
}

// TestScoreGroups: adding a cell only to the smallest member of a chain
// and merging outwards gives the same accumulators as adding it to every
// member (the same family without a chain), for 1 and 2 workers, and each
// member counts exactly its valid cells (brute force over the cells; 1 in
// 97 cells is no-data by construction).
func TestScoreGroups(t *testing.T) {
	g, r := openTestRaster(t, 300, 200)
	defer r.Close()
	layout, err := metrics.NewLayout([]float64{0.2, 0.5, 0.7, 0.9}, 256)
	if err != nil {
		t.Fatal(err)
	}
	var ref []string
	for _, tc := range []struct {
		chained bool
		workers int
	}{{false, 1}, {true, 1}, {true, 2}} {
		fam := nestedFamily(g, 4, tc.chained)
		if got := len(fam.Groups()); tc.chained && got != 2 || !tc.chained && got != 5 {
			t.Fatalf("chained=%v: %d groups", tc.chained, got)
		}
		accs, _, err := r.Score(g, fam, layout, Options{Workers: tc.workers})
		if err != nil {
			t.Fatal(err)
		}
		var got []string
		for k, a := range accs {
			want := int64(0)
			for i := 0; i < g.Cells(); i++ {
				if i%97 != 0 && fam.Has(k, i) {
					want++
				}
			}
			if a.Cells() != want {
				t.Errorf("chained=%v workers=%d member %d: %d cells, want %d", tc.chained, tc.workers, k, a.Cells(), want)
			}
			sc, err := metrics.Score(a, []float64{0.7, 0.9}, []float64{0.5, 0.9, 0.2}, metrics.Settings{Iterations: 10, Seed: 1})
			if err != nil {
				t.Fatal(err)
			}
			got = append(got, fmt.Sprint(a.Area(), a.Min(), a.Max(), sc, metrics.EncodeAccumulator(a)))
		}
		if ref == nil {
			ref = got
		} else if fmt.Sprint(got) != fmt.Sprint(ref) {
			t.Errorf("chained=%v workers=%d: accumulators differ from adding every member", tc.chained, tc.workers)
		}
	}
}

// BenchmarkScorePass measures the whole streaming pass (GDAL block reads,
// cell areas, locating each value and updating every extent) on a 2000 x
// 2000 raster: cell-extent updates per second.
func BenchmarkScorePass(b *testing.B) {
	w, h := 2000, 2000
	g, r := openTestRaster(b, w, h)
	defer r.Close()
	vals := make([]float64, 1000)
	for i := range vals {
		vals[i] = float64(i) / 1000
	}
	layout, err := metrics.NewLayout(vals, 4096)
	if err != nil {
		b.Fatal(err)
	}
	for _, n := range []int{1, 8, 64} {
		fam := fullFamily(g, n)
		for _, workers := range []int{1, 2} {
			b.Run(fmt.Sprintf("extents=%d,workers=%d", n, workers), func(b *testing.B) {
				b.ReportAllocs()
				for i := 0; i < b.N; i++ {
					if _, _, err := r.Score(g, fam, layout, Options{Workers: workers}); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(w*h*n)*float64(b.N)/b.Elapsed().Seconds(), "updates/s")
			})
		}
	}
	// Nested discs in one chain: a cell costs one update per chain, so the
	// time should hardly grow with the number of members.
	for _, n := range []int{4, 16, 60} {
		fam := nestedFamily(g, n, true)
		for _, workers := range []int{2} {
			b.Run(fmt.Sprintf("nested=%d,workers=%d", n, workers), func(b *testing.B) {
				b.ReportAllocs()
				for i := 0; i < b.N; i++ {
					if _, _, err := r.Score(g, fam, layout, Options{Workers: workers}); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(w*h*n)*float64(b.N)/b.Elapsed().Seconds(), "updates/s")
			})
		}
	}
}

// TestScaleOffset: a band stored as integers with a declared scale and
// offset is scored on its model values (value = stored*scale + offset), and
// its no-data value is honoured before scaling (by construction).
func TestScaleOffset(t *testing.T) {
	extent.Register()
	path := filepath.Join(t.TempDir(), "scaled.tif")
	ds, err := godal.Create(godal.GTiff, path, 1, godal.Int16, 4, 1)
	if err != nil {
		t.Fatal(err)
	}
	ds.SetGeoTransform([6]float64{0, 1, 0, 1, 0, -1})
	sr, _ := godal.NewSpatialRefFromEPSG(4326)
	ds.SetSpatialRef(sr)
	b := ds.Bands()[0]
	b.SetNoData(-1)
	if err := b.SetScaleOffset(0.001, 0.5); err != nil {
		t.Fatal(err)
	}
	b.Write(0, 0, []int16{0, 250, -1, 500}, 4, 1)
	ds.Close()
	r, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	g, err := extent.OpenGrid(path)
	if err != nil {
		t.Fatal(err)
	}
	vals, ok, err := r.Sample(g, []int{0, 1, 2, 3})
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{0.5, 0.75, 0, 1.0}
	for i := range want {
		if ok[i] != (i != 2) || ok[i] && math.Abs(vals[i]-want[i]) > 1e-12 {
			t.Errorf("cell %d: value %v valid %v, want %v valid %v", i, vals[i], ok[i], want[i], i != 2)
		}
	}
}

// TestAnyValid: a pass tells a raster without any cell with data (every
// cell the nodata value) from one whose data lie outside every extent.
func TestAnyValid(t *testing.T) {
	dir := t.TempDir()
	for _, tc := range []struct {
		name string
		data bool // a column of cells with data, outside the extent
	}{{"all no data", false}, {"data outside the extents", true}} {
		path := filepath.Join(dir, tc.name+".tif")
		writeGridRaster(t, path, 300, 200, false, func(r, c int) float32 {
			if tc.data && c == 299 {
				return 0.5
			}
			return -9999
		}, "TILED=YES", "BLOCKXSIZE=64", "BLOCKYSIZE=64")
		g, r := openPath(t, path)
		fam := extent.NewFamilyFromRuns(g, []extent.Member{{ID: "left", Status: vocab.StatusOK}}, func(k, row int) []int32 { return []int32{0, 100} })
		layout, _ := metrics.NewLayout([]float64{0.5}, 64)
		_, st, err := r.Score(g, fam, layout, Options{Workers: 2})
		if err != nil {
			t.Fatal(err)
		}
		if st.AnyValid != tc.data || st.Area != 0 {
			t.Errorf("%s: AnyValid %v, area %d; want %v, 0", tc.name, st.AnyValid, st.Area, tc.data)
		}
		r.Close()
		g.Close()
	}
}
