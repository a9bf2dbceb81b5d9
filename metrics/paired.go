package metrics

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"sync"

	"gonum.org/v1/gonum/stat/distuv"
)

// T975 returns the 0.975 quantile of Student's t distribution with df
// degrees of freedom (df >= 1), the multiplier of the 95% intervals of
// paired placement differences (PairedPlacements). It is gonum's
// distuv.StudentsT quantile, which agrees with R's qt to a relative 1e-10
// (TestT975AgainstR).
func T975(df int) float64 {
	return distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(df)}.Quantile(0.975)
}

// Interval is a paired difference A - B with its standard error and 95%
// interval. Defined is false (all numbers 0) when fewer than two common
// test presences exist.
type Interval struct {
	// N is the number of common test presences the difference is taken on.
	N int
	// Diff is the mean of D_i; SE its standard error; Low and High the 95%
	// interval.
	Diff, SE, Low, High float64
	Defined             bool
}

// PairedPlacements returns the paired difference of two sets of placements
// of the same test presences (a[i] and b[i] belong to presence i):
//
//	D_i  = a_i - b_i
//	Diff = mean(D)
//	SE   = sqrt( sum_i (D_i - Diff)^2 / (n (n - 1)) )
//	95% interval: Diff -+ t_{0.975, n-1} SE
//
// Because each AUC is the mean of its placements, Diff is the difference of
// the two AUCs on these presences, and SE is the presence part of DeLong's
// variance of a difference of correlated AUCs with the backgrounds taken
// as complete populations (DeLong, DeLong & Clarke-Pearson 1988,
// Biometrics 44:837-845). With the backgrounds complete, the test
// presences are the only sample, and Diff is the mean of n paired
// differences: the interval is the one-sample Student t interval of that
// mean (Student 1908, Biometrika 6:1-25), where the normal quantile of
// DeLong's large-sample interval covers less than 95% at small n (0.91 at
// n = 10 in TestPairedIntervalCoverage; the t quantile 0.925 to 0.957 over
// the landscapes of TestCoverageSweep). It panics when the lengths differ.
func PairedPlacements(a, b []float64) Interval {
	if len(a) != len(b) {
		panic("metrics: PairedPlacements: length mismatch")
	}
	n := len(a)
	iv := Interval{N: n}
	if n < 2 {
		return iv
	}
	var s float64
	for i := range a {
		s += a[i] - b[i]
	}
	m := s / float64(n)
	var ss float64
	for i := range a {
		d := a[i] - b[i] - m
		ss += d * d
	}
	iv.Diff = m
	iv.SE = math.Sqrt(ss / (float64(n) * float64(n-1)))
	q := T975(n - 1)
	iv.Low, iv.High = m-q*iv.SE, m+q*iv.SE
	iv.Defined = true
	return iv
}

// Evaluator scores one model on one extent for any multiset of its test
// presences: placements (for AUC), partial ROC ratios, omission rates at
// fixed threshold values and the Boyce index, all from quantities fixed by
// the background. Build one with NewEvaluator; it holds no cells and is
// safe for concurrent use.
type Evaluator struct {
	ids   []int     // global index of each presence, ascending
	order []int     // order[k]: position in the caller's test slice of ids[k]
	v, vu []float64 // placements (area, cells), by k
	p     *presences
	group []int // group of presence k in p
	es    []float64
	// th[t] is the layout index of threshold t; the presences below it
	// are those of groups cut[t] onwards (groups run in descending value).
	th, cut []int
	// Boyce: used windows and, per window, the groups whose value it
	// holds, groups winGroups[w][0] to winGroups[w][1]-1 (the groups run
	// in descending value and a window is an interval of values).
	win       []boyceWindow
	winGroups [][2]int32
	// The window midpoints' side of the Boyce index's Spearman correlation,
	// fixed per evaluator: their average ranks centred on their mean, and
	// the sum of squares, summed in window order as Spearman does.
	midDev []float64
	midSS  float64
	// invShare[w] is 1/share of window w: boyceRho's order keys.
	invShare []float64
	// exactRho: every midDev is a multiple of 1/2 and there are at most
	// maxExactWindows windows, so the Spearman sums are exact in float64
	// (boyceRho).
	exactRho bool
	// all is the group set of every presence (every group, in order).
	all *groupSet
	// own is the memo of ownResamples (the scores on each resample of
	// one Draws with all of the evaluator's presences), made under
	// ownMu; a memo once handed out is never changed (a new one
	// replaces it).
	ownMu sync.Mutex
	own   *ownMemo
	// tab keeps the Draws' table of counts alive while the evaluator
	// lives (see Draws.table), set under ownMu.
	tab *drawTable
	// full is the memo of Full (fullValues).
	fullOnce sync.Once
	full     Values
}

// groupSet lays out the resamples of a subset of an evaluator's presences
// (all of them, or those a comparison has in common): the groups that
// hold some presence of the subset, in the evaluator's order (descending
// value), renumbered 0, 1, ... Every score but the AUCs depends on a
// multiset of presences only through its count per group, and a group
// holding none of the subset has count 0 in every resample, which no
// score sees (partialAreas skips empty groups, and the omission rates and
// the Boyce index read the presences before a group, which such a group
// leaves as they are), so leaving those groups out gives the same
// operations on the same numbers.
type groupSet struct {
	// p holds the kept groups' areas (xgt, xge) and their count in the
	// evaluator's whole set (count, for partialArea's rule on ties).
	p *presences
	// ids are the global indices of the subset's presences, by kept
	// group; of[j] is the kept group of ids[j], nil when each kept group
	// holds exactly one (then of[j] = j).
	ids []int
	of  []int32
	// cut[t] is the first kept group below threshold t; winGroups[w] the
	// kept groups window w holds (as in Evaluator).
	cut       []int
	winGroups [][2]int32
}

