package metrics

import (
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// TestRandomScoreAUC: a score unrelated to presence gives AUC near 0.5.
// Tolerance 0.03 (common practice: about 4.6 standard deviations of the
// Mann-Whitney AUC under the null, sqrt(1/(12*2000)) = 0.0065), fixed seed.
func TestRandomScoreAUC(t *testing.T) {
	r := rand.New(rand.NewPCG(42, 43))
	var c testCase
	for i := 0; i < 20000; i++ {
		c.bgV = append(c.bgV, r.Float64())
		c.bgW = append(c.bgW, int64(1+r.IntN(10)))
	}
	for i := 0; i < 2000; i++ {
		c.test = append(c.test, r.Float64())
	}
	_, a := build(t, c, nil, 256)
	sc, err := Score(a, nil, c.test, quick(0.05))
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(sc.AUC-0.5) > 0.03 || math.Abs(sc.AUCUnweighted-0.5) > 0.03 {
		t.Errorf("AUC %v, unweighted %v, want 0.5 +- 0.03", sc.AUC, sc.AUCUnweighted)
	}
}

// TestAppendBelow: adding background area k below every presence value
// gives AUC' = (AUC*W + k)/(W + k).
func TestAppendBelow(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	for it := 0; it < 20; it++ {
		c := randomCase(r, 50+r.IntN(100), 5+r.IntN(30), 5, 20)
		for i := range c.test {
			c.test[i] = math.Max(0, c.test[i])
		}
		l, a := build(t, c, nil, 64)
		sc, err := Score(a, c.train, c.test, quick(0.1))
		if err != nil {
			t.Fatal(err)
		}
		W := float64(a.Area())
		b := a.Clone()
		var k int64
		for i := 0; i < 1+r.IntN(30); i++ {
			w := int64(1 + r.IntN(1000))
			b.Add(-1-float64(r.IntN(5)), w) // every presence is >= 0
			k += w
		}
		if b.Layout() != l {
			t.Fatal("clone lost its layout")
		}
		sc2, err := Score(b, c.train, c.test, quick(0.1))
		if err != nil {
			t.Fatal(err)
		}
		want := (sc.AUC*W + float64(k)) / (W + float64(k))
		if !near(sc2.AUC, want, 1e-13) {
			t.Errorf("case %d: AUC' %v, (AUC*W+k)/(W+k) = %v", it, sc2.AUC, want)
		}
	}
}

// TestMonotoneInvariance: an order-preserving transform of the model
// (exact in floating point) leaves AUC, partial ROC, threshold statistics
// and the curve unchanged.
func TestMonotoneInvariance(t *testing.T) {
	transforms := []struct {
		name string
		f    func(float64) float64
	}{
		{"cube", func(v float64) float64 { return v * v * v }},
		{"compress", func(v float64) float64 { return 3 + v/1024 }},
	}
	r := rand.New(rand.NewPCG(9, 10))
	base := randomCase(r, 300, 40, 25, 40)
	for i := range base.bgV {
		base.bgV[i] -= 20
	}
	for i := range base.test {
		base.test[i] -= 20
	}
	for i := range base.train {
		base.train[i] -= 20
	}
	s := Settings{E: []float64{0.05, 0.1, 0.3}, Iterations: 200, Seed: 77}
	_, a := build(t, base, nil, 64)
	want, err := Score(a, base.train, base.test, s)
	if err != nil {
		t.Fatal(err)
	}
	for _, tr := range transforms {
		t.Run(tr.name, func(t *testing.T) {
			mapv := func(v []float64) []float64 {
				o := make([]float64, len(v))
				for i, x := range v {
					o[i] = tr.f(x)
				}
				return o
			}
			c := testCase{bgV: mapv(base.bgV), bgW: base.bgW, test: mapv(base.test), train: mapv(base.train)}
			_, a := build(t, c, nil, 64)
			got, err := Score(a, c.train, c.test, s)
			if err != nil {
				t.Fatal(err)
			}
			if got.AUC != want.AUC || got.AUCUnweighted != want.AUCUnweighted || got.AUCTrain != want.AUCTrain || got.AUCSE != want.AUCSE {
				t.Errorf("AUCs changed: %v %v %v %v vs %v %v %v %v", got.AUC, got.AUCUnweighted, got.AUCTrain, got.AUCSE,
					want.AUC, want.AUCUnweighted, want.AUCTrain, want.AUCSE)
			}
			for i := range got.PartialROC {
				// The tied value itself is transformed with the values.
				got.PartialROC[i].TieValue, want.PartialROC[i].TieValue = 0, 0
			}
			if !reflect.DeepEqual(got.PartialROC, want.PartialROC) {
				t.Errorf("partial ROC changed:\n%+v\n%+v", got.PartialROC, want.PartialROC)
			}
			if !reflect.DeepEqual(got.Curve, want.Curve) {
				t.Error("curve changed")
			}
			for i := range want.Thresholds {
				g, w := got.Thresholds[i], want.Thresholds[i]
				g.Value, w.Value = 0, 0
				if g != w {
					t.Errorf("threshold %d changed: %+v vs %+v", i, g, w)
				}
			}
		})
	}
}

// TestMergeOrder: any partition of the cells, merged in any order, gives
// identical Scores.
func TestMergeOrder(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	c := randomCase(r, 2000, 60, 40, 100)
	for i := range c.bgV {
		c.bgV[i] += r.Float64() * 0.5 // continuous values between the ties
	}
	s := Settings{E: []float64{0.05, 0.2}, Iterations: 100, Seed: 3, FixedThresholds: []float64{50}}
	l, whole := build(t, c, s.FixedThresholds, 128)
	want, err := Score(whole, c.train, c.test, s)
	if err != nil {
		t.Fatal(err)
	}
	for _, parts := range []int{2, 3, 7, 16} {
		accs := make([]*Accumulator, parts)
		for i := range accs {
			accs[i] = l.NewAccumulator()
		}
		for i, v := range c.bgV {
			accs[r.IntN(parts)].Add(v, c.bgW[i])
		}
		// forward, backward, and pairwise tree merges
		orders := [][]int{}
		fw := make([]int, parts)
		for i := range fw {
			fw[i] = i
		}
		bw := slices.Clone(fw)
		slices.Reverse(bw)
		orders = append(orders, fw, bw, r.Perm(parts))
		for _, ord := range orders {
			m := l.NewAccumulator()
			for _, i := range ord {
				if err := m.Merge(accs[i]); err != nil {
					t.Fatal(err)
				}
			}
			got, err := Score(m, c.train, c.test, s)
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(got, want) {
				t.Errorf("%d parts, order %v: Scores differ from single pass", parts, ord)
			}
		}
		tree := slices.Clone(accs)
		for i := range tree {
			tree[i] = tree[i].Clone()
		}
		for len(tree) > 1 {
			var next []*Accumulator
			for i := 0; i+1 < len(tree); i += 2 {
				if err := tree[i+1].Merge(tree[i]); err != nil {
					t.Fatal(err)
				}
				next = append(next, tree[i+1])
			}
			if len(tree)%2 == 1 {
				next = append(next, tree[len(tree)-1])
			}
			tree = next
		}
		got, err := Score(tree[0], c.train, c.test, s)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, want) {
			t.Errorf("%d parts, tree merge: Scores differ from single pass", parts)
		}
	}
	other, _ := NewLayout(c.test, 16)
	if err := whole.Merge(other.NewAccumulator()); err == nil || !strings.HasPrefix(err.Error(), "metrics: ") {
		t.Errorf("Merge across layouts: err = %v", err)
	}
}

