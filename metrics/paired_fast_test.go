package metrics

import (
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"
)

// evalReference is Evaluator.eval as it was written before the fast path
// (fresh slices per call, counts per presence rather than per group,
// omission and Boyce windows read from each presence's value, the partial
// ROC by a walk over every group, the Boyce index through boyceIndex and
// Spearman): the fast path must give the same bits.
func (e *Evaluator) evalReference(count []int32) Values {
	var out Values
	out.Ratio = make([]float64, len(e.es))
	out.RatioOK = make([]bool, len(e.es))
	out.Omission = make([]float64, len(e.th))
	r := 0
	for _, c := range count {
		r += int(c)
	}
	out.N = r
	if r == 0 {
		return out
	}
	rf := float64(r)
	var sa, su float64
	groups := make([]int, len(e.p.j))
	for k, c := range count {
		if c == 0 {
			continue
		}
		sa += float64(c) * e.v[k]
		su += float64(c) * e.vu[k]
		groups[e.group[k]] += int(c)
	}
	out.AUC, out.AUCUnweighted = sa/rf, su/rf
	for i, ev := range e.es {
		pr := e.p.partialAreaReference(groups, r, ev)
		if pr.how == crossFormed {
			out.Ratio[i], out.RatioOK[i] = pr.model/pr.null, true
		}
	}
	for t, tj := range e.th {
		om := 0
		for k, c := range count {
			if e.p.j[e.group[k]] < tj {
				om += int(c)
			}
		}
		out.Omission[t] = float64(om) / rf
	}
	if len(e.win) >= 3 {
		diff := make([]int, len(e.win)+1)
		for k, c := range count {
			v := e.p.c.values[e.p.j[e.group[k]]]
			first, last := len(e.win), -1
			for w, bw := range e.win {
				if v >= bw.lo && v <= bw.hi {
					first = min(first, w)
					last = w
				}
			}
			if c == 0 || first > last {
				continue
			}
			diff[first] += int(c)
			diff[last+1] -= int(c)
		}
		ratio := make([]float64, len(e.win))
		mid := make([]float64, len(e.win))
		run := 0
		for w, bw := range e.win {
			run += diff[w]
			ratio[w] = bw.ratio(run, r) // (run / r) / share, exact for an exact window
			mid[w] = bw.mid
		}
		out.Boyce, out.BoyceOK, _ = boyceIndex(ratio, mid)
	}
	return out
}

// TestAverageRanksInto: the ranks equal Ranks' on values with many ties,
// few ties and none, zeros, in random order (the insertion sort runs out
// of moves and the bucket sort finishes) and in runs (ascending,
// descending, rising and falling waves, nearly ascending and nearly
// descending with zeros among them), with one value far above the rest,
// with one positive value, on no value, and (through the fallback) with a
// negative value.
func TestAverageRanksInto(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	var sc evalScratch
	if got := averageRanksInto(nil, &sc); len(got) != 0 {
		t.Errorf("ranks of no value: %v", got)
	}
	for trial := 0; trial < 1000; trial++ {
		n := 1 + r.IntN(120)
		levels := 1 + r.IntN(2*n)
		v := make([]float64, n)
		for i := range v {
			v[i] = float64(r.IntN(levels)) / 7
		}
		switch trial % 9 {
		case 0:
			v[0] = 0 // zeros among positives
		case 1:
			v[0] = -v[0] - 1 // a negative value: the fallback
		case 2:
			slices.Sort(v)
		case 3:
			slices.Sort(v)
			slices.Reverse(v)
		case 4: // waves of random length, some with a level stretch
			x, step := 1.0, 0.5
			for i := range v {
				if r.IntN(8) == 0 {
					step = float64(r.IntN(3)-1) * r.Float64()
				}
				x = math.Max(0, x+step)
				v[i] = x
			}
		case 5: // one value far above the rest: most in one bucket
			v[r.IntN(n)] = 1e300
		case 6: // one positive value, with and without zeros
			for i := range v {
				v[i] = 0.5 * float64(r.IntN(2))
			}
		case 7, 8: // nearly in order (a few swaps, some zeros), either way
			slices.Sort(v)
			if trial%9 == 8 {
				slices.Reverse(v)
			}
			for range 1 + r.IntN(n/4+1) {
				i, j := r.IntN(n), r.IntN(n)
				v[i], v[j] = v[j], v[i]
			}
			for range r.IntN(3) {
				v[r.IntN(n)] = 0
			}
		}
		if got, want := averageRanksInto(v, &sc), ranksOf(v); !reflect.DeepEqual(got, want) {
			t.Fatalf("ranks of %v: %v, want %v", v, got, want)
		}
	}
}