// groupSet returns the group set of the presences at positions keep of
// e.ids (ascending).
func (e *Evaluator) groupSet(keep []int) *groupSet {
	nG := len(e.p.j)
	// inSet[g]: presences of the subset in group g.
	inSet := make([]int32, nG)
	for _, k := range keep {
		inSet[e.group[k]]++
	}
	// kBefore[g]: kept groups before group g.
	kBefore := make([]int, nG+1)
	kept := 0
	for _, c := range inSet {
		if c > 0 {
			kept++
		}
	}
	gs := &groupSet{p: &presences{xgt: make([]float64, 0, kept), xge: make([]float64, 0, kept), count: make([]int, 0, kept)}}
	for g, c := range inSet {
		kBefore[g+1] = kBefore[g]
		if c > 0 {
			kBefore[g+1]++
			gs.p.xgt = append(gs.p.xgt, e.p.xgt[g])
			gs.p.xge = append(gs.p.xge, e.p.xge[g])
			gs.p.count = append(gs.p.count, e.p.count[g])
		}
	}
	// The subset's ids by group: a counting sort on the groups.
	pos := make([]int32, nG+1)
	for g, c := range inSet {
		pos[g+1] = pos[g] + c
	}
	gs.ids = make([]int, len(keep))
	for _, k := range keep {
		g := e.group[k]
		gs.ids[pos[g]] = e.ids[k]
		pos[g]++
	}
	if len(gs.ids) > len(gs.p.xge) { // some kept group holds several
		gs.of = make([]int32, 0, len(gs.ids))
		for g, c := range inSet {
			for range c {
				gs.of = append(gs.of, int32(kBefore[g]))
			}
		}
	}
	gs.cut = make([]int, len(e.cut))
	for t, c := range e.cut {
		gs.cut[t] = kBefore[c]
	}
	gs.winGroups = make([][2]int32, len(e.winGroups))
	for w, span := range e.winGroups {
		gs.winGroups[w] = [2]int32{int32(kBefore[span[0]]), int32(kBefore[span[1]])}
	}
	return gs
}

// gather sets groups[g] to the copies drawn in resample b of the presences
// of kept group g and before[g] to those of kept groups 0..g-1 (before[G]
// to all of them, for G kept groups), and returns their total: one walk
// over the set's presences in group order (and one over the groups when
// some hold several presences).
func (gs *groupSet) gather(rs *resampler, b int, groups, before []int) int {
	if rs.tab != nil {
		return gatherCounts(rs.tab.row(b), gs.ids, gs.of, groups, before)
	}
	rs.draw(b)
	return gatherCounts(rs.global, gs.ids, gs.of, groups, before)
}

// gatherCounts is groupSet.gather on the counts of one resample, by
// global index.
func gatherCounts[T uint8 | int32](row []T, ids []int, of []int32, groups, before []int) int {
	before = before[:len(groups)+1]
	acc := 0
	if of == nil {
		ids = ids[:len(groups)]
		for g, id := range ids {
			c := int(row[id])
			groups[g] = c
			before[g] = acc
			acc += c
		}
	} else {
		clear(groups)
		of = of[:len(ids)]
		for j, id := range ids {
			groups[of[j]] += int(row[id])
		}
		for g, c := range groups {
			before[g] = acc
			acc += c
		}
	}
	before[len(groups)] = acc
	return acc
}

// useOwnMemo is false only in the test that checks the memo against
// evaluating every resample again.
var useOwnMemo = true

// ownMemo holds an evaluator's scores on the B resamples of one Draws
// restricted to its own presences, flattened per resample: nE partial ROC
// ratios (ok[r*nE+i]), nT omission rates, the Boyce index (boyceOK[r];
// only withBoyce) and the number of presences drawn (n[r]).
// 8(nE+nT+1)+nE+9 bytes per resample with the Boyce index, 8(nE+nT+1)+nE
// without.
type ownMemo struct {
	d           Draws
	ratio, om   []float64
	boyce       []float64
	ok, boyceOK []bool
	n           []int
	// withBoyce is whether the memo holds the Boyce index of each
	// resample (boyce and boyceOK; left empty when no comparison asked
	// for it, CompareOptions.BoyceUnresampled).
	withBoyce bool
}

// ownResamples returns the evaluator's memo for d, computing it on the
// first call: every comparison in which all of the evaluator's presences
// are common evaluates exactly these resamples (the counts of its
// presences in each resample of d, whatever the other side is), so the
// memo gives bit for bit what evaluating them again would. Safe for
// concurrent use; a call with other Draws, or asking for the Boyce index
// (boyce) of a memo made without it, recomputes it.
func (e *Evaluator) ownResamples(d Draws, boyce bool) *ownMemo {
	e.ownMu.Lock()
	defer e.ownMu.Unlock()
	if m := e.own; m != nil && m.d == d && (m.withBoyce || !boyce) {
		return m
	}
	nE, nT := len(e.es), len(e.cut)
	m := &ownMemo{d: d, withBoyce: boyce}
	e.own = m
	m.ratio, m.ok = make([]float64, d.B*nE), make([]bool, d.B*nE)
	m.om = make([]float64, d.B*nT)
	m.n = make([]int, d.B)
	if boyce {
		m.boyce, m.boyceOK = make([]float64, d.B), make([]bool, d.B)
	}
	rs := newResampler(d)
	e.tab = rs.tab
	gs := e.all
	groups, before := make([]int, len(gs.p.xge)), make([]int, len(gs.p.xge)+1)
	var v Values
	var sc evalScratch
	for r := 0; r < d.B; r++ {
		e.evalGroups(gs, groups, before, gs.gather(rs, r, groups, before), &v, &sc, boyce, true)
		copy(m.ratio[r*nE:], v.Ratio)
		copy(m.ok[r*nE:], v.RatioOK)
		copy(m.om[r*nT:], v.Omission)
		m.n[r] = v.N
		if boyce {
			m.boyce[r], m.boyceOK[r] = v.Boyce, v.BoyceOK
		}
	}
	return m
}

// load sets v to resample r of the memo (its slices point into the memo).
func (m *ownMemo) load(r, nE, nT int, v *Values) {
	v.Ratio, v.RatioOK = m.ratio[r*nE:(r+1)*nE], m.ok[r*nE:(r+1)*nE]
	v.Omission = m.om[r*nT : (r+1)*nT]
	v.Boyce, v.BoyceOK, v.N = 0, false, m.n[r]
	if m.withBoyce {
		v.Boyce, v.BoyceOK = m.boyce[r], m.boyceOK[r]
	}
}

