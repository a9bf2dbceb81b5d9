package metrics

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// This file holds a brute-force reference written independently of the
// package code: straightforward O(presences x cells) loops and an explicit
// ROC polyline with a vertex at every distinct value (background or
// presence), the way a textbook draws it.

func bruteAUC(bgV []float64, bgW []int64, pres []float64) float64 {
	var num, tot float64
	for _, w := range bgW {
		tot += float64(w)
	}
	for _, p := range pres {
		for i, v := range bgV {
			if v < p {
				num += float64(bgW[i])
			} else if v == p {
				num += float64(bgW[i]) / 2
			}
		}
	}
	return num / (float64(len(pres)) * tot)
}

func ones(n int) []int64 {
	w := make([]int64, n)
	for i := range w {
		w[i] = 1
	}
	return w
}

// bruteCurve returns the ROC polyline on the area axis with a vertex at
// every distinct value, from (0,0) to (1,1).
func bruteCurve(bgV []float64, bgW []int64, test []float64) []Point {
	all := append(slices.Clone(bgV), test...)
	slices.Sort(all)
	all = slices.Compact(all)
	slices.Reverse(all)
	var tot float64
	for _, w := range bgW {
		tot += float64(w)
	}
	pts := []Point{{0, 0}}
	for _, t := range all {
		var a float64
		for i, v := range bgV {
			if v >= t {
				a += float64(bgW[i])
			}
		}
		k := 0
		for _, v := range test {
			if v >= t {
				k++
			}
		}
		pts = append(pts, Point{a / tot, float64(k) / float64(len(test))})
	}
	if last := pts[len(pts)-1]; last.X != 1 || last.Y != 1 {
		pts = append(pts, Point{1, 1})
	}
	return pts
}

// brutePartial walks the polyline to the first point at height 1-E,
// interpolating on the crossing segment, and integrates trapezoids to x=1.
// tie reports a crossing strictly inside the segment of a value that two
// or more of the original presences share (tiedAt counts them; a tie:
// formed is then false).
func brutePartial(pts []Point, e float64, tiedAt func(y0, y1 float64) int) (xE, model, null float64, formed, tie bool, tieEnd Point) {
	target := 1 - e
	k := 1
	for ; k < len(pts); k++ {
		if pts[k].Y >= target-1e-12 {
			break
		}
	}
	p0, p1 := pts[k-1], pts[k]
	s := (target - p0.Y) / (p1.Y - p0.Y)
	s = math.Max(0, math.Min(1, s))
	xE = p0.X + s*(p1.X-p0.X)
	if s > 1e-9 && s < 1-1e-9 && xE < 1 && tiedAt(p0.Y, p1.Y) >= 2 {
		return xE, 0, 0, false, true, p1
	}
	model = (p1.X - xE) * (target + p1.Y) / 2
	for i := k + 1; i < len(pts); i++ {
		model += (pts[i].X - pts[i-1].X) * (pts[i].Y + pts[i-1].Y) / 2
	}
	null = (1 - xE*xE) / 2
	return xE, model, null, null > 0, false, Point{}
}

// tiesOf returns, for the segment of the curve over the presences res
// between heights y0 and y1, how many of the original presences orig share
// the segment's value (the k1-th largest of res, k1 = y1 n).
func tiesOf(res, orig []float64) func(y0, y1 float64) int {
	return func(y0, y1 float64) int {
		n := float64(len(res))
		k0, k1 := int(math.Round(y0*n)), int(math.Round(y1*n))
		if k1 <= k0 {
			return 0
		}
		// Presences at or above the segment's value number k1; the value is
		// the k1-th largest.
		s := slices.Clone(res)
		slices.Sort(s)
		slices.Reverse(s)
		u := s[k1-1]
		c := 0
		for _, v := range orig {
			if v == u {
				c++
			}
		}
		return c
	}
}

// randomCase draws a case with many ties: integer values, integer weights,
// some presences outside the background's range.
func randomCase(r *rand.Rand, cells, nTest, nTrain, vmax int) testCase {
	var c testCase
	for i := 0; i < cells; i++ {
		c.bgV = append(c.bgV, float64(r.IntN(vmax+1)))
		c.bgW = append(c.bgW, int64(1+r.IntN(9)))
	}
	for i := 0; i < nTest; i++ {
		c.test = append(c.test, float64(r.IntN(vmax+5)-2))
	}
	for i := 0; i < nTrain; i++ {
		c.train = append(c.train, float64(r.IntN(vmax+1)+r.IntN(3)))
	}
	return c
}