// TestBoyceRhoNearTies: boyceRho's order keys (run / share) give the
// Boyce index of Spearman on the ratios (run / r) / share bit for bit when
// many windows have nearly or exactly the same ratio: shares made from
// one share times the ratio of the runs, some moved by a few units in the
// last place (keys and ratios then round apart in either order, or to the
// same value), some shares and runs equal, and zeros.
func TestBoyceRhoNearTies(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 22))
	var sc evalScratch
	clusters := 0
	for trial := 0; trial < 2000; trial++ {
		n := 3 + r.IntN(60)
		runs := make([]int, n)
		for w := range runs {
			runs[w] = r.IntN(12)
		}
		total := 1 + r.IntN(40)
		for _, c := range runs {
			total += c
		}
		s0 := 0.01 + r.Float64()/4
		e := &Evaluator{win: make([]boyceWindow, n), invShare: make([]float64, n)}
		mid := make([]float64, n)
		for w := range e.win {
			share := s0
			switch r.IntN(4) {
			case 0, 1: // the ratio of window 0 up to a few units in the last place
				if runs[0] > 0 && runs[w] > 0 {
					share = s0 * float64(runs[w]) / float64(runs[0])
				}
				bits := int64(math.Float64bits(share)) + int64(r.IntN(7)-3)
				share = math.Float64frombits(uint64(bits))
			case 2:
				share = s0 * (0.5 + r.Float64())
			}
			mid[w] = float64(w) / 7
			e.win[w] = boyceWindow{mid: mid[w], share: share}
			e.invShare[w] = 1 / share
		}
		ry, _ := Ranks(mid)
		my := Mean(ry)
		for _, y := range ry {
			e.midDev = append(e.midDev, y-my)
			e.midSS += (y - my) * (y - my)
		}
		e.exactRho = true
		// Window w holds group w alone.
		before := make([]int, n+1)
		spans := make([][2]int32, n)
		for w, c := range runs {
			before[w+1] = before[w] + c
			spans[w] = [2]int32{int32(w), int32(w + 1)}
		}
		rf := float64(total)
		ratio := make([]float64, n)
		keys := make([]float64, n)
		for w, c := range runs {
			ratio[w] = (float64(c) / rf) / e.win[w].share
			keys[w] = float64(c) * e.invShare[w]
		}
		want, wantOK, _ := boyceIndex(ratio, mid)
		got, ok := e.boyceRho(keys, before, spans, rf, &sc)
		if got != want || ok != wantOK {
			t.Fatalf("trial %d: runs %v: boyceRho %v (%v), Spearman %v (%v)", trial, runs, got, ok, want, wantOK)
		}
		slices.Sort(keys)
		for i := 1; i < n; i++ {
			if keys[i-1] > 0 && math.Float64bits(keys[i])-math.Float64bits(keys[i-1]) <= nearKeys {
				clusters++
				break
			}
		}
	}
	if clusters < 100 {
		t.Errorf("only %d trials with keys closer than nearKeys: the test checks little of the clusters", clusters)
	}
}