// evalScratch is the working memory of one eval call, reused across
// resamples.
type evalScratch struct {
	groups, before   []int
	keys, sortedKeys []uint64
	pos, sortedPos   []int32
	start, bucket    []int32
	ratio, ranks     []float64
	// The bucket function of sortPositive: spanLo and spanScale, set once
	// spanSet.
	spanSet   bool
	spanLo    uint64
	spanScale float64
	// The partial ROC areas per E and their scratch.
	partial []partialResult
	area    areaScratch
}

// NewEvaluator prepares the resampled scores of one model on one extent. a
// is the extent's accumulator, test the model's values at the extent's test
// presences and ids their global indices in 0..N-1 of the run's Draws
// (distinct). thresholds are the threshold values whose omission is
// resampled (for example the Values of Scores.Thresholds); each must be a
// layout value. s supplies E, BoyceWidth and BoyceSteps.
func NewEvaluator(a *Accumulator, test []float64, ids []int, thresholds []float64, s Settings) (*Evaluator, error) {
	return newEvaluator(a, test, ids, thresholds, s, nil)
}

// newEvaluator is NewEvaluator, taking what Score computed for the same
// accumulator, test values and settings from parts when not nil.
func newEvaluator(a *Accumulator, test []float64, ids []int, thresholds []float64, s Settings, parts *scored) (*Evaluator, error) {
	if a == nil {
		return nil, errors.New("metrics: NewEvaluator: nil accumulator")
	}
	if len(ids) != len(test) {
		return nil, fmt.Errorf("metrics: NewEvaluator: %d ids for %d test presences", len(ids), len(test))
	}
	if err := s.Validate(); err != nil {
		return nil, err
	}
	s = s.WithDefaults()
	if a.cells == 0 || a.area == 0 || len(test) == 0 || a.min == a.max {
		return nil, errors.New("metrics: NewEvaluator: the extent cannot be scored (no background, no test presences or constant suitability)")
	}
	l := a.layout
	var idx []int
	var err error
	if parts != nil {
		idx = parts.testIdx
	} else if idx, err = layoutIndices(l, test, "test presence"); err != nil {
		return nil, err
	}
	thIdx, err := layoutIndices(l, thresholds, "threshold")
	if err != nil {
		return nil, err
	}
	n := len(test)
	order := make([]int, n)
	for i := range order {
		order[i] = i
	}
	slices.SortFunc(order, func(x, y int) int { return ids[x] - ids[y] })
	e := &Evaluator{ids: make([]int, n), order: order, es: slices.Clone(s.E)}
	sIdx := make([]int, n)
	for k, i := range order {
		e.ids[k] = ids[i]
		sIdx[k] = idx[i]
		if k > 0 && e.ids[k] == e.ids[k-1] {
			return nil, fmt.Errorf("metrics: NewEvaluator: global index %d appears twice", e.ids[k])
		}
	}
	var c *cumulative
	if parts != nil {
		// Score's presences: the same groups (newPresences depends on the
		// multiset of indices alone).
		c, e.p = parts.cum, parts.tp
	} else {
		c = newCumulative(a)
		e.p = newPresences(c, sIdx)
	}
	e.v = c.placements(sIdx, false)
	e.vu = c.placements(sIdx, true)
	// The group of each presence: the groups' layout indices descend.
	e.group = make([]int, n)
	for k, j := range sIdx {
		e.group[k] = sort.Search(len(e.p.j), func(g int) bool { return e.p.j[g] <= j })
	}
	e.setThresholds(thIdx)
	e.setWindows(a, c, s, parts)
	all := make([]int, n)
	for k := range all {
		all[k] = k
	}
	e.all = e.groupSet(all)
	e.setBoyceRanks()
	return e, nil
}

// setThresholds records the thresholds' layout indices and, for each,
// the number of presence groups at or above it (cut: the groups' layout
// indices descend).
func (e *Evaluator) setThresholds(thIdx []int) {
	e.th = thIdx
	for _, tj := range thIdx {
		cut := len(e.p.j)
		for cut > 0 && e.p.j[cut-1] < tj {
			cut--
		}
		e.cut = append(e.cut, cut)
	}
}

// setWindows sets the Boyce index's moving windows (Score's, or made from
// a with the settings s) and the presence groups inside each.
func (e *Evaluator) setWindows(a *Accumulator, c *cumulative, s Settings, parts *scored) {
	if parts != nil {
		e.win = parts.win
	} else {
		e.win = boyceWindows(a, s.BoyceWidth, s.BoyceSteps)
	}
	e.winGroups = make([][2]int32, len(e.win))
	for w, bw := range e.win {
		g := 0
		for g < len(e.p.j) && c.values[e.p.j[g]] > bw.hi {
			g++
		}
		lo := g
		for g < len(e.p.j) && c.values[e.p.j[g]] >= bw.lo {
			g++
		}
		e.winGroups[w] = [2]int32{int32(lo), int32(g)}
	}
}

// setBoyceRanks sets what each resample's Spearman correlation of the
// Boyce index reuses: the deviations of the windows' midpoint ranks from
// their mean and their sum of squares, each window's inverse area share,
// and whether the correlation can be computed exactly (midpoint ranks in
// halves, few windows).
func (e *Evaluator) setBoyceRanks() {
	mid := make([]float64, len(e.win))
	for w, bw := range e.win {
		mid[w] = bw.mid
	}
	ry, _ := Ranks(mid)
	my := Mean(ry)
	e.midDev = make([]float64, len(ry))
	for w, r := range ry {
		dy := r - my
		e.midDev[w] = dy
		e.midSS += dy * dy
	}
	e.invShare = make([]float64, len(e.win))
	for w, bw := range e.win {
		e.invShare[w] = 1 / bw.share
	}
	e.exactRho = len(e.midDev) <= maxExactWindows
	for _, dy := range e.midDev {
		if 2*dy != math.Trunc(2*dy) {
			e.exactRho = false
		}
	}
}

// N returns the number of test presences of the evaluator.
func (e *Evaluator) N() int { return len(e.ids) }

// Values are the resampled scores of one multiset of test presences.
// A score that cannot be formed on the multiset has its OK flag false and
// value 0.
type Values struct {
	N                  int
	AUC, AUCUnweighted float64
	Ratio              []float64 // partial ROC ratio per E
	RatioOK            []bool
	Omission           []float64 // per threshold
	Boyce              float64
	BoyceOK            bool
}

