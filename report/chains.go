package report

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

const (
	// mixTolerance is the largest |AUCOuter - mix| accepted without a warning.
	mixTolerance = 1e-9
	// sameAUC: two AUCs closer than this are the same number written with
	// different rounding (results.json may round scores).
	sameAUC = 1e-9
)

// chains summarises Results.Rings per (chain, model), in order of first
// appearance.
func (a *analysis) chains() ([]ChainSummary, []string) {
	type key struct{ chain, model string }
	var keys []key
	groups := map[key][]Ring{}
	for _, g := range a.r.Rings {
		k := key{g.Chain, g.Model}
		if _, ok := groups[k]; !ok {
			keys = append(keys, k)
		}
		groups[k] = append(groups[k], g)
	}
	out := []ChainSummary{}
	var warns []string
	for _, k := range keys {
		rings, ok := orderRings(groups[k])
		if !ok {
			warns = append(warns, fmt.Sprintf("chain %s, model %s: rings do not link inner to outer; ordered by inner area", k.chain, k.model))
		}
		cs, w := a.chainSummary(k.chain, k.model, rings)
		if len(cs.Members) == 0 {
			// No member of the chain has a score of this model: there is
			// no AUC to start from (every ring's inner extent is unscored).
			continue
		}
		out = append(out, cs)
		warns = append(warns, w...)
	}
	return out, warns
}

// orderRings follows the rings from the one whose inner member is no
// ring's outer member; it falls back to ordering by inner area.
func orderRings(rs []Ring) ([]Ring, bool) {
	byInner := map[string]int{}
	outers := map[string]bool{}
	for i, g := range rs {
		if _, dup := byInner[g.Inner]; dup {
			return sortRings(rs), false
		}
		byInner[g.Inner] = i
		outers[g.Outer] = true
	}
	start := -1
	for i, g := range rs {
		if !outers[g.Inner] {
			if start >= 0 {
				return sortRings(rs), false
			}
			start = i
		}
	}
	if start < 0 {
		return sortRings(rs), false
	}
	out := make([]Ring, 0, len(rs))
	for i := start; len(out) < len(rs); {
		out = append(out, rs[i])
		next, ok := byInner[rs[i].Outer]
		if !ok {
			break
		}
		i = next
	}
	if len(out) != len(rs) {
		return sortRings(rs), false
	}
	return out, true
}

func sortRings(rs []Ring) []Ring {
	out := append([]Ring(nil), rs...)
	sort.SliceStable(out, func(i, j int) bool { return out[i].InnerAreaKm2 < out[j].InnerAreaKm2 })
	return out
}

func (a *analysis) extentArea(id string, fallback float64) float64 {
	for _, e := range a.r.Extents {
		if e.ID == id {
			return e.AreaKm2
		}
	}
	return fallback
}