// TestEvalFastPath: evalInto with reused memory, and BootSD's AUC-only
// loop, give bit for bit what the reference eval gives, on resamples
// (many ties among the Boyce ratios) of evaluators with few and many
// presences.
func TestEvalFastPath(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	for _, n := range []int{3, 12, 150} {
		t.Run(fmt.Sprintf("presences=%d", n), func(t *testing.T) {
			test := make([]float64, n)
			ids := make([]int, n)
			for i := range test {
				test[i] = math.Round(r.Float64()*40) / 40
				ids[i] = i
			}
			l, err := NewLayout(test, 256)
			if err != nil {
				t.Fatal(err)
			}
			a := l.NewAccumulator()
			for i := 0; i < 4000; i++ {
				a.Add(r.Float64(), int64(1+r.IntN(9)))
			}
			ev, err := NewEvaluator(a, test, ids, []float64{test[0], test[n/2]}, Settings{E: []float64{0.05, 0.3}, BoyceSteps: 30})
			if err != nil {
				t.Fatal(err)
			}
			d := Draws{N: n, B: 302, Seed: 5} // BootSD takes four resamples at a time, and two more
			var out Values
			var sc evalScratch
			count := make([]int32, n)
			var aucs []float64
			boyceDefined := 0
			for b := 0; b < d.B; b++ {
				d.fill(b, count)
				ev.evalInto(count, ev.group, &out, &sc)
				want := ev.evalReference(count)
				if got := ev.eval(count); !reflect.DeepEqual(got, want) {
					t.Fatalf("resample %d: eval %+v, reference %+v", b, got, want)
				}
				noAUC := want // evalInto leaves the AUCs alone
				noAUC.AUC, noAUC.AUCUnweighted = 0, 0
				if !reflect.DeepEqual(out, noAUC) {
					t.Fatalf("resample %d: fast %+v, reference %+v", b, out, noAUC)
				}
				if want.BoyceOK {
					boyceDefined++
				}
				if want.N > 0 {
					aucs = append(aucs, want.AUC)
				}
			}
			if boyceDefined == 0 {
				t.Error("no resample formed the Boyce index: the test compares nothing there")
			}
			_, wantSD := MeanSD(aucs)
			if sd, used := ev.BootSD(d); sd != wantSD || used != len(aucs) {
				t.Errorf("BootSD %v over %d resamples, reference %v over %d", sd, used, wantSD, len(aucs))
			}
		})
	}
}

// BenchmarkBootSD times the AUC's SD over B = 1000 full-size resamples of
// 500 test presences (every model x extent of a run computes one).
func BenchmarkBootSD(b *testing.B) {
	l, cells := benchLayout(b, 500)
	a := l.NewAccumulator()
	for _, v := range cells {
		a.Add(v, 1000)
	}
	test := l.Values()
	ids := make([]int, len(test))
	for i := range ids {
		ids[i] = i
	}
	ev, err := NewEvaluator(a, test, ids, nil, Settings{E: []float64{0.05, 0.1}})
	if err != nil {
		b.Fatal(err)
	}
	d := Draws{N: len(ids), B: 1000, Seed: 1}
	b.ReportAllocs()
	stop := startCPU(b)
	for i := 0; i < b.N; i++ {
		ev.BootSD(d)
	}
	stop()
}

// BenchmarkOwnResamples times one evaluator's memo of resampled scores
// (every score but the AUCs on each of B = 1000 full-size resamples of its
// 500 test presences: the work per model x extent that a run's paired
// comparisons cannot share), the evaluator of BenchmarkAverageRanks.
func BenchmarkOwnResamples(b *testing.B) {
	pr := newPairedRun(b, 1, 1, 500, false)
	ev := pr.evals[0][0]
	ev.ownResamples(pr.d, true) // the table of counts, drawn once
	b.ReportAllocs()
	stop := startCPU(b)
	for i := 0; i < b.N; i++ {
		ev.own = nil
		ev.ownResamples(pr.d, true)
	}
	stop()
}

// ranksOf is Ranks without the tie term.
func ranksOf(v []float64) []float64 {
	r, _ := Ranks(v)
	return r
}