// eval scores the multiset with count[k] copies of presence k.
func (e *Evaluator) eval(count []int32) Values {
	var out Values
	var sc evalScratch
	r := 0
	var sa, su float64
	for k, c := range count {
		if c == 0 {
			continue
		}
		r += int(c)
		sa += float64(c) * e.v[k]
		su += float64(c) * e.vu[k]
	}
	if r > 0 {
		out.AUC, out.AUCUnweighted = sa/float64(r), su/float64(r)
	}
	e.evalInto(count, e.group, &out, &sc)
	return out
}

// evalInto scores the multiset with count[k] copies of a presence of
// group group[k] (evalGroups on every group).
func (e *Evaluator) evalInto(count []int32, group []int, out *Values, sc *evalScratch) {
	groups := resize(sc.groups, len(e.p.j))
	sc.groups = groups
	r := 0
	for k, c := range count {
		r += int(c)
		groups[group[k]] += int(c)
	}
	before := grow(sc.before, len(groups)+1)
	sc.before = before
	acc := 0
	for g, c := range groups {
		before[g] = acc
		acc += c
	}
	before[len(groups)] = acc
	e.evalGroups(e.all, groups, before, r, out, sc, true, true)
}

// evalGroups scores the multiset with groups[g] presences of kept group
// g of gs, before[g] in the kept groups before g (before[G] = r in all),
// all but the AUCs (left as they are: the resamples of Compare do not use
// them), writing into out (its slices reused when long enough) with
// scratch memory sc. Every score but the AUCs depends on the presences
// only through their groups (their values): the partial ROC ratios by
// partialAreas, the omission rates through the presences of the groups
// below each threshold, the Boyce index through those of the groups each
// window holds. The counts are integers, so adding them up by group gives
// exactly what adding them up by presence does. Without boyce the Boyce
// index is left undefined (BoyceOK false): its ranks are most of the
// time of a resample; without partialROC the ratios are (RatioOK false).
func (e *Evaluator) evalGroups(gs *groupSet, groups, before []int, r int, out *Values, sc *evalScratch, boyce, partialROC bool) {
	out.Ratio = resize(out.Ratio, len(e.es))
	out.RatioOK = resize(out.RatioOK, len(e.es))
	out.Omission = resize(out.Omission, len(gs.cut))
	out.Boyce, out.BoyceOK = 0, false
	out.N = r
	if r == 0 {
		return
	}
	rf := float64(r)
	if partialROC {
		prs := grow(sc.partial, len(e.es))
		sc.partial = prs
		gs.p.partialAreas(groups, r, e.es, prs, &sc.area)
		for i, pr := range prs {
			if pr.how == crossFormed {
				out.Ratio[i], out.RatioOK[i] = pr.model/pr.null, true
			}
		}
	}
	for t, cut := range gs.cut {
		out.Omission[t] = float64(r-before[cut]) / rf
	}
	if boyce && len(e.win) >= 3 {
		ratio := resize(sc.ratio, len(e.win))
		sc.ratio = ratio
		spans := gs.winGroups[:len(ratio)]
		if e.exactRho {
			// The ratios' order keys (boyceRho): run_w / share_w.
			inv := e.invShare[:len(ratio)]
			for w, span := range spans {
				ratio[w] = float64(before[span[1]]-before[span[0]]) * inv[w]
			}
		} else {
			win := e.win[:len(ratio)]
			for w, span := range spans {
				ratio[w] = win[w].ratio(before[span[1]]-before[span[0]], r)
			}
		}
		out.Boyce, out.BoyceOK = e.boyceRho(ratio, before, spans, rf, sc)
	}
}

// nearKeys is the largest gap, in units in the last place, between two
// of boyceRho's order keys whose ratios it computes to order them: keys
// further apart differ by a factor above 1 + 2^-40, far more than the
// 1 + 2^-50 their rounding (and the ratios') can make up.
const nearKeys = 1 << 13

// maxExactWindows is the most Boyce windows for which boyceRho's sums
// are exact: n^3 < 2^53.
const maxExactWindows = 200_000

// boyceRho is boyceIndex(ratio, midpoints) with the midpoints' ranks
// precomputed, for the Boyce P/E ratios
//
//	F_w = (run_w / r) / share_w
//
// of a multiset of r presences, run_w of them in window w (before and
// spans as in evalGroups, rf = r).
//
// When e.exactRho, ratio holds order keys instead of F (y_w = run_w x
// (1/share_w), one product where F takes two quotients) and the sums are
// added up in the ratios' order instead of the windows': every term is
// exact, so the order does not matter, and the result depends on F only
// through its ranks. The ranks are half-integers, their mean (n+1)/2 is
// exact (the ranks add up to n(n+1)/2 exactly), so each dx is a
// half-integer of magnitude at most n/2, as each midDev is; each product
// dx midDev and dx dx is a multiple of 1/4 below n^2/4 in magnitude, and
// every partial sum a multiple of 1/4 below n^3/4, which float64 holds
// exactly for n^3 < 2^53. The keys order as F does wherever they are
// apart: with T_w = run_w / share_w and unit roundoff u = 2^-53, each of
// the two roundings of F and of y stays within a factor 1 +- u, so
//
//	F_w r = T_w (1 + d1)(1 + d2),   y_w = T_w (1 + d3)(1 + d4),   |d| <= u,
//
// and y_b > y_a (1 + 2^-40) (keys more than nearKeys units in the last
// place apart, both positive) gives F_b > F_a, as 2^-40 is far above the
// 8u the four roundings on each side can make up. Zero keys are the
// windows without a drawn presence (F = 0). Keys closer together form
// a cluster whose F are computed and ordered, ties (equal F) taking the
// mean of their ranks; the clusters lie in the order of their keys.
// Otherwise the ratio holds F, and the sums are Spearman's, the same
// operations in the same order, so the same bits.
func (e *Evaluator) boyceRho(ratio []float64, before []int, spans [][2]int32, rf float64, sc *evalScratch) (float64, bool) {
	var sxy, sxx float64
	var zp, sp []int32
	var sk []uint64
	ok := false
	if e.exactRho {
		zp, sk, sp, ok = sortPositive(ratio, sc)
	}
	if ok {
		n, zeros := len(ratio), len(zp)
		mx := float64(n+1) / 2
		if zeros > 0 {
			dx := float64(zeros-1)/2 + 1 - mx
			for _, w := range zp {
				sxy += dx * e.midDev[w]
				sxx += dx * dx
			}
		}
		// Position i of sk outside a cluster has rank zeros+i+1.
		m := len(sk)
		win := e.win[:len(ratio)]
		for i := 0; i < m; {
			j := i + 1
			for j < m && sk[j]-sk[j-1] <= nearKeys {
				j++
			}
			if j == i+1 {
				dx := float64(zeros+i+1) - mx
				sxy += dx * e.midDev[sp[i]]
				sxx += dx * dx
				i++
				continue
			}
			// A cluster, positions i to j-1: F's bits in order.
			for q := i; q < j; q++ {
				w := sp[q]
				run := before[spans[w][1]] - before[spans[w][0]]
				k, p := math.Float64bits(win[w].ratio(run, int(rf))), w
				h := q
				for h > i && sk[h-1] > k {
					sk[h], sp[h] = sk[h-1], sp[h-1]
					h--
				}
				sk[h], sp[h] = k, p
			}
			for i < j { // a tie: positions i to t-1
				t := i + 1
				for t < j && sk[t] == sk[i] {
					t++
				}
				dt := float64(zeros+i+zeros+t-1)/2 + 1 - mx
				for ; i < t; i++ {
					sxy += dt * e.midDev[sp[i]]
					sxx += dt * dt
				}
			}
		}
	} else {
		if e.exactRho { // keys that are not all >= +0 (no count or share gives such)
			for w, span := range spans {
				ratio[w] = e.win[w].ratio(before[span[1]]-before[span[0]], int(rf))
			}
		}
		rx := averageRanksInto(ratio, sc)
		mx := Mean(rx)
		for i, r := range rx {
			dx := r - mx
			sxy += dx * e.midDev[i]
			sxx += dx * dx
		}
	}
	if !(sxx > 0) || !(e.midSS > 0) {
		return 0, false
	}
	rho := sxy / math.Sqrt(sxx*e.midSS)
	return math.Max(-1, math.Min(1, rho)), true
}