// TestBootstrapSeed: same seed, same result; different seed, different.
func TestBootstrapSeed(t *testing.T) {
	r := rand.New(rand.NewPCG(13, 14))
	c := randomCase(r, 500, 50, 10, 60)
	for i := range c.test {
		c.test[i] = math.Max(0, c.test[i])
	}
	_, a := build(t, c, nil, 64)
	s := Settings{E: []float64{0.05, 0.1}, Iterations: 300, Seed: 2024}
	x, err := Score(a, c.train, c.test, s)
	if err != nil {
		t.Fatal(err)
	}
	y, _ := Score(a, c.train, c.test, s)
	if !reflect.DeepEqual(x, y) {
		t.Error("same seed gave different Scores")
	}
	// Shuffled presence order: results depend on the multiset only.
	sh := slices.Clone(c.test)
	r.Shuffle(len(sh), func(i, j int) { sh[i], sh[j] = sh[j], sh[i] })
	z, _ := Score(a, c.train, sh, s)
	// Placements follow the presences' order; as multisets they agree.
	for _, sc := range []*Scores{&x, &z} {
		sc.Placements = slices.Sorted(slices.Values(sc.Placements))
		sc.PlacementsUnweighted = slices.Sorted(slices.Values(sc.PlacementsUnweighted))
	}
	if !reflect.DeepEqual(x, z) {
		t.Error("presence order changed the Scores")
	}
	s.Seed = 2025
	w, _ := Score(a, c.train, c.test, s)
	if w.PartialROC[0].RatioMean == x.PartialROC[0].RatioMean {
		t.Error("different seeds gave the same bootstrap")
	}
	if w.PartialROC[0].Ratio != x.PartialROC[0].Ratio || w.AUC != x.AUC {
		t.Error("seed changed a full-set number")
	}
	if x.PartialROC[0].RatioSD <= 0 || x.PartialROC[0].CILow > x.PartialROC[0].CIHigh {
		t.Errorf("implausible bootstrap summary %+v", x.PartialROC[0])
	}
}