// BenchmarkAverageRanks times the ranks of the Boyce index's 100 window
// ratios, taken from resamples of an evaluator of BenchmarkPairedRun.
func BenchmarkAverageRanks(b *testing.B) {
	pr := newPairedRun(b, 1, 1, 500, false)
	ev := pr.evals[0][0]
	rs := newResampler(pr.d)
	c := make([]int32, len(ev.ids))
	var v Values
	var sc evalScratch
	var ratios [][]float64
	for r := 0; r < 64; r++ {
		rs.gather(r, ev.ids, c)
		ev.evalInto(c, ev.group, &v, &sc)
		ratios = append(ratios, slices.Clone(sc.ratio))
	}
	b.ReportAllocs()
	stop := startCPU(b)
	for i := 0; i < b.N; i++ {
		averageRanksInto(ratios[i%len(ratios)], &sc)
	}
	stop()
}

// TestCompareMatchesReference: Compare's resampled differences (each side
// scored on its group set: every group, or only those holding a common
// presence, the counts gathered in group order) are bit for bit those of
// scoring every resample with evalReference on the counts of the common
// presences, for nested, overlapping and equal sets of presences with
// many ties (groups of several presences, some keeping only part of
// them), two models, drawn again and from the table, memo or not.
func TestCompareMatchesReference(t *testing.T) {
	r := rand.New(rand.NewPCG(61, 62))
	c := randomCase(r, 400, 120, 30, 40)
	s := Settings{E: []float64{0.05, 0.2}, BoyceSteps: 25}
	_, acc := build(t, c, nil, 128)
	ths := []float64{c.test[0], c.test[1], c.test[2]}
	sets := []func(int) bool{
		func(int) bool { return true },
		func(i int) bool { return i%3 != 0 },
		func(i int) bool { return i%2 == 0 || i < 10 },
		func(i int) bool { return i%7 < 2 },
	}
	mk := func(m, k int) *Evaluator { return evaluatorOnSet(t, acc, c.test, m, sets[k], ths, s) }
	d := Draws{N: len(c.test), B: 80, Seed: 13}
	reference := func(a, b *Evaluator) Comparison {
		inB := map[int]bool{}
		for _, id := range b.ids {
			inB[id] = true
		}
		common := map[int]bool{}
		for _, id := range a.ids {
			if inB[id] {
				common[id] = true
			}
		}
		fa, fb := a.evalReference(a.ones(common)), b.evalReference(b.ones(common))
		nE, nT := len(a.es), len(a.cut)
		var cmp Comparison
		cmp.PartialROC, cmp.Omission = make([]Resampled, nE), make([]Resampled, nT)
		for i := range cmp.PartialROC {
			cmp.PartialROC[i] = Resampled{A: fa.Ratio[i], B: fb.Ratio[i], Defined: fa.RatioOK[i] && fb.RatioOK[i], Scored: fa.RatioOK[i] && fb.RatioOK[i], Resamples: d.B}
		}
		for i := range cmp.Omission {
			cmp.Omission[i] = Resampled{A: fa.Omission[i], B: fb.Omission[i], Defined: fa.N > 0, Scored: fa.N > 0, Resamples: d.B}
		}
		cmp.Boyce = Resampled{A: fa.Boyce, B: fb.Boyce, Defined: fa.BoyceOK && fb.BoyceOK, Scored: fa.BoyceOK && fb.BoyceOK, Resamples: d.B}
		diffs := make([][]float64, nE+nT+1)
		same := make([][2]int, nT)
		for t := range same {
			same[t] = [2]int{t, t}
		}
		global := make([]int32, d.N)
		on := func(e *Evaluator) []int32 {
			cnt := make([]int32, len(e.ids))
			for k, id := range e.ids {
				if common[id] {
					cnt[k] = global[id]
				}
			}
			return cnt
		}
		for b2 := 0; b2 < d.B && len(common) > 0; b2++ {
			d.fill(b2, global)
			ra, rb := a.evalReference(on(a)), b.evalReference(on(b))
			appendResampleDiffs(diffs, &ra, &rb, same, true)
		}
		finishResampled(&cmp, diffs, d.B)
		return cmp
	}
	type side struct{ m, k int }
	pairs := [][2]side{{{0, 1}, {0, 0}}, {{0, 0}, {0, 1}}, {{0, 0}, {1, 0}}, {{0, 1}, {0, 2}}, {{1, 2}, {0, 3}}, {{0, 3}, {1, 1}}, {{1, 0}, {1, 0}}}
	ties, kept := false, false
	for _, memo := range []bool{false, true} {
		useOwnMemo, useDrawTable = memo, memo
		for i, p := range pairs {
			a, b := mk(p[0].m, p[0].k), mk(p[1].m, p[1].k)
			got, err := Compare(a, b, d)
			if err != nil {
				t.Fatal(err)
			}
			want := reference(a, b)
			if !reflect.DeepEqual(got.PartialROC, want.PartialROC) || !reflect.DeepEqual(got.Omission, want.Omission) || !reflect.DeepEqual(got.Boyce, want.Boyce) {
				t.Errorf("pair %d, memo %v:\n%+v %+v %+v\nreference\n%+v %+v %+v", i, memo, got.PartialROC, got.Omission, got.Boyce, want.PartialROC, want.Omission, want.Boyce)
			}
			ties = ties || a.all.of != nil
			var pa []int
			for k, id := range a.ids {
				if slices.Contains(b.ids, id) {
					pa = append(pa, k)
				}
			}
			if gs := a.groupSet(pa); len(gs.p.xge) < len(a.p.xge) && gs.of != nil {
				kept = true
			}
		}
	}
	useOwnMemo, useDrawTable = true, true
	if !ties || !kept {
		t.Errorf("ties %v, groups left out with ties kept %v: the test does not cover both", ties, kept)
	}
}