// averageRanksInto returns the 1-based average ranks of v, as Ranks does
// (ties share the mean of their positions, computed with the same
// expression), in sc.ranks, using sc's other slices as scratch: for values
// >= +0 (the Boyce P/E ratios) the zeros (windows without a drawn
// presence) take ranks 1 to zeros and the positive values follow in the
// order sortPositive puts them in. Any other value falls back to Ranks.
// The ranks depend only on the values, so they are those of Ranks whatever
// the sort.
func averageRanksInto(v []float64, sc *evalScratch) []float64 {
	zp, sk, sp, ok := sortPositive(v, sc)
	if !ok {
		r, _ := Ranks(v)
		sc.ranks = append(sc.ranks[:0], r...)
		return sc.ranks
	}
	ranks := grow(sc.ranks, len(v))
	sc.ranks = ranks
	zeros := len(zp)
	if zeros > 0 {
		zr := float64(zeros-1)/2 + 1
		for _, p := range zp {
			ranks[p] = zr
		}
	}
	m := len(sk)
	for i := 0; i < m; {
		k := sk[i]
		j := i + 1
		for j < m && sk[j] == k {
			j++
		}
		avg := float64(zeros+i+zeros+j-1)/2 + 1
		for ; i < j; i++ {
			ranks[sp[i]] = avg
		}
	}
	return ranks
}

// sortPositive orders the values of v, all >= +0 (else ok is false), by
// their bit patterns, which order as the values do: zp are the positions
// of the zeros, sk the positive values' bits ascending and sp their
// positions, all in sc's scratch slices. A bucket sort puts the positive
// values in order (bucket b of nb = 3n holds the bits k with floor((k -
// lo) s) = b, clamped to [0, nb-1], a non-decreasing function of k, so the
// buckets are in order) and an insertion sort puts each bucket in order (a
// value or two each: three buckets per value leave a quarter as many
// values sharing a bucket as one per value does, and the insertion sort's
// unpredictable branches were most of the cost). lo and s come from the
// previous call's smallest and largest positive values (sc keeps them; the
// first call looks at its own): ratios of one evaluator's resamples span
// much the same range, and a bucket function that fits less well only
// leaves more to the insertion sort. The order depends only on the
// values, whatever the buckets.
func sortPositive(v []float64, sc *evalScratch) (zp []int32, sk []uint64, sp []int32, ok bool) {
	n := len(v)
	nb := max(3*n, 1)
	if !sc.spanSet {
		lo, hi := uint64(math.MaxUint64), uint64(0)
		for _, x := range v {
			if k := math.Float64bits(x); k-1 < 0x7ff0000000000000 {
				lo, hi = min(lo, k), max(hi, k)
			}
		}
		sc.setSpan(lo, hi, nb)
	}
	keys, pos, bucket := grow(sc.keys, n), grow(sc.pos, n), grow(sc.bucket, n)
	start := resize(sc.start, nb+1)
	sc.keys, sc.pos, sc.bucket, sc.start = keys, pos, bucket, start
	// The positive values' bits, positions and buckets at the front of
	// keys, pos and bucket, in the order of v; the zeros' positions at the
	// back of pos.
	m, z := 0, n
	base, scale, top := sc.spanLo, sc.spanScale, float64(nb-1)
	for i, x := range v {
		k := math.Float64bits(x)
		if k-1 >= 0x7ff0000000000000 { // +0 (k-1 wraps), negative, -0 or NaN
			if k != 0 {
				return nil, nil, nil, false
			}
			z--
			pos[z] = int32(i)
			continue
		}
		f := float64(int64(k-base)) * scale
		b := int32(0)
		if f >= top {
			b = int32(top)
		} else if f > 0 {
			b = int32(f)
		}
		keys[m], pos[m], bucket[m] = k, int32(i), b
		start[b+1]++
		m++
	}
	zp = pos[z:]
	if m == 0 {
		sc.setSpan(math.MaxUint64, 0, nb)
		return zp, nil, nil, true
	}
	acc := int32(0)
	for b, c := range start {
		acc += c
		start[b] = acc
	}
	sk, sp = grow(sc.sortedKeys, m), grow(sc.sortedPos, m)
	sc.sortedKeys, sc.sortedPos = sk, sp
	for i, b := range bucket[:m] {
		o := start[b]
		sk[o], sp[o] = keys[i], pos[i]
		start[b] = o + 1
	}
	for i := 1; i < m; i++ {
		k := sk[i]
		if sk[i-1] <= k {
			continue
		}
		p := sp[i]
		j := i
		for j > 0 && sk[j-1] > k {
			sk[j], sp[j] = sk[j-1], sp[j-1]
			j--
		}
		sk[j], sp[j] = k, p
	}
	sc.setSpan(sk[0], sk[m-1], nb)
	return zp, sk, sp, true
}