// TestRing: Sub gives the ring between nested extents; the outer AUC is the
// area-weighted mix of inner and ring AUCs, and ring scores equal those of
// the ring accumulated directly (except Boyce, whose range may be a bound).
func TestRing(t *testing.T) {
	r := rand.New(rand.NewPCG(15, 16))
	c := randomCase(r, 1500, 40, 30, 80)
	for i := range c.bgV {
		c.bgV[i] += r.Float64() * 0.9
	}
	l, outer := build(t, c, nil, 128)
	inner, ring := l.NewAccumulator(), l.NewAccumulator()
	for i, v := range c.bgV {
		if i%3 == 0 {
			inner.Add(v, c.bgW[i])
		} else {
			ring.Add(v, c.bgW[i])
		}
	}
	got, err := outer.Sub(inner)
	if err != nil {
		t.Fatal(err)
	}
	if got.Cells() != ring.Cells() || got.Area() != ring.Area() || !reflect.DeepEqual(got.bins, ring.bins) || !reflect.DeepEqual(got.hist, ring.hist) {
		t.Fatal("Sub bins differ from the ring accumulated directly")
	}
	if got.Min() > ring.Min() || got.Max() < ring.Max() {
		t.Errorf("Sub range [%v,%v] does not bound the ring's [%v,%v]", got.Min(), got.Max(), ring.Min(), ring.Max())
	}
	s := quick(0.05, 0.1)
	so, _ := Score(outer, c.train, c.test, s)
	si, _ := Score(inner, c.train, c.test, s)
	sr, _ := Score(got, c.train, c.test, s)
	sd, _ := Score(ring, c.train, c.test, s)
	mix := (si.AUC*float64(inner.Area()) + sr.AUC*float64(got.Area())) / float64(outer.Area())
	if !near(so.AUC, mix, 1e-13) {
		t.Errorf("outer AUC %v, area-weighted mix %v", so.AUC, mix)
	}
	sr.Boyce, sd.Boyce = Boyce{}, Boyce{}
	if !reflect.DeepEqual(sr, sd) {
		t.Error("ring scores from Sub differ from the direct ring")
	}
	if _, err := inner.Sub(outer); err == nil || !strings.Contains(err.Error(), "not nested") {
		t.Errorf("Sub of a larger accumulator: err = %v", err)
	}
}

