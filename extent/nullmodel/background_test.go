package nullmodel

import (
	"bytes"
	"fmt"
	"math"
	"math/big"
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"
)

// TestBackgroundBruteForce checks Mean, Median and SortingBias against a
// direct computation written here (sums in float64, an exact weighted
// median from the sorted cells), on random distances and weights split over
// three extents and added row by row in two different orders, and as
// prepared rows (Row, Tally) run by run.
func TestBackgroundBruteForce(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 22))
	n := 5000
	dist := make([]float64, n)
	mask := make([]uint64, n)
	wts := make([]int64, n)
	for i := range n {
		dist[i] = math.Exp(1 + 12*r.Float64()) // 2.7 m to 440 km
		mask[i] = uint64(r.IntN(8))            // extents 0..2, some cells in none
		wts[i] = 1e9 + r.Int64N(4e9)
	}
	dist[7] = math.NaN()
	var fwd, rev Background
	for i := 0; i < n; i += 100 {
		addMasked(&fwd, dist[i:i+100], mask[i:i+100], wts[i:i+100])
	}
	for i := n - 100; i >= 0; i -= 100 {
		addMasked(&rev, dist[i:i+100], mask[i:i+100], wts[i:i+100])
	}
	// The same cells as prepared rows added run by run through tallies.
	var rows Background
	for i := 0; i < n; i += 100 {
		var r Row
		r.Set(dist[i:i+100], wts[i:i+100])
		tl := rows.Tally()
		for k := range 3 {
			for a := 0; a < 100; {
				if mask[i+a]>>uint(k)&1 == 0 {
					a++
					continue
				}
				z := a
				for z < 100 && mask[i+z]>>uint(k)&1 != 0 {
					z++
				}
				tl.Add(k, &r, a, z)
				a = z
			}
		}
		tl.Done()
	}
	test := []float64{900, 1500, 12000, 40000}
	for k := range 3 {
		if fwd.Mean(k) != rev.Mean(k) || fwd.Median(k) != rev.Median(k) {
			t.Errorf("extent %d: row order changes the result", k)
		}
		if rows.Mean(k) != fwd.Mean(k) || rows.Median(k) != fwd.Median(k) || rows.Area(k) != fwd.Area(k) {
			t.Errorf("extent %d: rows through tallies give mean %v median %v, Add %v and %v", k, rows.Mean(k), rows.Median(k), fwd.Mean(k), fwd.Median(k))
		}
		type cw struct {
			d float64
			w int64
		}
		var cells []cw
		sw, swd := 0.0, 0.0
		for i := range n {
			if mask[i]&(1<<uint(k)) == 0 || math.IsNaN(dist[i]) {
				continue
			}
			cells = append(cells, cw{dist[i], wts[i]})
			sw += float64(wts[i])
			swd += float64(wts[i]) * dist[i]
		}
		mean := swd / sw
		if got := fwd.Mean(k); math.Abs(got-mean) > 1e-9*mean+5e-4 {
			t.Errorf("extent %d: mean %.6f, direct %.6f", k, got, mean)
		}
		slices.SortFunc(cells, func(a, b cw) int { return cmpF(a.d, b.d) })
		cum, med := 0.0, 0.0
		for _, c := range cells {
			cum += float64(c.w)
			if cum >= sw/2 {
				med = c.d
				break
			}
		}
		if got := fwd.Median(k); math.Abs(got-med) > 2e-3*med {
			t.Errorf("extent %d: median %.3f, direct %.3f (allowed 0.2%%: one bin either side)", k, got, med)
		}
		sb := fwd.SortingBias(k, test)
		wantMean := (900 + 1500 + 12000 + 40000) / 4.0 / fwd.Mean(k)
		wantMed := (1500 + 12000) / 2.0 / fwd.Median(k)
		if !sb.Defined || math.Abs(sb.RatioMean-wantMean) > 1e-15 || math.Abs(sb.RatioMedian-wantMed) > 1e-15 {
			t.Errorf("extent %d: sorting bias %+v, want ratios %v and %v", k, sb, wantMean, wantMed)
		}
	}
	if sb := fwd.SortingBias(5, test); sb.Defined || sb.Reason == "" {
		t.Errorf("extent with no cell: %+v, want undefined with a reason", sb)
	}
	if sb := fwd.SortingBias(0, nil); sb.Defined || sb.Reason == "" {
		t.Errorf("no test point: %+v, want undefined with a reason", sb)
	}
}