// setSpan sets the bucket function of the next sortPositive call to the
// bits lo..hi over nb buckets (all in the first bucket when hi <= lo).
// k - lo for bits k of values >= +0 is below 2^63 in magnitude, so
// int64(k - lo) is its signed difference.
func (sc *evalScratch) setSpan(lo, hi uint64, nb int) {
	sc.spanSet = true
	sc.spanLo, sc.spanScale = lo, 0
	if hi > lo {
		sc.spanScale = float64(nb-1) / float64(int64(hi-lo))
	}
}

// grow returns s with length n, reusing its memory when large enough; its
// elements are left as they were (the caller overwrites them).
func grow[T any](s []T, n int) []T {
	if cap(s) < n {
		return make([]T, n)
	}
	return s[:n]
}

// resize returns s with length n and every element zero, reusing its
// memory when large enough.
func resize[T any](s []T, n int) []T {
	if cap(s) < n {
		return make([]T, n)
	}
	s = s[:n]
	clear(s)
	return s
}

// ones returns count 1 for every presence whose global index is in keep
// (all presences when keep is nil).
func (e *Evaluator) ones(keep map[int]bool) []int32 {
	c := make([]int32, len(e.ids))
	for k, id := range e.ids {
		if keep == nil || keep[id] {
			c[k] = 1
		}
	}
	return c
}

// Full returns the scores on all of the evaluator's test presences.
func (e *Evaluator) Full() Values {
	v := *e.fullValues()
	v.Ratio, v.RatioOK, v.Omission = slices.Clone(v.Ratio), slices.Clone(v.RatioOK), slices.Clone(v.Omission)
	return v
}

// fullValues returns the memo of Full, computed on the first call (every
// comparison of the evaluator reads it): its slices must not be written.
func (e *Evaluator) fullValues() *Values {
	e.fullOnce.Do(func() { e.full = e.eval(e.ones(nil)) })
	return &e.full
}

// BootSD returns the sample standard deviation (denominator B-1) of the
// area-weighted AUC over the resamples of d restricted to the evaluator's
// own presences (resamples that draw none of them are skipped), and the
// number of resamples used. It returns 0 when fewer than 2 are used or a
// global index lies outside 0..d.N-1.
func (e *Evaluator) BootSD(d Draws) (float64, int) {
	for _, id := range e.ids {
		if id < 0 || id >= d.N {
			return 0, 0 // ids outside the draws: nothing to resample
		}
	}
	rs := newResampler(d)
	e.ownMu.Lock()
	e.tab = rs.tab
	e.ownMu.Unlock()
	c := make([]int32, len(e.ids))
	aucs := make([]float64, 0, d.B)
	b := 0
	if rs.tab != nil {
		// Four resamples at a time, each summed in its own order as
		// below: the four sums are independent, so the processor adds
		// them side by side instead of waiting on one sum's additions.
		v := e.v[:len(e.ids)]
		for ; b+4 <= d.B; b += 4 {
			row0, row1, row2, row3 := rs.tab.row(b), rs.tab.row(b+1), rs.tab.row(b+2), rs.tab.row(b+3)
			var r0, r1, r2, r3 int
			var s0, s1, s2, s3 float64
			for k, id := range e.ids {
				c0, c1, c2, c3 := row0[id], row1[id], row2[id], row3[id]
				r0, r1, r2, r3 = r0+int(c0), r1+int(c1), r2+int(c2), r3+int(c3)
				s0 += float64(c0) * v[k]
				s1 += float64(c1) * v[k]
				s2 += float64(c2) * v[k]
				s3 += float64(c3) * v[k]
			}
			for i, r := range [4]int{r0, r1, r2, r3} {
				if r > 0 {
					aucs = append(aucs, [4]float64{s0, s1, s2, s3}[i]/float64(r))
				}
			}
		}
	}
	for ; b < d.B; b++ {
		// The AUC of eval: the mean placement over the drawn copies,
		// summed in the same order. eval skips the presences not drawn;
		// adding their 0 x placement (+0: placements are finite and >= 0)
		// to a sum that starts at +0 leaves its bits as they are.
		r := 0
		var sa float64
		if rs.tab != nil {
			row, v := rs.tab.row(b), e.v[:len(e.ids)]
			for k, id := range e.ids {
				c := row[id]
				r += int(c)
				sa += float64(c) * v[k]
			}
		} else {
			rs.gather(b, e.ids, c)
			for k, c := range c {
				r += int(c)
				sa += float64(c) * e.v[k]
			}
		}
		if r > 0 {
			aucs = append(aucs, sa/float64(r))
		}
	}
	if len(aucs) < 2 {
		return 0, len(aucs)
	}
	_, sd := MeanSD(aucs)
	return sd, len(aucs)
}

// Resampled is the paired difference A - B of one resampled score on the
// common test presences.
type Resampled struct {
	// Defined is false when the score cannot be formed on the common
	// presences of A or of B, or fewer than 2 resamples form it.
	Defined bool
	// Scored is true when both A and B are formed on the common
	// presences (whatever the resamples).
	Scored bool
	// A and B are the scores on the common presences; Diff = A - B.
	A, B, Diff float64
	// SD is the sample SD of the resampled differences; Low and High their
	// 2.5th and 97.5th percentiles (type 7, see Quantile).
	SD, Low, High float64
	// Resamples is the number of resamples drawn, NotFormed how many of
	// them could not form the score on both sides.
	Resamples, NotFormed int
}

// Comparison is the paired comparison of two evaluators (two extents of one
// model, or two models on one extent) on their common test presences.
type Comparison struct {
	// Common is the number of test presences both evaluators hold.
	Common int
	// AUC and AUCUnweighted come from the placements (PairedPlacements);
	// AUCOn and AUCUnweightedOn are the two sides' AUCs on the common
	// presences (the means of their placements there).
	AUC, AUCUnweighted     Interval
	AUCOn, AUCUnweightedOn [2]float64
	// PartialROC (per E), Omission (per threshold) and Boyce come from the
	// paired resamples.
	PartialROC []Resampled
	Omission   []Resampled
	Boyce      Resampled
}