// TestRingRangeExact: when the ring's extremes are layout values, Sub knows
// them exactly.
func TestRingRangeExact(t *testing.T) {
	l, err := NewLayout([]float64{1, 5}, 16)
	if err != nil {
		t.Fatal(err)
	}
	outer, inner := l.NewAccumulator(), l.NewAccumulator()
	for _, v := range []float64{0.5, 1, 3, 5, 9} {
		outer.Add(v, 2)
	}
	inner.Add(0.5, 2)
	inner.Add(9, 2)
	ring, err := outer.Sub(inner)
	if err != nil {
		t.Fatal(err)
	}
	if ring.Min() != 1 || ring.Max() != 5 || !ring.RangeExact() {
		t.Errorf("ring range [%v,%v] exact=%v, want [1,5] exact", ring.Min(), ring.Max(), ring.RangeExact())
	}
	inner.Reset()
	inner.Add(1, 2)
	inner.Add(5, 2)
	ring, _ = outer.Sub(inner)
	// Ring holds 0.5, 3, 9: bounds from the exact bins and the histogram,
	// whose grid for the outer range [0.5, 9] in 16 bins has width 1
	// (exponent 0: bins 0..9; width 1/2 would need 18).
	if ring.RangeExact() || ring.Min() > 0.5 || ring.Max() < 9 || ring.Min() < 0 || ring.Max() > 10 {
		t.Errorf("ring range [%v,%v] exact=%v, want bounds around [0.5, 9]", ring.Min(), ring.Max(), ring.RangeExact())
	}
	if ring.Min() < 0.5-1 || ring.Max() > 9+1 {
		t.Errorf("ring bounds [%v,%v] looser than one histogram bin", ring.Min(), ring.Max())
	}
}

// TestBoyceAligned: with background values at histogram bin centres and
// windows aligned to bin edges, the histogram is exact, so the Boyce
// windows must match a brute-force count over cells and presences. With
// 128 bins the range [0, 1] lies on the grid of exponent -6 (bins of
// width 1/64: 2^6 = 64 < 128 bins, 2^7 = 128 would not fit), and windows
// of width 1/8 in 57 steps start at multiples of 1/64.
func TestBoyceAligned(t *testing.T) {
	r := rand.New(rand.NewPCG(17, 18))
	var c testCase
	centre := func(k int) float64 { return (float64(k) + 0.5) / 64 }
	for i := 0; i < 3000; i++ {
		k := r.IntN(64)
		c.bgV = append(c.bgV, centre(k))
		c.bgW = append(c.bgW, int64(1+r.IntN(5)))
	}
	c.bgV = append(c.bgV, 0, 1) // range exactly [0,1]
	c.bgW = append(c.bgW, 1, 1)
	for i := 0; i < 150; i++ {
		k := int(math.Sqrt(r.Float64()) * 64) // more presences at high values
		c.test = append(c.test, centre(min(k, 63)))
	}
	l, err := NewLayout(c.test, 128)
	if err != nil {
		t.Fatal(err)
	}
	a := l.NewAccumulator()
	for i, v := range c.bgV {
		a.Add(v, c.bgW[i])
	}
	if a.he != -6 {
		t.Fatalf("grid exponent %d, want -6", a.he)
	}
	const steps = 57
	s := Settings{E: []float64{0.05}, Iterations: 1, BoyceWidth: 0.125, BoyceSteps: steps}
	sc, err := Score(a, nil, c.test, s)
	if err != nil {
		t.Fatal(err)
	}
	b := sc.Boyce
	if !b.Defined || b.Windows != steps || b.Used != steps {
		t.Fatalf("Boyce %+v", b)
	}
	var tot float64
	for _, w := range c.bgW {
		tot += float64(w)
	}
	var mids, ratios []float64
	for i := 0; i < steps; i++ {
		lo, hi := float64(i)/64, float64(i+8)/64
		var e float64
		for j, v := range c.bgV {
			if v >= lo && v <= hi {
				e += float64(c.bgW[j])
			}
		}
		p := 0
		for _, v := range c.test {
			if v >= lo && v <= hi {
				p++
			}
		}
		mids = append(mids, lo+0.0625)
		ratios = append(ratios, (float64(p)/150)/(e/tot))
	}
	for i := range mids {
		if !near(b.Mid[i], mids[i], 1e-12) || !near(b.Ratio[i], ratios[i], 1e-9) {
			t.Errorf("window %d: mid %v ratio %v, brute %v %v", i, b.Mid[i], b.Ratio[i], mids[i], ratios[i])
		}
	}
	// Ratios equal in exact arithmetic may differ in the last bits here,
	// which would split rank ties: compare ranks of ratios rounded to 9
	// significant digits.
	round9 := func(v []float64) []float64 {
		o := make([]float64, len(v))
		for i, x := range v {
			o[i], _ = strconv.ParseFloat(strconv.FormatFloat(x, 'g', 9, 64), 64)
		}
		return o
	}
	rho, _ := Spearman(round9(ratios), mids)
	rhoGot, _ := Spearman(round9(b.Ratio), b.Mid)
	self, _ := Spearman(b.Ratio, b.Mid)
	if !near(rhoGot, rho, 1e-12) || b.Index != self || b.Index < 0.5 {
		t.Errorf("Boyce index %v (ranks of rounded ratios %v), brute %v (expected clearly positive)", b.Index, rhoGot, rho)
	}
}