func TestBruteForce(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	es := []float64{0.05, 0.1, 0.2, 0.25, 0.37, 0.5, 0.9}
	scored, formedN, unformedN, tieN := 0, 0, 0, 0
	for it := 0; it < 60; it++ {
		cells := 1 + r.IntN(200)
		c := randomCase(r, cells, 1+r.IntN(40), 1+r.IntN(30), 1+r.IntN(30))
		if it%10 == 0 {
			c.test = c.test[:min(len(c.test), 20)] // n = 20: 1-E hits vertices
		}
		_, a := build(t, c, nil, 64)
		sc, err := Score(a, c.train, c.test, quick(es...))
		if err != nil {
			t.Fatal(err)
		}
		if !sc.Scored {
			continue // constant background: covered elsewhere
		}
		scored++
		if w := bruteAUC(c.bgV, c.bgW, c.test); !near(sc.AUC, w, 1e-12) {
			t.Errorf("case %d: AUC %v, brute %v", it, sc.AUC, w)
		}
		if w := bruteAUC(c.bgV, ones(len(c.bgV)), c.test); !near(sc.AUCUnweighted, w, 1e-12) {
			t.Errorf("case %d: AUCUnweighted %v, brute %v", it, sc.AUCUnweighted, w)
		}
		if w := bruteAUC(c.bgV, c.bgW, c.train); !near(sc.AUCTrain, w, 1e-12) {
			t.Errorf("case %d: AUCTrain %v, brute %v", it, sc.AUCTrain, w)
		}
		pts := bruteCurve(c.bgV, c.bgW, c.test)
		for i, e := range es {
			xE, model, null, formed, tie, end := brutePartial(pts, e, tiesOf(c.test, c.test))
			p := sc.PartialROC[i]
			if formed {
				formedN++
			} else {
				unformedN++
			}
			if tie {
				tieN++
				if p.Formed || p.Reason != ReasonPartialTie || !near(p.XE, xE, 1e-12) || !near(p.DiscreteXE, end.X, 1e-12) {
					t.Errorf("case %d E=%v: tie crossing at x %v (segment end %v), got %+v", it, e, xE, end, p)
				}
				continue
			}
			if p.Formed != formed {
				t.Errorf("case %d E=%v: formed %v, brute %v", it, e, p.Formed, formed)
				continue
			}
			if !near(p.XE, xE, 1e-12) || (formed && (!near(p.ModelArea, model, 1e-12) || !near(p.Ratio, model/null, 1e-11))) {
				t.Errorf("case %d E=%v: XE %v model %v ratio %v; brute %v %v %v", it, e, p.XE, p.ModelArea, p.Ratio, xE, model, model/null)
			}
		}
		// The drawn curve's vertices are brute-force curve points, and the
		// area under it is the weighted AUC.
		set := map[Point]bool{}
		for _, p := range pts {
			set[p] = true
		}
		var area float64
		for i, p := range sc.Curve {
			if !set[p] {
				t.Errorf("case %d: curve vertex %v is not on the brute-force curve", it, p)
			}
			if i > 0 {
				q := sc.Curve[i-1]
				if p.X < q.X || p.Y < q.Y {
					t.Errorf("case %d: curve not monotone at %d", it, i)
				}
				area += (p.X - q.X) * (p.Y + q.Y) / 2
			}
		}
		if !near(area, sc.AUC, 1e-12) {
			t.Errorf("case %d: area under Curve %v, AUC %v", it, area, sc.AUC)
		}
		// Thresholds, brute force.
		tr := slices.Clone(c.train)
		slices.Sort(tr)
		for _, th := range sc.Thresholds {
			want := tr[0]
			if th.Name == ThresholdP10 {
				want = tr[len(tr)/10]
			}
			var ge, tot float64
			for i, v := range c.bgV {
				tot += float64(c.bgW[i])
				if v >= want {
					ge += float64(c.bgW[i])
				}
			}
			succ := 0
			for _, v := range c.test {
				if v >= want {
					succ++
				}
			}
			if th.Value != want || th.Successes != succ || !near(th.AreaFraction, ge/tot, 1e-15) ||
				!near(th.Omission, float64(len(c.test)-succ)/float64(len(c.test)), 1e-15) {
				t.Errorf("case %d: threshold %+v, brute value %v successes %d area %v", it, th, want, succ, ge/tot)
			}
		}
	}
	if scored < 50 || formedN < 100 || unformedN < 5 || tieN < 5 {
		t.Errorf("brute-force coverage: %d scored cases, %d formed and %d unformed curves (%d tie crossings)", scored, formedN, unformedN, tieN)
	}
}

