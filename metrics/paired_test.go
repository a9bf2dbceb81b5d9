package metrics

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"reflect"
	"runtime"
	"slices"
	"sync"
	"testing"
)

// TestDeLongAgainstPROC compares DeLong's variance of the unweighted AUC
// (cells as a sample, each counted once) with pROC's
// var(roc, method = "delong") from testdata/metrics/golden.R, on the
// Hanley & McNeil (1982) rating data and the generated cases. pROC has no
// weights, so each background row is replicated weight times as cells of
// one (arbitrary) area each.
func TestDeLongAgainstPROC(t *testing.T) {
	cases := loadCases(t)
	checked := 0
	for name, rows := range loadProc(t) {
		for _, r := range rows {
			if r.quantity != "delong_var" {
				continue
			}
			c := cases[name]
			var rep testCase
			for i, v := range c.bgV {
				for k := int64(0); k < c.bgW[i]; k++ {
					rep.bgV = append(rep.bgV, v)
					rep.bgW = append(rep.bgW, 7)
				}
			}
			rep.test, rep.train = c.test, c.train
			_, a := build(t, rep, nil, 64)
			sc, err := Score(a, rep.train, rep.test, quick(0.05))
			if err != nil {
				t.Fatal(err)
			}
			// Source: pROC var(roc, method = "delong").
			if math.Abs(sc.AUCUnweightedVarDeLong-r.value) > 1e-9*r.value {
				t.Errorf("%s: DeLong variance %.17g, pROC %.17g", name, sc.AUCUnweightedVarDeLong, r.value)
			}
			checked++
		}
	}
	if checked < 8 {
		t.Errorf("checked %d DeLong variances, want at least 8", checked)
	}
}

// pairedWant is a paired difference of golden.py: mean, SE and the 95%
// interval mean -+ t_{0.975, n-1} SE (the t quantile from
// scipy.special.betaincinv, which agrees with R's qt to about 1e-15 here).
type pairedWant struct{ Diff, SE, Low, High float64 }

// pairedCase mirrors one case of paired_golden.json (golden.py).
type pairedCase struct {
	Name           string
	Weights        []int64
	A, B           []int64
	Inner          []int
	Points         []int
	ExtentDiff     pairedWant `json:"extent_diff"`
	ModelDiffOuter pairedWant `json:"model_diff_outer"`
	ModelDiffInner pairedWant `json:"model_diff_inner"`
	Scores         map[string]struct {
		Points     []int
		Placements []float64
		AUC, SE    float64
	}
}