// TestBoyceUndefined covers the cases where the index is undefined.
func TestBoyceUndefined(t *testing.T) {
	tests := []struct {
		name  string
		width float64
		steps int
	}{
		{"one window", 0.1, 1},
		{"two windows", 0.1, 2},
		{"full-width windows", 1, 10},
	}
	l, _ := NewLayout([]float64{0.2, 0.8}, 32)
	a := l.NewAccumulator()
	for i := 0; i <= 100; i++ {
		a.Add(float64(i)/100, 1)
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			sc, err := Score(a, nil, []float64{0.2, 0.8, 0.8}, Settings{Iterations: 1, BoyceWidth: tc.width, BoyceSteps: tc.steps})
			if err != nil {
				t.Fatal(err)
			}
			if sc.Boyce.Defined || sc.Boyce.Index != 0 || sc.Boyce.Reason == "" {
				t.Errorf("Boyce %+v, want undefined with a reason", sc.Boyce)
			}
		})
	}
}

// TestDegenerate covers records that cannot be scored and input errors.
func TestDegenerate(t *testing.T) {
	l, _ := NewLayout([]float64{1, 2, 3}, 16)
	filled := func(vals ...float64) *Accumulator {
		a := l.NewAccumulator()
		for _, v := range vals {
			a.Add(v, 1)
		}
		return a
	}
	zero := l.NewAccumulator()
	zero.Add(1, 0)
	zero.Add(2, 0)
	tests := []struct {
		name      string
		a         *Accumulator
		train     []float64
		test      []float64
		s         Settings
		notScored string
		errPart   string
	}{
		{"no background", filled(), nil, []float64{1}, Settings{}, ReasonNoBackground, ""},
		{"zero area", zero, nil, []float64{1}, Settings{}, ReasonNoArea, ""},
		{"no test presences", filled(1, 2), []float64{1}, nil, Settings{}, ReasonNoTest, ""},
		{"constant suitability", filled(2, 2, 2), nil, []float64{2}, Settings{}, ReasonConstant, ""},
		{"NaN test value", filled(1, 2), nil, []float64{math.NaN()}, Settings{}, "", "test presence 0"},
		{"Inf train value", filled(1, 2), []float64{1, math.Inf(1)}, []float64{1}, Settings{}, "", "training presence 1"},
		{"test value not in layout", filled(1, 2), nil, []float64{1.5}, Settings{}, "", "not a layout value"},
		{"fixed threshold not in layout", filled(1, 2), nil, []float64{1}, Settings{FixedThresholds: []float64{2.5}}, "", "fixed threshold 0"},
		{"bad settings", filled(1, 2), nil, []float64{1}, Settings{Fraction: 2}, "", "Fraction"},
		{"nil accumulator", nil, nil, []float64{1}, Settings{}, "", "nil accumulator"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			sc, err := Score(tc.a, tc.train, tc.test, tc.s)
			if tc.errPart != "" {
				if err == nil || !strings.Contains(err.Error(), tc.errPart) || !strings.HasPrefix(err.Error(), "metrics: ") {
					t.Errorf("err = %v, want one mentioning %q", err, tc.errPart)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if sc.Scored || sc.NotScored != tc.notScored {
				t.Errorf("Scored=%v NotScored=%q, want %q", sc.Scored, sc.NotScored, tc.notScored)
			}
			if sc.TestN != len(tc.test) || sc.TrainN != len(tc.train) || sc.Cells != tc.a.Cells() || sc.Area != tc.a.Area() {
				t.Errorf("counts not filled: %+v", sc)
			}
		})
	}
}

// TestNotFormed: presences below the extent's range push x_E to 1.
func TestNotFormed(t *testing.T) {
	c := loadCases(t)["below_extent"]
	_, a := build(t, c, nil, 16)
	sc, err := Score(a, c.train, c.test, Settings{E: []float64{0.05}, Iterations: 100, Fraction: 1})
	if err != nil {
		t.Fatal(err)
	}
	p := sc.PartialROC[0]
	if p.Formed || p.Ratio != 0 || p.XE != 1 {
		t.Errorf("full set: %+v, want not formed at XE=1", p)
	}
	if p.NotFormed == 0 || p.NotFormed == p.Iterations {
		t.Errorf("NotFormed = %d of %d; with 2 of 5 presences below the range some resamples form and some do not", p.NotFormed, p.Iterations)
	}
}

// TestSettingsValidate checks field-naming errors.
func TestSettingsValidate(t *testing.T) {
	tests := []struct {
		name  string
		s     Settings
		field string
	}{
		{"defaults", Settings{}, ""},
		{"full", Settings{E: []float64{0.05, 0.1}, Iterations: 10, Fraction: 1, BoyceWidth: 1, BoyceSteps: 1}, ""},
		{"E zero", Settings{E: []float64{0}}, "E[0]"},
		{"E one", Settings{E: []float64{0.1, 1}}, "E[1]"},
		{"E NaN", Settings{E: []float64{math.NaN()}}, "E[0]"},
		{"B negative", Settings{Iterations: -1}, "Iterations"},
		{"B huge", Settings{Iterations: MaxIterations + 1}, "Iterations"},
		{"f negative", Settings{Fraction: -0.5}, "Fraction"},
		{"f above one", Settings{Fraction: 1.01}, "Fraction"},
		{"fixed NaN", Settings{FixedThresholds: []float64{0.3, math.NaN()}}, "FixedThresholds[1]"},
		{"width above one", Settings{BoyceWidth: 1.5}, "BoyceWidth"},
		{"width negative", Settings{BoyceWidth: -0.1}, "BoyceWidth"},
		{"steps negative", Settings{BoyceSteps: -3}, "BoyceSteps"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			err := tc.s.Validate()
			if tc.field == "" {
				if err != nil {
					t.Errorf("unexpected error %v", err)
				}
				return
			}
			if err == nil || !strings.Contains(err.Error(), tc.field) || !strings.HasPrefix(err.Error(), "metrics: ") {
				t.Errorf("err = %v, want one naming %s", err, tc.field)
			}
		})
	}
	d := Settings{}.WithDefaults()
	if !reflect.DeepEqual(d.E, []float64{0.05}) || d.Iterations != 1000 || d.Fraction != 0.5 || d.BoyceWidth != 0.1 || d.BoyceSteps != 100 {
		t.Errorf("defaults %+v", d)
	}
}