func (a *analysis) chainSummary(chain, model string, rings []Ring) (ChainSummary, []string) {
	cs := ChainSummary{Chain: chain, Model: model, Members: []string{}, MemberAreasKm2: []float64{}, Steps: []ChainStep{}, Largest: -1}
	var warns []string
	// A chain starts at its first member with a score: an inner extent
	// without one (no test points inside, say) has no AUC of its own, and
	// its ring's AUCInner is the outer extent's test points against its
	// cells, which the sentence would misname as the score there.
	for len(rings) > 0 && a.chainScore(model, rings[0].Inner) == nil {
		rings = rings[1:]
	}
	if len(rings) == 0 {
		return cs, nil
	}
	first := rings[0]
	cs.Members = append(cs.Members, first.Inner)
	cs.MemberAreasKm2 = append(cs.MemberAreasKm2, a.extentArea(first.Inner, first.InnerAreaKm2))
	prev := a.chainScore(model, first.Inner).AUC
	cs.StartAUC = prev
	for _, g := range rings {
		cs.Members = append(cs.Members, g.Outer)
		cs.MemberAreasKm2 = append(cs.MemberAreasKm2, a.extentArea(g.Outer, g.InnerAreaKm2+g.RingAreaKm2))
		if d := g.AUCInner - prev; math.Abs(d) > sameAUC {
			cs.Steps = append(cs.Steps, ChainStep{Kind: StepTestPoints, Inner: g.Inner, Outer: g.Outer,
				AUCInner: prev, AUCOuter: g.AUCInner, Change: d})
		} else if len(cs.Steps) == 0 {
			// Same test points: the score and the ring differ by rounding only.
			cs.StartAUC = g.AUCInner
		}
		st := ChainStep{Kind: StepRing, Inner: g.Inner, Outer: g.Outer, RingAreaKm2: g.RingAreaKm2, RingCells: g.RingCells,
			AUCInner: g.AUCInner, AUCOuter: g.AUCOuter, Change: g.AUCOuter - g.AUCInner}
		if g.RingCells > 0 && g.RingAreaKm2 > 0 {
			st.AUCRing, st.AUCRingDefined = g.AUCRing, true
		}
		if tot := g.InnerAreaKm2 + g.RingAreaKm2; tot > 0 {
			ring := 0.0
			if st.AUCRingDefined {
				ring = g.AUCRing
			}
			st.MixResidual = g.AUCOuter - (g.InnerAreaKm2*g.AUCInner+g.RingAreaKm2*ring)/tot
		}
		if math.Abs(st.MixResidual) > mixTolerance {
			warns = append(warns, fmt.Sprintf("chain %s, model %s: AUC of %s (%.6f) is not the area-weighted mix of %s and its ring (off by %.2g)",
				chain, model, g.Outer, g.AUCOuter, g.Inner, st.MixResidual))
		}
		cs.Steps = append(cs.Steps, st)
		prev = g.AUCOuter
	}
	cs.EndAUC = prev
	cs.Change = cs.EndAUC - cs.StartAUC
	var auc []float64
	for k, id := range cs.Members {
		v := 0.0
		if sc := a.chainScore(model, id); sc != nil {
			v = sc.AUC
		} else if k == 0 {
			v = first.AUCInner
		} else {
			v = rings[k-1].AUCOuter
		}
		auc = append(auc, v)
	}
	cs.Slope = slopeOf(cs.MemberAreasKm2, auc)
	if math.Abs(cs.Change) > 1e-9 {
		cs.SharesDefined = true
		best := 0.0
		for i := range cs.Steps {
			cs.Steps[i].Share = cs.Steps[i].Change / cs.Change
			if v := math.Abs(cs.Steps[i].Share); v > best {
				best, cs.Largest = v, i
			}
		}
	}
	who := "model"
	if isNull(a.r, model) {
		who = "null"
	}
	fewest := -1
	for _, id := range cs.Members {
		if sc := a.chainScore(model, id); sc != nil && (fewest < 0 || sc.TestPoints < fewest) {
			fewest = sc.TestPoints
		}
	}
	tol := a.r.Settings.ToleranceAUC
	cs.Sentence = chainSentence(&cs, who, tol) + fewPointsClause(fewest, sharesGiven(&cs, tol))
	return cs, warns
}

// chainScore is the usable score of model on extent, a null's too
// (a.score holds the models only): a chain of a null starts from the
// null's own score, as a model's does.
func (a *analysis) chainScore(model, extent string) *Score {
	if sc := a.score(model, extent); sc != nil || !isNull(a.r, model) {
		return sc
	}
	if _, ok := a.extIndex[extent]; !ok {
		return nil
	}
	return findScore(a.r, model, extent)
}