// Compare compares a with b on their common test presences: placements for
// the AUCs, and the B resamples of d restricted to the common presences
// for the other scores (the same index sets for every pair, so any two
// comparisons are paired as well). Both evaluators must come from the
// same Settings and the same number of thresholds: Omission[t] compares
// threshold t of a with threshold t of b (CompareThresholds pairs them
// otherwise).
//
// Percentile intervals of paired bootstrap differences: Efron &
// Tibshirani (1993) An Introduction to the Bootstrap, ch. 13.
func Compare(a, b *Evaluator, d Draws) (Comparison, error) {
	if len(a.cut) != len(b.cut) {
		return Comparison{}, errors.New("metrics: Compare: evaluators made with different numbers of thresholds")
	}
	om := make([][2]int, len(a.cut))
	for t := range om {
		om[t] = [2]int{t, t}
	}
	return CompareThresholds(a, b, d, om)
}

// CompareThresholds is Compare with the omission rates paired by om:
// Omission[t] compares a's threshold om[t][0] with b's threshold om[t][1].
// Two models have their own thresholds, and not always the same ones (a
// model with no data on any training point has no training-presence
// threshold): the caller pairs those both have.
func CompareThresholds(a, b *Evaluator, d Draws, om [][2]int) (Comparison, error) {
	return CompareWith(a, b, d, om, CompareOptions{})
}

// CompareOptions choose what CompareWith resamples.
type CompareOptions struct {
	// BoyceUnresampled leaves the Boyce index out of the resamples:
	// Comparison.Boyce then holds the two indices on the common
	// presences and, where both are defined, their difference, with no
	// SD, interval or resamples (Resamples 0). The percentile intervals
	// of its paired resamples fall short of their 95% coverage
	// (TestPairedIntervalCoverage), so a caller that only describes the
	// difference need not pay for them: the index's ranks are about three
	// fifths of the time of a resample (BenchmarkPairedRun). The other
	// scores' resamples are the same either way.
	BoyceUnresampled bool
	// PartialROCUnresampled does the same for the partial ROC ratios
	// (Comparison.PartialROC: the two ratios on the common presences and
	// their difference only), whose paired intervals between two nested
	// extents fall short of their coverage too. An evaluator's memo of
	// its own resamples keeps them (other comparisons of the evaluator
	// read them); a side scored on its common presences skips them.
	PartialROCUnresampled bool
}

// CompareWith is CompareThresholds with options o.
func CompareWith(a, b *Evaluator, d Draws, om [][2]int, o CompareOptions) (Comparison, error) {
	if err := checkComparable(a, b, d, om); err != nil {
		return Comparison{}, err
	}
	pa, pb := commonPresences(a, b)
	cmp := Comparison{Common: len(pa)}
	va, vb := make([]float64, len(pa)), make([]float64, len(pa))
	ua, ub := make([]float64, len(pa)), make([]float64, len(pa))
	for k := range pa {
		va[k], vb[k] = a.v[pa[k]], b.v[pb[k]]
		ua[k], ub[k] = a.vu[pa[k]], b.vu[pb[k]]
	}
	cmp.AUC = PairedPlacements(va, vb)
	cmp.AUCUnweighted = PairedPlacements(ua, ub)
	if len(pa) > 0 {
		cmp.AUCOn = [2]float64{Mean(va), Mean(vb)}
		cmp.AUCUnweightedOn = [2]float64{Mean(ua), Mean(ub)}
	}

	ca, cb := make([]int32, len(a.ids)), make([]int32, len(b.ids))
	for k := range pa {
		ca[pa[k]], cb[pb[k]] = 1, 1
	}
	// A side whose presences are all common is scored on all of them:
	// Full, computed once per evaluator.
	var fa, fb Values
	if len(pa) == len(a.ids) {
		fa = *a.fullValues()
	} else {
		fa = a.eval(ca)
	}
	if len(pb) == len(b.ids) {
		fb = *b.fullValues()
	} else {
		fb = b.eval(cb)
	}
	nE, nT := len(a.es), len(om)
	cmp.PartialROC = make([]Resampled, nE)
	cmp.Omission = make([]Resampled, nT)
	diffs := make([][]float64, nE+nT+1)
	if len(pa) > 0 {
		all := make([]float64, (nE+nT+1)*d.B)
		for i := range diffs {
			diffs[i] = all[i*d.B : i*d.B : (i+1)*d.B]
		}
	}
	for i := 0; i < nE; i++ {
		ok := fa.RatioOK[i] && fb.RatioOK[i]
		cmp.PartialROC[i] = Resampled{A: fa.Ratio[i], B: fb.Ratio[i], Defined: ok, Scored: ok, Resamples: d.B}
	}
	for t := 0; t < nT; t++ {
		ok := fa.N > 0
		cmp.Omission[t] = Resampled{A: fa.Omission[om[t][0]], B: fb.Omission[om[t][1]], Defined: ok, Scored: ok, Resamples: d.B}
	}
	ok := fa.BoyceOK && fb.BoyceOK
	cmp.Boyce = Resampled{A: fa.Boyce, B: fb.Boyce, Defined: ok, Scored: ok, Resamples: d.B}
	if len(pa) > 0 {
		resampleDiffs(a, b, d, om, pa, pb, diffs, o)
	}
	finishResampled(&cmp, diffs, d.B)
	if o.PartialROCUnresampled {
		for i := range cmp.PartialROC {
			cmp.PartialROC[i] = pointDifference(fa.Ratio[i], fb.Ratio[i], fa.RatioOK[i] && fb.RatioOK[i])
		}
	}
	if o.BoyceUnresampled {
		cmp.Boyce = pointDifference(fa.Boyce, fb.Boyce, ok)
	}
	return cmp, nil
}

// pointDifference is the Resampled of a score left out of the resamples
// (CompareOptions): a and b on the common presences and, when both are
// formed (ok), a - b, with no spread.
func pointDifference(a, b float64, ok bool) Resampled {
	x := Resampled{A: a, B: b, Defined: ok, Scored: ok}
	if ok {
		x.Diff = a - b
	}
	return x
}