// TestP10Convention: v_(floor(n/10)+1), at most 10% strictly below.
func TestP10Convention(t *testing.T) {
	tests := []struct{ n, want int }{{1, 0}, {9, 0}, {10, 1}, {19, 1}, {20, 2}, {25, 2}, {100, 10}, {101, 10}}
	for _, tc := range tests {
		if got := P10Index(tc.n); got != tc.want {
			t.Errorf("P10Index(%d) = %d, want %d", tc.n, got, tc.want)
		}
		if below := P10Index(tc.n); float64(below) > 0.1*float64(tc.n) {
			t.Errorf("n=%d: %d values below P10 exceed 10%%", tc.n, below)
		}
	}
}

// TestAllFinite: no NaN or Inf anywhere in Scores over random cases.
func TestAllFinite(t *testing.T) {
	r := rand.New(rand.NewPCG(19, 20))
	for it := 0; it < 40; it++ {
		c := randomCase(r, 1+r.IntN(60), 1+r.IntN(10), r.IntN(5), 1+r.IntN(6))
		_, a := build(t, c, []float64{2}, 16)
		sc, err := Score(a, c.train, c.test, Settings{E: []float64{0.05, 0.5}, Iterations: 20, Seed: uint64(it), FixedThresholds: []float64{2}})
		if err != nil {
			t.Fatal(err)
		}
		checkFinite(t, reflect.ValueOf(sc), "Scores")
	}
}