// TestPairedAgainstNumpy checks placements, their standard errors and the
// paired differences between extents and between models on area-weighted
// cases against the numpy implementation in golden.py (paired_golden.json),
// to 1e-12.
func TestPairedAgainstNumpy(t *testing.T) {
	data, err := os.ReadFile(goldenDir + "paired_golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g struct{ Cases []pairedCase }
	if err := json.Unmarshal(data, &g); err != nil {
		t.Fatal(err)
	}
	if len(g.Cases) < 3 {
		t.Fatalf("%d paired cases", len(g.Cases))
	}
	for _, c := range g.Cases {
		t.Run(c.Name, func(t *testing.T) {
			evals := map[string]*Evaluator{}
			for _, model := range []string{"a", "b"} {
				vals := c.A
				if model == "b" {
					vals = c.B
				}
				f := make([]float64, len(vals))
				for i, v := range vals {
					f[i] = float64(v)
				}
				var pv []float64
				for _, p := range c.Points {
					pv = append(pv, f[p])
				}
				l, err := NewLayout(pv, 64)
				if err != nil {
					t.Fatal(err)
				}
				for _, ext := range []string{"outer", "inner"} {
					acc := l.NewAccumulator()
					for i, v := range f {
						if ext == "outer" || c.Inner[i] == 1 {
							acc.Add(v, c.Weights[i])
						}
					}
					w := c.Scores[model+"/"+ext]
					var test []float64
					for _, i := range w.Points {
						test = append(test, pv[i])
					}
					sc, err := Score(acc, nil, test, quick(0.1))
					if err != nil {
						t.Fatal(err)
					}
					for i := range test {
						if !near(sc.Placements[i], w.Placements[i], 1e-12) {
							t.Errorf("%s/%s placement %d = %.17g, numpy %.17g", model, ext, i, sc.Placements[i], w.Placements[i])
						}
					}
					if !near(sc.AUC, w.AUC, 1e-12) || !near(sc.AUCSE, w.SE, 1e-12) {
						t.Errorf("%s/%s AUC %.17g SE %.17g, numpy %.17g %.17g", model, ext, sc.AUC, sc.AUCSE, w.AUC, w.SE)
					}
					ev, err := NewEvaluator(acc, test, w.Points, nil, quick(0.1))
					if err != nil {
						t.Fatal(err)
					}
					evals[model+"/"+ext] = ev
				}
			}
			d := Draws{N: len(c.Points), B: 20, Seed: 5}
			// The interval's ends to 1e-12 plus the t quantile's tolerance
			// against R (TestT975AgainstR) times the SE.
			check := func(what string, a, b *Evaluator, want pairedWant) {
				cmp, err := Compare(a, b, d)
				if err != nil {
					t.Fatal(err)
				}
				iv := cmp.AUC
				if !iv.Defined || !near(iv.Diff, want.Diff, 1e-12) || !near(iv.SE, want.SE, 1e-12) ||
					!near(iv.Low, want.Low, 1e-12+3e-10*want.SE) || !near(iv.High, want.High, 1e-12+3e-10*want.SE) {
					t.Errorf("%s: %+v, numpy diff %.17g SE %.17g interval %.17g to %.17g", what, iv, want.Diff, want.SE, want.Low, want.High)
				}
			}
			check("inner minus outer (model a)", evals["a/inner"], evals["a/outer"], c.ExtentDiff)
			check("a minus b on outer", evals["a/outer"], evals["b/outer"], c.ModelDiffOuter)
			check("a minus b on inner", evals["a/inner"], evals["b/inner"], c.ModelDiffInner)
		})
	}
}

// TestPairedProperties: an extent compared with itself differs by exactly
// 0 with SE 0 for every score; cells added below every presence raise every
// placement by the known amount.
func TestPairedProperties(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 22))
	c := randomCase(r, 400, 60, 30, 1000)
	for i := range c.test {
		c.test[i] = math.Max(1, c.test[i])
	}
	ids := make([]int, len(c.test))
	for i := range ids {
		ids[i] = i
	}
	s := Settings{E: []float64{0.05, 0.2}, BoyceSteps: 30}
	_, a := build(t, c, nil, 256)
	ths := []float64{c.test[0], c.test[1]}
	e1, err := NewEvaluator(a, c.test, ids, ths, s)
	if err != nil {
		t.Fatal(err)
	}
	cmp, err := Compare(e1, e1, Draws{N: len(ids), B: 50, Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	if cmp.Common != len(ids) || cmp.AUC.Diff != 0 || cmp.AUC.SE != 0 || cmp.AUCUnweighted.Diff != 0 || cmp.AUCUnweighted.SE != 0 {
		t.Errorf("self comparison of AUC: %+v %+v", cmp.AUC, cmp.AUCUnweighted)
	}
	for _, x := range append(append(slices.Clone(cmp.PartialROC), cmp.Omission...), cmp.Boyce) {
		if x.Diff != 0 || x.SD != 0 || x.Low != 0 || x.High != 0 {
			t.Errorf("self comparison of a resampled score: %+v", x)
		}
	}

	// Adding cells of area A_add below every presence (value 0; every test
	// value is >= 1) turns V_i = (W(<v)+W(=v)/2)/W into
	// (W(<v)+A_add+W(=v)/2)/(W+A_add), so
	// V'_i = (V_i W + A_add)/(W + A_add) (algebra from the definition).
	sc, err := Score(a, nil, c.test, quick(0.1))
	if err != nil {
		t.Fatal(err)
	}
	b := a.Clone()
	const add = 12345
	for k := 0; k < 5; k++ {
		b.Add(0, add)
	}
	sc2, err := Score(b, nil, c.test, quick(0.1))
	if err != nil {
		t.Fatal(err)
	}
	W, A := float64(a.Area()), float64(5*add)
	for i, v := range sc.Placements {
		if want := (v*W + A) / (W + A); !near(sc2.Placements[i], want, 1e-13) || !(sc2.Placements[i] > v) {
			t.Fatalf("placement %d: %v -> %v, want %v", i, v, sc2.Placements[i], want)
		}
	}
}

// TestBootSDMatchesPlacementSE: on a large case the SD of the AUC over
// full-size paired resamples agrees with the placement SE within Monte
// Carlo error. With B resamples the SD's own relative standard error is
// about 1/sqrt(2(B-1)) (normal theory), 3.2% for B = 500; we allow 4 such
// errors plus 1/n for the bootstrap's (n-1)/n bias (our tolerance).
func TestBootSDMatchesPlacementSE(t *testing.T) {
	r := rand.New(rand.NewPCG(41, 42))
	c := randomCase(r, 3000, 400, 10, 100000)
	ids := make([]int, len(c.test))
	for i := range ids {
		ids[i] = i
	}
	_, a := build(t, c, nil, 256)
	sc, err := Score(a, nil, c.test, quick(0.1))
	if err != nil {
		t.Fatal(err)
	}
	ev, err := NewEvaluator(a, c.test, ids, nil, quick(0.1))
	if err != nil {
		t.Fatal(err)
	}
	const B = 500
	sd, used := ev.BootSD(Draws{N: len(ids), B: B, Seed: 9})
	tol := 4/math.Sqrt(2*(B-1)) + 1/float64(len(ids))
	if used != B || math.Abs(sd/sc.AUCSE-1) > tol {
		t.Errorf("bootstrap SD %v over %d resamples, placement SE %v: ratio %v, want within %v of 1", sd, used, sc.AUCSE, sd/sc.AUCSE, tol)
	}
	// The evaluator reproduces Score on the full set.
	full := ev.Full()
	if !near(full.AUC, sc.AUC, 1e-12) || !near(full.AUCUnweighted, sc.AUCUnweighted, 1e-12) {
		t.Errorf("evaluator AUC %v/%v, Score %v/%v", full.AUC, full.AUCUnweighted, sc.AUC, sc.AUCUnweighted)
	}
}

// TestEvaluatorMatchesScore: the evaluator's partial ROC, omission and
// Boyce on the full set equal Score's.
func TestEvaluatorMatchesScore(t *testing.T) {
	r := rand.New(rand.NewPCG(51, 52))
	for it := 0; it < 10; it++ {
		c := randomCase(r, 300, 20+r.IntN(40), 15, 50+r.IntN(5000))
		_, a := build(t, c, []float64{25}, 512)
		s := Settings{E: []float64{0.05, 0.1, 0.3}, Iterations: 20, FixedThresholds: []float64{25}}
		sc, err := Score(a, c.train, c.test, s)
		if err != nil {
			t.Fatal(err)
		}
		if !sc.Scored {
			continue
		}
		var ths []float64
		for _, th := range sc.Thresholds {
			ths = append(ths, th.Value)
		}
		ids := make([]int, len(c.test))
		for i := range ids {
			ids[i] = len(ids) - 1 - i
		}
		ev, err := NewEvaluator(a, c.test, ids, ths, s)
		if err != nil {
			t.Fatal(err)
		}
		f := ev.Full()
		for i, p := range sc.PartialROC {
			if f.RatioOK[i] != p.Formed || f.Ratio[i] != p.Ratio {
				t.Errorf("case %d E=%v: evaluator %v/%v, Score %v/%v", it, p.E, f.Ratio[i], f.RatioOK[i], p.Ratio, p.Formed)
			}
		}
		for i, th := range sc.Thresholds {
			if f.Omission[i] != th.Omission {
				t.Errorf("case %d %s: omission %v, Score %v", it, th.Name, f.Omission[i], th.Omission)
			}
		}
		if f.BoyceOK != sc.Boyce.Defined || f.Boyce != sc.Boyce.Index {
			t.Errorf("case %d: Boyce %v/%v, Score %v/%v", it, f.Boyce, f.BoyceOK, sc.Boyce.Index, sc.Boyce.Defined)
		}
	}
}

// TestCompareMemoMatchesDirect: comparisons that take a side's resampled
// scores from its memo (every presence of that side common: nested
// extents, models on one extent) and the counts from the table of the
// draws give exactly, bit for bit, what drawing and evaluating every
// resample again gives, for nested, equal and partly overlapping sets of
// test presences and for two models, in any order of calls; so does
// BootSD.
func TestCompareMemoMatchesDirect(t *testing.T) {
	r := rand.New(rand.NewPCG(41, 42))
	c := randomCase(r, 300, 80, 30, 200)
	s := Settings{E: []float64{0.05, 0.2}, BoyceSteps: 20}
	_, acc := build(t, c, nil, 128)
	ths := []float64{c.test[0], c.test[1]}
	sets := []func(int) bool{
		func(int) bool { return true },                 // all
		func(i int) bool { return i%3 != 0 },           // nested in all
		func(i int) bool { return i%2 == 0 || i < 10 }, // overlaps the second
	}
	// mk returns the evaluator of model m (0: the test values; 1: another
	// model, the values of other presences) on test set k.
	mk := func(m, k int) *Evaluator { return evaluatorOnSet(t, acc, c.test, m, sets[k], ths, s) }
	d := Draws{N: len(c.test), B: 60, Seed: 9}
	type side struct{ m, k int }
	pairs := [][2]side{{{0, 1}, {0, 0}}, {{0, 0}, {0, 1}}, {{0, 0}, {1, 0}}, {{0, 1}, {0, 2}}, {{1, 2}, {0, 0}}, {{0, 1}, {1, 1}}, {{1, 0}, {1, 0}}}
	want := make([]Comparison, len(pairs))
	wantSD := make([]float64, len(pairs))
	useOwnMemo, useDrawTable = false, false
	for i, p := range pairs {
		var err error
		if want[i], err = Compare(mk(p[0].m, p[0].k), mk(p[1].m, p[1].k), d); err != nil {
			t.Fatal(err)
		}
		wantSD[i], _ = mk(p[0].m, p[0].k).BootSD(d)
	}
	useOwnMemo, useDrawTable = true, true
	if d.table() == nil {
		t.Fatal("the draws have no table: the test compares nothing")
	}
	shared := map[side]*Evaluator{}
	ev := func(sd side) *Evaluator {
		if shared[sd] == nil {
			shared[sd] = mk(sd.m, sd.k)
		}
		return shared[sd]
	}
	nonzero := false
	for rep := 0; rep < 2; rep++ { // the second round reads every memo
		for i := len(pairs) - 1; i >= 0; i-- {
			got, err := Compare(ev(pairs[i][0]), ev(pairs[i][1]), d)
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(got, want[i]) {
				t.Errorf("pair %d, round %d: with the memo\n%+v\nwithout\n%+v", i, rep, got, want[i])
			}
			if sd, _ := ev(pairs[i][0]).BootSD(d); sd != wantSD[i] {
				t.Errorf("pair %d, round %d: BootSD %v from the table, %v drawing again", i, rep, sd, wantSD[i])
			}
			nonzero = nonzero || got.Boyce.SD != 0 || got.PartialROC[0].SD != 0 || got.Omission[0].SD != 0
		}
	}
	if !nonzero {
		t.Error("no comparison had resampled differences: the test compares nothing")
	}
}

// TestCompareConcurrent: comparisons and BootSD run at once on shared
// evaluators (as the pipeline's workers do: one memo and one table of
// draws for all) give what they give one at a time, also after the
// table was collected and drawn again. Run it with -race.
func TestCompareConcurrent(t *testing.T) {
	r := rand.New(rand.NewPCG(43, 44))
	c := randomCase(r, 200, 60, 20, 100)
	s := Settings{E: []float64{0.05, 0.2}, BoyceSteps: 20}
	_, acc := build(t, c, nil, 128)
	mk := func(keep func(int) bool) *Evaluator {
		var test []float64
		var ids []int
		for i, v := range c.test {
			if keep(i) {
				test, ids = append(test, v), append(ids, i)
			}
		}
		e, err := NewEvaluator(acc, test, ids, []float64{c.test[0]}, s)
		if err != nil {
			t.Fatal(err)
		}
		return e
	}
	d := Draws{N: len(c.test), B: 40, Seed: 3}
	keeps := []func(int) bool{
		func(int) bool { return true },
		func(i int) bool { return i%2 == 0 },
		func(i int) bool { return i%3 != 1 },
	}
	evals := make([]*Evaluator, len(keeps))
	for i, k := range keeps {
		evals[i] = mk(k)
	}
	type job struct{ a, b int }
	var jobs []job
	for a := range evals {
		for b := range evals {
			if a != b {
				jobs = append(jobs, job{a, b})
			}
		}
	}
	want := make([]Comparison, len(jobs))
	for i, j := range jobs {
		var err error
		if want[i], err = Compare(mk(keeps[j.a]), mk(keeps[j.b]), d); err != nil {
			t.Fatal(err)
		}
	}
	wantSD := make([]float64, len(evals))
	for i := range evals {
		wantSD[i], _ = mk(keeps[i]).BootSD(d)
	}
	runtime.GC() // the table of d may go and be drawn again
	got := make([]Comparison, len(jobs))
	gotSD := make([]float64, len(evals))
	var wg sync.WaitGroup
	for w := 0; w < 4; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := w; i < len(jobs); i += 4 {
				cmp, err := Compare(evals[jobs[i].a], evals[jobs[i].b], d)
				if err != nil {
					t.Error(err)
					return
				}
				got[i] = cmp
			}
			if w < len(evals) {
				gotSD[w], _ = evals[w].BootSD(d)
			}
		}()
	}
	wg.Wait()
	for i := range jobs {
		if !reflect.DeepEqual(got[i], want[i]) {
			t.Errorf("comparison %d (%d vs %d) at once:\n%+v\none at a time:\n%+v", i, jobs[i].a, jobs[i].b, got[i], want[i])
		}
	}
	for i := range evals {
		if gotSD[i] != wantSD[i] {
			t.Errorf("BootSD of evaluator %d at once %v, one at a time %v", i, gotSD[i], wantSD[i])
		}
	}
}

// evaluatorOnSet returns the evaluator of model m on the presences i of
// test that keep(i) holds: model 0 scores them with their own values,
// model 1 with the values of other presences (test[(i+5) mod n]), so the
// two models rank the same presences differently.
func evaluatorOnSet(t *testing.T, acc *Accumulator, test []float64, m int, keep func(int) bool, ths []float64, s Settings) *Evaluator {
	t.Helper()
	var vals []float64
	var ids []int
	for i, v := range test {
		if keep(i) {
			if m == 1 {
				v = test[(i+5)%len(test)]
			}
			vals, ids = append(vals, v), append(ids, i)
		}
	}
	e, err := NewEvaluator(acc, vals, ids, ths, s)
	if err != nil {
		t.Fatal(err)
	}
	return e
}