// chainSentence says how AUC moves along the chain cs of a "model" or a
// "null" (who); tol is the run's AUC tolerance, the difference the user
// treats as negligible: shares of a change within it are not given.
func chainSentence(cs *ChainSummary, who string, tol float64) string {
	n := len(cs.Members)
	head := fmt.Sprintf("Along chain %s, AUC of %s %s goes from %s (%s, %s km²) to %s (%s, %s km²)",
		cs.Chain, who, cs.Model, f3(cs.StartAUC), cs.Members[0], fmtArea(cs.MemberAreasKm2[0]),
		f3(cs.EndAUC), cs.Members[n-1], fmtArea(cs.MemberAreasKm2[n-1]))
	if !cs.SharesDefined {
		return head + ": it barely changes, so shares are not defined."
	}
	if sharesGiven(cs, tol) {
		return sharesSentence(cs, head)
	}
	if f3(cs.StartAUC) == f3(cs.EndAUC) {
		// The change is below the three decimals the sentence shows:
		// "goes from 0.440 to 0.440; 242% of the gain comes from" named
		// a gain the reader cannot see, and shares of so small a change
		// say nothing (the steps stay in the table).
		// Four decimals at least: a change of 0.0008 between 0.4396 and
		// 0.4404 is "+0.0008", not "+0.001", which the two ends deny.
		ch := signedDec(cs.Change, 4)
		if math.Abs(cs.Change) < 5e-5 {
			ch = signedVs(cs.Change, 0)
		}
		return fmt.Sprintf("%s: it changes by %s in all, which the three decimals do not show, so no share of the change is given (each step is in the table).",
			head, ch)
	}
	return negligibleChainSentence(cs, head, tol)
}

// sharesGiven tells whether the sentence of chain cs gives shares of its
// change: not when they are undefined, when the change does not show in
// three decimals, or when it is within the AUC tolerance tol.
func sharesGiven(cs *ChainSummary, tol float64) bool {
	return cs.SharesDefined && f3(cs.StartAUC) != f3(cs.EndAUC) && !(tol > 0 && math.Abs(cs.Change) <= tol)
}

// sharesSentence ends the sentence of chain cs (its opening head) with
// the step of largest share and what its ring's AUC means.
func sharesSentence(cs *ChainSummary, head string) string {
	st := cs.Steps[cs.Largest]
	word := "gain"
	if cs.Change < 0 {
		word = "loss"
	}
	tp, hasTP := 0.0, false
	for _, x := range cs.Steps {
		if x.Kind == StepTestPoints {
			tp, hasTP = tp+x.Share, true
		}
	}
	tail := ""
	if hasTP && st.Kind == StepRing {
		tail = fmt.Sprintf(" Test points that enter along the chain account for %s.", pct(tp))
	}
	// The step of largest share may go against the chain's change (steps
	// of both signs): "-500% of the gain comes from" would say nothing.
	comes := fmt.Sprintf("%s of the %s comes from", pct(st.Share), word)
	if st.Share < 0 {
		comes = fmt.Sprintf("the largest step goes against the %s (%s of it):", word, pct(st.Share))
	}
	if st.Kind == StepTestPoints {
		return fmt.Sprintf("%s; %s test points that enter with %s, judged against the background of %s.",
			head, comes, st.Outer, st.Inner)
	}
	s := fmt.Sprintf("%s; %s the ring %s minus %s (%s km²)",
		head, comes, st.Outer, st.Inner, fmtArea(st.RingAreaKm2))
	tail += slopeClause(cs)
	if !st.AUCRingDefined {
		return s + "." + tail
	}
	return s + ", " + ringClause(st) + tail
}

// negligibleChainSentence ends the sentence of a chain whose AUC changes
// by no more than the AUC tolerance tol from end to end: shares of a
// negligible change are ratios of small numbers ("433% of the loss comes
// from test points that enter with hull_100km" was written for a change
// of -0.001), so none is given. Steps that move the score by more than tol
// and cancel are named, the largest of them, so that a flat chain is not
// read as a chain whose rings change nothing.
func negligibleChainSentence(cs *ChainSummary, head string, tol float64) string {
	s := fmt.Sprintf("%s: it changes by %s in all, within %s, so no share of the change is given (each step is in the table).",
		head, signedVs(cs.Change, tol, -tol), toleranceText(MetricInfo{Kind: MetricAUC, Tolerance: tol}))
	big := -1
	for i, st := range cs.Steps {
		if math.Abs(st.Change) > tol && (big < 0 || math.Abs(st.Change) > math.Abs(cs.Steps[big].Change)) {
			big = i
		}
	}
	if big >= 0 {
		st := cs.Steps[big]
		what := fmt.Sprintf("the ring %s minus %s", st.Outer, st.Inner)
		if st.Kind == StepTestPoints {
			what = fmt.Sprintf("the test points that enter with %s", st.Outer)
		}
		s += fmt.Sprintf(" Its steps go both ways and cancel: the largest, %s, comes from %s.", signedVs(st.Change, tol, -tol), what)
	}
	return s + slopeClause(cs)
}