func checkFinite(t *testing.T, v reflect.Value, path string) {
	switch v.Kind() {
	case reflect.Float64:
		if f := v.Float(); math.IsNaN(f) || math.IsInf(f, 0) {
			t.Errorf("%s = %v", path, f)
		}
	case reflect.Struct:
		for i := 0; i < v.NumField(); i++ {
			checkFinite(t, v.Field(i), path+"."+v.Type().Field(i).Name)
		}
	case reflect.Slice:
		for i := 0; i < v.Len(); i++ {
			checkFinite(t, v.Index(i), path)
		}
	}
}

// TestCurveThinning: long curves are thinned to MaxCurvePoints exact
// vertices, keeping both ends.
func TestCurveThinning(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 22))
	var c testCase
	for i := 0; i < 3000; i++ {
		c.bgV = append(c.bgV, float64(i))
		c.bgW = append(c.bgW, int64(1+r.IntN(3)))
	}
	for i := 0; i < 1000; i++ {
		c.test = append(c.test, float64(r.IntN(3000)))
	}
	_, a := build(t, c, nil, 64)
	sc, err := Score(a, nil, c.test, quick(0.05))
	if err != nil {
		t.Fatal(err)
	}
	full := bruteCurve(c.bgV, c.bgW, c.test)
	set := map[Point]bool{}
	for _, p := range full {
		set[p] = true
	}
	cv := sc.Curve
	if len(cv) > MaxCurvePoints || len(cv) < MaxCurvePoints/2 {
		t.Fatalf("curve has %d points", len(cv))
	}
	if cv[0] != (Point{0, 0}) || cv[len(cv)-1] != (Point{1, 1}) {
		t.Errorf("ends %v %v", cv[0], cv[len(cv)-1])
	}
	for i, p := range cv {
		if !set[p] {
			t.Errorf("point %d %v is not a curve vertex", i, p)
		}
		if i > 0 && (p.X < cv[i-1].X || p.Y < cv[i-1].Y || p == cv[i-1]) {
			t.Errorf("not strictly advancing at %d", i)
		}
	}
}

// TestThresholdTrain: thresholds taken from ThresholdTrain are those Score
// gives when those values are the training presences, while AUCTrain still
// comes from the train argument (by construction).
func TestThresholdTrain(t *testing.T) {
	all := []float64{0.2, 0.35, 0.5, 0.6, 0.8, 0.9}
	inside := []float64{0.6, 0.8, 0.9}
	test := []float64{0.3, 0.5, 0.7, 0.9}
	vals := append(append(append([]float64{}, all...), test...), 0.7)
	l, err := NewLayout(vals, 64)
	if err != nil {
		t.Fatal(err)
	}
	a := l.NewAccumulator()
	for i := 0; i < 100; i++ {
		a.Add(float64(i)/100, int64(1+i%3))
	}
	viaAll, err := Score(a, all, test, Settings{Iterations: 5})
	if err != nil {
		t.Fatal(err)
	}
	viaInside, err := Score(a, inside, test, Settings{Iterations: 5, ThresholdTrain: all})
	if err != nil {
		t.Fatal(err)
	}
	plain, err := Score(a, inside, test, Settings{Iterations: 5})
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(viaAll.Thresholds, viaInside.Thresholds) {
		t.Errorf("thresholds %+v, want %+v", viaInside.Thresholds, viaAll.Thresholds)
	}
	if viaInside.AUCTrain != plain.AUCTrain {
		t.Errorf("AUCTrain %v changed by ThresholdTrain (want %v)", viaInside.AUCTrain, plain.AUCTrain)
	}
	if viaInside.Thresholds[0].Value != 0.2 || plain.Thresholds[0].Value != 0.6 {
		t.Errorf("MTP %v and %v, want 0.2 (all) and 0.6 (inside)", viaInside.Thresholds[0].Value, plain.Thresholds[0].Value)
	}
	if _, err := Score(a, inside, test, Settings{ThresholdTrain: []float64{0.123}}); err == nil {
		t.Error("a ThresholdTrain value outside the layout was accepted")
	}
}