// TestBootstrapBruteForce replays the documented resampling (PCG seeded
// with (Seed, Seed^0x9E3779B97F4A7C15), positions in the ascending-sorted
// test values, round(f*n) draws) on explicit resampled presence lists and
// scores each with the brute-force curve.
func TestBootstrapBruteForce(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	for it := 0; it < 6; it++ {
		c := randomCase(r, 80, 15+r.IntN(20), 10, 12)
		if it%2 == 0 { // mostly formed curves: presences inside the range
			for i := range c.test {
				c.test[i] = math.Max(0, c.test[i])
			}
		}
		_, a := build(t, c, nil, 64)
		s := Settings{E: []float64{0.05, 0.2}, Iterations: 40, Fraction: 0.7, Seed: uint64(100 + it)}
		sc, err := Score(a, c.train, c.test, s)
		if err != nil {
			t.Fatal(err)
		}
		if !sc.Scored {
			t.Fatalf("case %d not scored: %s", it, sc.NotScored)
		}
		sorted := slices.Clone(c.test)
		slices.Sort(sorted)
		rng := rand.New(rand.NewPCG(s.Seed, s.Seed^0x9E3779B97F4A7C15))
		k := int(math.Round(s.Fraction * float64(len(sorted))))
		ratios := make([][]float64, len(s.E))
		notFormed := make([]int, len(s.E))
		for b := 0; b < s.Iterations; b++ {
			res := make([]float64, k)
			for i := range res {
				res[i] = sorted[rng.IntN(len(sorted))]
			}
			pts := bruteCurve(c.bgV, c.bgW, res)
			for i, e := range s.E {
				_, model, null, ok, _, _ := brutePartial(pts, e, tiesOf(res, c.test))
				if !ok {
					notFormed[i]++
					continue
				}
				ratios[i] = append(ratios[i], model/null)
			}
		}
		for i := range s.E {
			p := sc.PartialROC[i]
			rs := ratios[i]
			var m float64
			for _, v := range rs {
				m += v
			}
			m /= float64(len(rs))
			var ss float64
			le := 0
			for _, v := range rs {
				ss += (v - m) * (v - m)
				if v <= 1 {
					le++
				}
			}
			sd := math.Sqrt(ss / float64(len(rs)-1))
			slices.Sort(rs)
			if len(rs) == 0 {
				if p.NotFormed != s.Iterations || p.RatioMean != 0 || p.RatioSD != 0 || p.CILow != 0 || p.CIHigh != 0 || p.PValue != 0 {
					t.Errorf("case %d E=%v: no brute resample formed, got %+v", it, s.E[i], p)
				}
				continue
			}
			if len(rs) == 1 {
				if p.NotFormed != notFormed[i] || !near(p.RatioMean, rs[0], 1e-11) || p.RatioSD != 0 {
					t.Errorf("case %d E=%v: one formed resample %v, got %+v", it, s.E[i], rs[0], p)
				}
				continue
			}
			// type 7 percentile written out
			q := func(pr float64) float64 {
				h := float64(len(rs)-1) * pr
				f := math.Floor(h)
				return rs[int(f)] + (h-f)*(rs[int(f)+1]-rs[int(f)])
			}
			if p.NotFormed != notFormed[i] || p.Iterations != s.Iterations || !near(p.RatioMean, m, 1e-11) ||
				!near(p.RatioSD, sd, 1e-9) || !near(p.CILow, q(0.025), 1e-11) || !near(p.CIHigh, q(0.975), 1e-11) ||
				p.PValue != float64(le)/float64(len(rs)) {
				t.Errorf("case %d E=%v: got %+v; brute mean %v sd %v ci %v %v p %v notformed %d",
					it, s.E[i], p, m, sd, q(0.025), q(0.975), float64(le)/float64(len(rs)), notFormed[i])
			}
		}
	}
}

// TestBruteForceCoverage guards against a brute-force test that skips all
// its cases or never meets the edge it is meant to meet.
func TestBruteForceCoverage(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	formed, notFormed := 0, 0
	for it := 0; it < 6; it++ {
		c := randomCase(r, 80, 15+r.IntN(20), 10, 12)
		if it%2 == 0 {
			for i := range c.test {
				c.test[i] = math.Max(0, c.test[i])
			}
		}
		_, a := build(t, c, nil, 64)
		sc, err := Score(a, c.train, c.test, Settings{E: []float64{0.05, 0.2}, Iterations: 40, Fraction: 0.7, Seed: uint64(100 + it)})
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range sc.PartialROC {
			formed += p.Iterations - p.NotFormed
			notFormed += p.NotFormed
		}
	}
	if formed < 50 || notFormed < 10 {
		t.Errorf("bootstrap brute-force cases have %d formed and %d unformed resamples; want both kinds", formed, notFormed)
	}
}