// checkComparable reports whether a and b can be compared: made with the
// same E values, thresholds pairs om inside both lists of thresholds, and
// every presence's global index inside the draws' n.
func checkComparable(a, b *Evaluator, d Draws, om [][2]int) error {
	if len(a.es) != len(b.es) {
		return errors.New("metrics: Compare: evaluators made with different settings")
	}
	for _, p := range om {
		if p[0] < 0 || p[0] >= len(a.cut) || p[1] < 0 || p[1] >= len(b.cut) {
			return fmt.Errorf("metrics: Compare: threshold pair %v outside the evaluators' %d and %d thresholds", p, len(a.cut), len(b.cut))
		}
	}
	for _, id := range a.ids {
		if id < 0 || id >= d.N {
			return fmt.Errorf("metrics: Compare: global index %d outside 0..%d", id, d.N-1)
		}
	}
	for _, id := range b.ids {
		if id < 0 || id >= d.N {
			return fmt.Errorf("metrics: Compare: global index %d outside 0..%d", id, d.N-1)
		}
	}
	return nil
}

// commonPresences returns the positions in a and in b of the presences
// both hold, in order of their global index (the ids of each are sorted).
func commonPresences(a, b *Evaluator) (pa, pb []int) {
	for i, j := 0, 0; i < len(a.ids) && j < len(b.ids); {
		switch {
		case a.ids[i] < b.ids[j]:
			i++
		case a.ids[i] > b.ids[j]:
			j++
		default:
			pa, pb = append(pa, i), append(pb, j)
			i++
			j++
		}
	}
	return pa, pb
}

// resampleDiffs appends to diffs (see appendResampleDiffs) the paired
// differences a - b of each of the draws' resamples of the presences both
// hold (positions pa in a, pb in b), each side scored on its resampled
// counts; the partial ROC ratios and the Boyce index only where o
// resamples them (see CompareOptions).
func resampleDiffs(a, b *Evaluator, d Draws, om [][2]int, pa, pb []int, diffs [][]float64, o CompareOptions) {
	boyce, proc := !o.BoyceUnresampled, !o.PartialROCUnresampled
	nE := len(a.es)
	// A side whose presences are all common scores the resamples of its
	// own memo (the same numbers, computed once per evaluator and
	// shared by all its comparisons). The other side is scored on the
	// counts of the common presences: ga and gb are their groups.
	var ma, mb *ownMemo
	if len(pa) == len(a.ids) && useOwnMemo {
		ma = a.ownResamples(d, boyce)
	}
	if len(pb) == len(b.ids) && useOwnMemo {
		mb = b.ownResamples(d, boyce)
	}
	// The other side's scores come from its presences in common:
	// their group sets, and the counts and sums per kept group.
	var rs *resampler
	var gsa, gsb *groupSet
	var groupsA, beforeA, groupsB, beforeB []int
	if ma == nil {
		gsa = a.groupSet(pa)
		groupsA, beforeA = make([]int, len(gsa.p.xge)), make([]int, len(gsa.p.xge)+1)
	}
	if mb == nil {
		gsb = b.groupSet(pb)
		groupsB, beforeB = make([]int, len(gsb.p.xge)), make([]int, len(gsb.p.xge)+1)
	}
	if ma == nil || mb == nil {
		rs = newResampler(d)
	}
	var ra, rb Values
	var sa, sb evalScratch
	for r := 0; r < d.B; r++ {
		if ma != nil {
			ma.load(r, nE, len(a.cut), &ra)
		} else {
			a.evalGroups(gsa, groupsA, beforeA, gsa.gather(rs, r, groupsA, beforeA), &ra, &sa, boyce, proc)
		}
		if mb != nil {
			mb.load(r, nE, len(b.cut), &rb)
		} else {
			b.evalGroups(gsb, groupsB, beforeB, gsb.gather(rs, r, groupsB, beforeB), &rb, &sb, boyce, proc)
		}
		appendResampleDiffs(diffs, &ra, &rb, om, proc)
	}
}

// appendResampleDiffs appends one resample's paired differences a - b to
// diffs: one list per E (partial ROC ratio, where both sides define it),
// per pair of thresholds om (omission, when a holds a presence) and the
// Boyce index (where both define it), in that order; the ratios only
// with proc.
func appendResampleDiffs(diffs [][]float64, ra, rb *Values, om [][2]int, proc bool) {
	nE, nT := len(ra.Ratio), len(om)
	for i := 0; proc && i < nE; i++ {
		if ra.RatioOK[i] && rb.RatioOK[i] {
			diffs[i] = append(diffs[i], ra.Ratio[i]-rb.Ratio[i])
		}
	}
	if ra.N > 0 {
		for t := 0; t < nT; t++ {
			diffs[nE+t] = append(diffs[nE+t], ra.Omission[om[t][0]]-rb.Omission[om[t][1]])
		}
	}
	if ra.BoyceOK && rb.BoyceOK {
		diffs[nE+nT] = append(diffs[nE+nT], ra.Boyce-rb.Boyce)
	}
}

// finishResampled sets each resampled difference of cmp from its list of
// resample differences (appendResampleDiffs) out of b resamples: the
// full-sample difference, the SD of the resample differences and their
// 2.5th and 97.5th percentiles (Hyndman & Fan type 7); a difference that
// is undefined or formed on fewer than 2 resamples keeps its two values
// and the count not formed only.
func finishResampled(cmp *Comparison, diffs [][]float64, b int) {
	nE, nT := len(cmp.PartialROC), len(cmp.Omission)
	finish := func(x *Resampled, ds []float64) {
		x.NotFormed = b - len(ds)
		if !x.Defined || len(ds) < 2 {
			*x = Resampled{A: x.A, B: x.B, Scored: x.Scored, Resamples: x.Resamples, NotFormed: x.NotFormed}
			return
		}
		x.Diff = x.A - x.B
		_, x.SD = MeanSD(ds)
		x.Low, x.High = quantileSelect(ds, 0.025), quantileSelect(ds, 0.975)
	}
	for i := range cmp.PartialROC {
		finish(&cmp.PartialROC[i], diffs[i])
	}
	for t := range cmp.Omission {
		finish(&cmp.Omission[t], diffs[nE+t])
	}
	finish(&cmp.Boyce, diffs[nE+nT])
}