// TestScoreEvaluator: ScoreEvaluator gives Score's scores and the
// evaluator NewEvaluator makes from them (every field, down to the
// groups and Boyce windows), on cases with ties and fixed thresholds,
// and no evaluator on an extent that is not scored.
func TestScoreEvaluator(t *testing.T) {
	r := rand.New(rand.NewPCG(71, 72))
	for trial := 0; trial < 40; trial++ {
		c := randomCase(r, 50+r.IntN(300), 5+r.IntN(60), 3+r.IntN(20), 1+r.IntN(60))
		fixed := []float64{c.test[0]}
		_, a := build(t, c, fixed, 64)
		ids := r.Perm(len(c.test) + 10)[:len(c.test)]
		s := Settings{E: []float64{0.05, 0.2}, Iterations: 50, Seed: uint64(trial), FixedThresholds: fixed, BoyceSteps: 10 + r.IntN(50)}
		want, err := Score(a, c.train, c.test, s)
		if err != nil {
			t.Fatal(err)
		}
		got, ev, err := ScoreEvaluator(a, c.train, c.test, ids, s)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, want) {
			t.Fatalf("trial %d: ScoreEvaluator's scores differ from Score's", trial)
		}
		if !want.Scored {
			if ev != nil {
				t.Errorf("trial %d: an evaluator on an extent not scored", trial)
			}
			continue
		}
		ths := make([]float64, len(want.Thresholds))
		for i, th := range want.Thresholds {
			ths[i] = th.Value
		}
		wantEv, err := NewEvaluator(a, c.test, ids, ths, s)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(ev, wantEv) {
			t.Fatalf("trial %d: ScoreEvaluator's evaluator differs from NewEvaluator's", trial)
		}
	}
	var empty testCase
	empty.test = []float64{1}
	_, a := build(t, empty, nil, 16)
	if sc, ev, err := ScoreEvaluator(a, nil, empty.test, []int{0}, Settings{}); err != nil || sc.Scored || ev != nil {
		t.Errorf("empty extent: scored %v, evaluator %v, err %v", sc.Scored, ev, err)
	}
}