func cmpF(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// addMasked adds each cell to every extent k whose bit is set in its
// membership word mask[i], one Add per extent.
func addMasked(b *Background, dist []float64, mask []uint64, wts []int64) {
	for k := range 64 {
		var d []float64
		var w []int64
		for i, m := range mask {
			if m>>uint(k)&1 != 0 {
				d, w = append(d, dist[i]), append(w, wts[i])
			}
		}
		if len(d) > 0 {
			b.Add(k, d, w)
		}
	}
}

// TestDistBin checks the histogram's bins: each distance lies in its bin,
// the bins are contiguous and at most 1/1024 wide (relative), on random
// distances from 1 mm to 1e8 m and on the bin edges themselves.
func TestDistBin(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	check := func(d float64) {
		j := distBin(d)
		lo, hi := binEdges(j)
		if !(lo <= d && d < hi) {
			t.Fatalf("distance %v in bin %d = [%v, %v)", d, j, lo, hi)
		}
		if j > 0 && (hi-lo)/lo > 1.0/1024 {
			t.Fatalf("bin %d = [%v, %v) is %.6f wide", j, lo, hi, (hi-lo)/lo)
		}
		if _, prevHi := binEdges(j - 1); j > 0 && prevHi != lo {
			t.Fatalf("bins %d and %d leave a gap: %v, %v", j-1, j, prevHi, lo)
		}
	}
	for range 100000 {
		check(math.Exp(-7 + 25*r.Float64()))
	}
	for j := 1; j < histLen-1; j += 97 {
		lo, _ := binEdges(j)
		check(lo)
		check(math.Nextafter(lo, 0))
	}
	check(0)
	check(2.0e7)
}

// TestTallyAddAll: rows added with AddAll to sets of extents (more
// distinct sets than a partial sum keeps as classes, so both ways are
// taken, and sets in different orders, of up to 10 extents; half the rows
// in a second partial sum, so that classes of both are merged) encode
// byte for byte as the same rows added extent by extent with Add; half
// the rows have one weight (the walk of such rows has loops of its own).
func TestTallyAddAll(t *testing.T) {
	r := rand.New(rand.NewPCG(31, 32))
	var all, each Background
	sets := 0
	seen := map[string]bool{}
	for range 400 {
		n := 1 + r.IntN(60)
		d, w := make([]float64, n), make([]int64, n)
		one := r.IntN(2) == 0
		for i := range d {
			d[i], w[i] = math.Exp(1+12*r.Float64()), 1+r.Int64N(1e9)
			if one {
				w[i] = w[0]
			}
			if r.IntN(20) == 0 {
				d[i] = math.NaN()
			}
		}
		var row Row
		row.Set(d, w)
		var ks []int
		for _, k := range r.Perm(12)[:r.IntN(11)] {
			ks = append(ks, k)
		}
		if key := fmt.Sprint(ks); !seen[key] && len(ks) > 1 {
			seen[key] = true
			sets++
		}
		lo := r.IntN(n)
		hi := lo + r.IntN(n-lo+1)
		// Half the rows go to a second partial sum (the first one held),
		// so that the same classes are merged from both.
		var hold Tally
		held := r.IntN(2) == 0
		if held {
			hold = all.Tally()
		}
		ta, te := all.Tally(), each.Tally()
		ta.AddAll(ks, &row, lo, hi)
		for _, k := range ks {
			te.Add(k, &row, lo, hi)
		}
		ta.Done()
		te.Done()
		if held {
			hold.Done()
		}
	}
	if sets <= bgClassCap {
		t.Fatalf("%d sets of extents: the test would not fill the classes", sets)
	}
	if !bytes.Equal(EncodeBackground(&all), EncodeBackground(&each)) {
		t.Error("AddAll encodes differently from Add extent by extent")
	}
}

// TestTallyClassTaken: the sums of a class whose extents have none of
// their own in a partial sum (one extent takes the class's when the
// partial sums are merged), in two partial sums and with rows added to
// one of its extents alone, then nested, encode byte for byte as the
// same rows added extent by extent.
func TestTallyClassTaken(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	var all, each Background
	all.Nest([][]int{{1, 2, 3}})
	each.Nest([][]int{{1, 2, 3}})
	for q := range 40 {
		n := 1 + r.IntN(30)
		d, w := make([]float64, n), make([]int64, n)
		for i := range d {
			d[i], w[i] = math.Exp(1+12*r.Float64()), 1+r.Int64N(1e9)
		}
		var row Row
		row.Set(d, w)
		ks := []int{1, 2, 3}
		if q%5 == 4 {
			ks = []int{2}
		}
		var hold Tally
		if q%2 == 1 {
			hold = all.Tally() // the rows of odd q go to a second partial sum
		}
		ta, te := all.Tally(), each.Tally()
		ta.AddAll(ks, &row, 0, n)
		for _, k := range ks {
			te.Add(k, &row, 0, n)
		}
		ta.Done()
		te.Done()
		if q%2 == 1 {
			hold.Done()
		}
	}
	if !bytes.Equal(EncodeBackground(&all), EncodeBackground(&each)) {
		t.Error("a class's sums taken by one of its extents encode differently from Add extent by extent")
	}
	for k := 1; k <= 3; k++ {
		if all.Mean(k) != each.Mean(k) || all.Median(k) != each.Median(k) || all.Area(k) != each.Area(k) {
			t.Errorf("extent %d: mean %v median %v area %d, extent by extent %v %v %d", k,
				all.Mean(k), all.Median(k), all.Area(k), each.Mean(k), each.Median(k), each.Area(k))
		}
	}
}

// TestRoundMM checks roundMM against math.Round(d*1000) on halves,
// neighbours of halves, large and random distances.
func TestRoundMM(t *testing.T) {
	ds := []float64{0, 1e-4, 5e-4, 0.0005, 0.0015, 2.5e-3, 1, 1.0005, 1234.5675, 2e7, 4.5e12, 1 << 52 / 1000.0, 1e300}
	for _, d := range []float64{0.0005, 0.0015, 12.3455, 1e9 + 0.0005} {
		ds = append(ds, math.Nextafter(d, 0), math.Nextafter(d, 1e308))
	}
	r := rand.New(rand.NewPCG(1, 2))
	for range 100000 {
		ds = append(ds, r.Float64()*2e7, float64(r.IntN(1<<30))/1000+0.0005)
	}
	for _, d := range ds {
		if got, want := roundMM(d), uint64(math.Round(d*1000)); got != want {
			t.Fatalf("roundMM(%v) = %d, want %d", d, got, want)
		}
	}
}

// TestRowOneWeight checks the sums of rows whose cells share one weight
// (Row's 64-bit millimetre sums, multiplied by the weight per run) against
// the 128-bit sum of weight x millimetres computed cell by cell with
// math/big: random distances from 2.7 m to 440 km with a NaN, weights up
// to 2^40 (so that the sums need both words), whole rows and runs of them,
// and a row holding a distance of 2^28 m, which takes the 128-bit prefix
// sums (its millimetres could pass 2^64 in a long row).
func TestRowOneWeight(t *testing.T) {
	r := rand.New(rand.NewPCG(31, 32))
	var bg Background
	want := [2]*big.Int{new(big.Int), new(big.Int)}
	area := [2]int64{}
	for row := range 40 {
		n := 300
		dist := make([]float64, n)
		wts := make([]int64, n)
		w := r.Int64N(1 << 40)
		for i := range n {
			dist[i], wts[i] = math.Exp(1+12*r.Float64()), w
		}
		dist[row%n] = math.NaN()
		if row == 7 {
			dist[100] = 1 << 28
		}
		var rw Row
		rw.Set(dist, wts)
		if rw.constW != (row != 7) {
			t.Fatalf("row %d: one-weight sums %v", row, rw.constW)
		}
		a, z := r.IntN(n/2), n/2+r.IntN(n/2)
		tl := bg.Tally()
		tl.Add(0, &rw, 0, n)
		tl.Add(1, &rw, a, z)
		tl.Done()
		for k, run := range [2][2]int{{0, n}, {a, z}} {
			for _, d := range dist[run[0]:run[1]] {
				if math.IsNaN(d) {
					continue
				}
				p := new(big.Int).SetUint64(roundMM(d))
				want[k].Add(want[k], p.Mul(p, big.NewInt(w)))
				area[k] += w
			}
		}
	}
	for k := range 2 {
		e := bg.get(k)
		got := new(big.Int).Lsh(new(big.Int).SetUint64(e.sumHi), 64)
		got.Add(got, new(big.Int).SetUint64(e.sumLo))
		if got.Cmp(want[k]) != 0 || e.area != area[k] {
			t.Errorf("extent %d: sum %v area %d, cell by cell %v and %d", k, got, e.area, want[k], area[k])
		}
	}
}

// TestRowSetValuesEqual checks that SetValuesEqual, which takes the
// weights' equality on trust, prepares the same row as SetValues, which
// compares them: rows of one weight (zero among them) with NaN cells,
// and rows with distances beyond 2^27 m (which need 128-bit sums).
func TestRowSetValuesEqual(t *testing.T) {
	r := rand.New(rand.NewPCG(41, 42))
	for trial := range 300 {
		n := r.IntN(70)
		vals, w := make([]float64, n), make([]int64, n)
		w0 := r.Int64N(1e12)
		if trial%10 == 0 {
			w0 = 0
		}
		for i := range vals {
			vals[i], w[i] = 0-math.Exp(12*r.Float64()), w0
			if trial%7 == 0 && r.IntN(5) == 0 {
				vals[i] = -2e8 * r.Float64()
			}
			if r.IntN(15) == 0 {
				vals[i] = math.NaN()
			}
		}
		var a, b Row
		a.SetValues(vals, w)
		b.SetValuesEqual(vals, w)
		if !reflect.DeepEqual(a, b) {
			t.Fatalf("trial %d: SetValuesEqual %+v, SetValues %+v", trial, b, a)
		}
	}
}

// TestTallyAddValues: runs added with AddValues (minus the distances, one
// weight or one per cell, NaN cells, a few distances beyond 2^27 m whose
// products take 128 bits, sets of up to 10 extents in any order, more
// distinct sets than a partial sum keeps as classes, half the runs in a
// second partial sum) encode byte for byte as the same runs prepared as
// Rows and added extent by extent with Add.
func TestTallyAddValues(t *testing.T) {
	r := rand.New(rand.NewPCG(41, 42))
	var vals, each Background
	sets := map[string]bool{}
	far := 0
	for range 600 {
		n := 1 + r.IntN(300)
		d, v, w := make([]float64, n), make([]float64, n), make([]int64, n)
		one := r.IntN(2) == 0
		for i := range d {
			d[i], w[i] = math.Exp(-2+18*r.Float64()), 1+r.Int64N(1e12)
			switch r.IntN(40) {
			case 0:
				d[i] = math.NaN()
			case 1:
				d[i] = 0
			case 2:
				d[i] = 0x1p27 * (1 + 1e5*r.Float64()) // beyond the 64-bit sum
				far++
			case 3:
				d[i] = float64(2*r.IntN(1e6)+1) / 16 // d*1000 a tie
			}
			v[i] = 0 - d[i]
			if one {
				w[i] = w[0]
			}
		}
		var ks []int
		var ks32 []int32
		for _, k := range r.Perm(12)[:r.IntN(11)] {
			ks, ks32 = append(ks, k), append(ks32, int32(k))
		}
		if len(ks) > 1 {
			sets[fmt.Sprint(ks)] = true
		}
		var hold Tally
		held := r.IntN(2) == 0
		if held {
			hold = vals.Tally()
		}
		ta, te := vals.Tally(), each.Tally()
		if one {
			ta.AddValues(ks32, v, nil, w[0])
		} else {
			ta.AddValues(ks32, v, w, -1)
		}
		var row Row
		row.Set(d, w)
		for _, k := range ks {
			te.Add(k, &row, 0, n)
		}
		ta.Done()
		te.Done()
		if held {
			hold.Done()
		}
	}
	if len(sets) <= bgClassCap || far == 0 {
		t.Fatalf("%d sets of extents, %d far cells: the test would not take every path", len(sets), far)
	}
	if !bytes.Equal(EncodeBackground(&vals), EncodeBackground(&each)) {
		t.Error("AddValues encodes differently from Add extent by extent")
	}
}

// TestNearCell: nearCell gives distBin's bin and roundMM's millimetres
// for distances in [0, 2^27) m: random ones over every octave, exact
// ties (d*1000 = k + 1/2 for even and odd k, where rounding to even and
// half away from zero differ), the float64s next to ties and to bin
// edges, and the ends of the range.
func TestNearCell(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	check := func(d float64) {
		t.Helper()
		if !(d >= 0 && d < 1<<27) {
			return
		}
		j, mm := nearCell(d)
		if j != distBin(d) || mm != roundMM(d) {
			t.Fatalf("nearCell(%v) = %d, %d; want %d, %d", d, j, mm, distBin(d), roundMM(d))
		}
	}
	ties := 0
	for m := range 20000 {
		// (2m+1)/16 m is (2m+1) * 62.5 mm: a tie, above an even or an
		// odd number of millimetres.
		d := float64(2*m+1) / 16
		if x := d * 1000; x-math.Floor(x) == 0.5 {
			ties++
		}
		check(d)
		check(math.Nextafter(d, 0))
		check(math.Nextafter(d, 1<<27))
	}
	if ties < 10000 {
		t.Fatalf("only %d ties", ties)
	}
	for range 200000 {
		d := math.Ldexp(r.Float64(), r.IntN(40)-12)
		check(d)
		check(math.Floor(d*1000)/1000 + 0.0005)
	}
	for j := 1; j < histLen-1; j += 7 {
		lo, _ := binEdges(j)
		check(lo)
		check(math.Nextafter(lo, 0))
	}
	check(0)
	check(math.Copysign(0, -1))
	check(math.Nextafter(1<<27, 0))
	check(1)
	check(math.Nextafter(1, 0))
}

// BenchmarkTallyRuns compares the two ways a pass tallies a block row of
// the distance-only null into a Background: a Row prepared over the whole
// row of 240 cells, then each of its segments added with AddAll (the row
// hook's way), and each segment added with AddValues in one walk (the
// Virtual's source's way). The rows are like a 27-million-cell study's
// with 20 extents in 4 nested groups: smooth distances, one weight, 1 to
// 3 segments a row going to 1, 2 or 3 extents of some 40 sets. Reported
// per cell; both tally the same sums (TestTallyAddValues).
func BenchmarkTallyRuns(b *testing.B) {
	const w, rows = 240, 4096
	r := rand.New(rand.NewPCG(5, 6))
	type seg struct {
		a, b int
		ks   []int
		ks32 []int32
	}
	vals := make([][]float64, rows)
	segs := make([][]seg, rows)
	for y := range rows {
		vals[y] = make([]float64, w)
		d0, step := 1e3+3e5*r.Float64(), 2e3*(r.Float64()-0.5)
		for x := range vals[y] {
			vals[y][x] = 0 - math.Abs(d0+step*float64(x))
		}
		cuts := []int{0}
		for range r.IntN(3) {
			cuts = append(cuts, 1+r.IntN(w-1))
		}
		slices.Sort(cuts)
		cuts = append(cuts, w)
		for i := 0; i+1 < len(cuts); i++ {
			if cuts[i] == cuts[i+1] {
				continue
			}
			var ks []int
			switch q := r.IntN(20); {
			case q < 11:
				ks = []int{19}
			case q < 13:
				ks = []int{10 + r.IntN(8), 19}
			default:
				ks = []int{r.IntN(10), 10 + r.IntN(8), 18}
			}
			var ks32 []int32
			for _, k := range ks {
				ks32 = append(ks32, int32(k))
			}
			segs[y] = append(segs[y], seg{cuts[i], cuts[i+1], ks, ks32})
		}
	}
	weights := make([]int64, w)
	for i := range weights {
		weights[i] = 123456789
	}
	b.Run("row+AddAll", func(b *testing.B) {
		var bg Background
		var row Row
		for b.Loop() {
			for y := range rows {
				row.SetValuesEqual(vals[y], weights)
				t := bg.Tally()
				for _, s := range segs[y] {
					t.AddAll(s.ks, &row, s.a, s.b)
				}
				t.Done()
			}
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/(w*rows), "ns/cell")
	})
	b.Run("AddValues", func(b *testing.B) {
		var bg Background
		for b.Loop() {
			for y := range rows {
				t := bg.Tally()
				for _, s := range segs[y] {
					t.AddValues(s.ks32, vals[y][s.a:s.b], nil, weights[0])
				}
				t.Done()
			}
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/(w*rows), "ns/cell")
	})
}

// TestSortingBiasCellsAtTraining: an extent half of whose area or more
// lies at the training points (points at cell centres, an extent of a few
// cells: hD's degenerate-data hunt, a 2 x 2 grid) has a background median
// in the histogram's first bin, [0, 1 m), read by interpolation as 0.5 or
// 1 m: the ratio of medians came out as 72436 (test median 72.4 km over
// 1 m), and an extent whose every cell lies on a training point gave
// ratios 0 (0 over 0) marked defined, which the methods text then quoted
// as the low end of the range. Such an extent's sorting bias is undefined,
// with its reason. The distances are those of that run (72436 m and
// 73901 m from the cells off the training points, cell areas of two rows
// in the ratio of its grid); the areas at 0 m are set to exactly half,
// more than half and all of the extent's.
func TestSortingBiasCellsAtTraining(t *testing.T) {
	cases := []struct {
		name    string
		dist    []float64
		wts     []int64
		defined bool
	}{
		{"half the area on training points", []float64{0, 72436, 0, 73901}, []int64{8100, 8100, 8174, 8174}, false},
		{"three quarters on training points", []float64{0, 0, 0, 73901}, []int64{8100, 8100, 8174, 8174}, false},
		{"every cell on a training point", []float64{0, 0}, []int64{8100, 8174}, false},
		{"under 1 m is not 0", []float64{0.4, 0.9, 0.2, 73901}, []int64{8100, 8100, 8174, 8174}, false},
		{"less than half on training points", []float64{0, 72436, 73901}, []int64{8100, 8100, 8174}, true},
	}
	test := []float64{0, 72436, 73901}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var b Background
			b.Add(0, c.dist, c.wts)
			sb := b.SortingBias(0, test)
			if sb.Defined != c.defined {
				t.Fatalf("defined %v, want %v: %+v", sb.Defined, c.defined, sb)
			}
			if !c.defined {
				if want := (SortingBias{TestN: len(test), Reason: ReasonAtTraining}); sb != want {
					t.Errorf("%+v, want %+v (the numbers 0, as for the other undefined records)", sb, want)
				}
				return
			}
			// Less than half at 0 m: the weighted median is the cell at
			// 72436 m (cumulative area 16200 of 24374 reaches half there),
			// read within one bin (0.1%).
			if math.Abs(sb.BackgroundMedianM-72436) > 72436*1e-3 || sb.RatioMedian <= 0 || sb.RatioMean <= 0 {
				t.Errorf("%+v, want a median near 72436 m and positive ratios", sb)
			}
		})
	}
}