// slopeClause is the chain's slope of AUC against log2 of the area, a
// description; "" when it is not defined.
func slopeClause(cs *ChainSummary) string {
	if !cs.Slope.Defined {
		return ""
	}
	// signedVs: a slope of 0.0004 is "+0.0004", not "+0.000", which
	// reads as no change beside AUCs that do change.
	return fmt.Sprintf(" Along the chain AUC changes by %s per doubling of the area (a description of these %d nested extents, not an estimate).", signedVs(cs.Slope.PerDoubling, 0), cs.Slope.N)
}

// fewPointsClause warns that a chain's shares rest on few test points when
// its fewest-pointed scored member has fewer than MinPairedPoints (our
// cut-off for judging a paired difference): a large share there is one or
// two points moving, which the chain describes but nothing tests.
// shares says whether the sentence gave shares: when it did not, the
// clause does not speak of them ("no share of the change is given" was
// followed by "the shares describe them").
func fewPointsClause(fewest int, shares bool) string {
	if fewest < 0 || fewest >= MinPairedPoints {
		return ""
	}
	what := "the shares describe them and are not judged"
	if !shares {
		what = "they are described, not judged"
	}
	return fmt.Sprintf(" These AUCs rest on as few as %d test point%s, fewer than the %d we judge a difference on (our cut-off): %s.", fewest, Plural(fewest), MinPairedPoints, what)
}

// ringClause says what a ring's AUC means, following its value: whether
// the model ranks the test points above the ring's cells more or less
// often than above the inner extent's cells, and whether the ring is
// easier or harder than chance.
func ringClause(st ChainStep) string {
	// Both AUCs are on the test points of the outer member, so the inner
	// one is not the inner extent's own AUC (on its own test points): the
	// sentence says so, or a reader comparing it with the scores table
	// sees a contradiction.
	s := fmt.Sprintf("whose AUC is %s against %s for the cells of %s (both on the test points of %s): ", f3(st.AUCRing), f3(st.AUCInner), st.Inner, st.Outer)
	// Whether adding the ring raises or lowers the score follows from the
	// ring's AUC against the inner one alone; below 0.5 says more.
	switch {
	case st.AUCRing > st.AUCInner && st.AUCRing < 0.5:
		return s + "the model still scores the ring's cells above the test points more often than not, but less often than the inner cells, so adding the ring raises the score."
	case st.AUCRing > st.AUCInner:
		return s + "the test points outrank the ring's cells more often than the inner cells, so adding the ring raises the score."
	case st.AUCRing < st.AUCInner && st.AUCRing < 0.5:
		return s + "the model scores the ring's cells above the test points more often than not, so adding it lowers the score."
	case st.AUCRing < st.AUCInner:
		return s + "the ring's cells look more like the presences to the model than the inner cells do, so adding it lowers the score."
	}
	return s + "the ring leaves the score unchanged."
}

// fmtArea formats an area in km² with three significant digits and
// thousands separators (e.g. 84,900; 41.2; 0.512).
func fmtArea(v float64) string {
	if v <= 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return "0"
	}
	if v < 100 {
		return trimFloat(v, 3)
	}
	mag := math.Pow(10, math.Floor(math.Log10(v))-2)
	r := int64(math.Round(v/mag) * mag)
	return groupThousands(r)
}

// trimFloat prints v with sig significant digits, no exponent, without
// trailing zeros.
func trimFloat(v float64, sig int) string {
	d := sig - 1 - int(math.Floor(math.Log10(math.Abs(v))))
	if d < 0 {
		d = 0
	}
	s := fmt.Sprintf("%.*f", d, v)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	return s
}

func groupThousands(n int64) string {
	neg := n < 0
	if neg {
		n = -n
	}
	s := fmt.Sprintf("%d", n)
	var out []byte
	for i := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			out = append(out, ',')
		}
		out = append(out, s[i])
	}
	if neg {
		return "-" + string(out)
	}
	return string(out)
}
