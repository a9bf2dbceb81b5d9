package metrics

import (
	"math"
)

// pcgStream is xored with Settings.Seed to form the second PCG seed word.
const pcgStream = 0x9E3779B97F4A7C15

// PartialROC is the partial ROC result for one allowable omission E, after
// Peterson, Papes & Soberon (2008).
//
// The curve lives on the area axis: for a threshold t,
//
//	x(t) = share of the extent's area with value >= t
//	y(t) = share of test presences with value >= t
//
// Its vertices sit only at the distinct test values. Taking them in
// descending order, each value u contributes
//
//	A = (x(>u), y(>u))   then   B = (x(>=u), y(>=u))
//
// A->B is a diagonal (background tied with u) or vertical segment, B->next A
// is horizontal; the curve starts at (0,0) and ends at (1,1). x_E is where
// the curve first reaches y = 1-E, interpolated linearly along the crossing
// segment (on a vertical step, the step's x). Then
//
//	model area = integral of y dx from x_E to 1 (exact trapezoids)
//	null area  = (1 - x_E^2) / 2
//	Ratio      = model area / null area
//
// Equivalently, model area = (1-x_E)(1-E) + A_band, where A_band is the area
// to the right of the curve inside the band 1-E <= y <= 1 (the "partial AUC
// with sensitivity focus, uncorrected" of the ROC literature, with
// specificity = 1-x).
//
// When the crossing falls strictly inside the segment of a value shared by
// two or more test presences (a tie, typical of a floor value), no
// threshold separates those presences and x_E is only an interpolation
// along the tie: the ratio would be (2 - E)/(1 + x_E)-like arithmetic, not a
// property of the ranking. The ratio is then undefined (Formed false,
// Reason ReasonPartialTie) and the discrete-threshold reading is given
// instead: DiscreteXE is the area at or above the tied value (the
// threshold that keeps every tied presence, so y >= 1-E there) and
// DiscreteRatio the ratio computed from that x_E.
//
// The count (1-E)n is rounded to the nearest integer when it is within
// 1e-9 of one, so that for example E = 0.05 and n = 20 reaches the 19th
// presence exactly despite binary rounding of 0.95.
//
// The published bootstrap (Peterson et al. 2008) repeats this on B
// resamples, each drawing ResampleSize(f, n) = max(1, round(f*n)) test
// presences with replacement (f = Settings.Fraction;
// math/rand/v2 PCG seeded with (Seed, Seed xor 0x9E3779B97F4A7C15); draws
// are positions in the ascending-sorted test values, so results depend only
// on the multiset of test values and the seed; the same resamples serve all
// E). A resample whose curve cannot be formed (null area 0 because x_E = 1)
// or whose crossing lies on a tie is counted in NotFormed and left out of RatioMean, RatioSD (sample SD,
// denominator k-1 over the k formed resamples), CILow and CIHigh (2.5th and
// 97.5th percentiles, linear interpolation between order statistics: the
// p-quantile of sorted r_0..r_{k-1} is r_h interpolated at h = (k-1)p) and
// PValue (share of formed resamples with ratio <= 1). All are 0 when no
// resample is formed. Each resample costs O(m + f*n) for m distinct test
// values, whatever the number of cells.
//
// Peterson, A.T., Papes, M. & Soberon, J. (2008) Rethinking receiver
// operating characteristic analysis applications in ecological niche
// modeling. Ecological Modelling 213:63-72.
type PartialROC struct {
	// E is the allowable omission.
	E float64
	// Ratio is the AUC ratio on the full test set (0 when !Formed).
	Ratio float64
	// RatioMean, RatioSD, CILow, CIHigh and PValue summarise the formed
	// resamples of the published half-size bootstrap (see the type
	// comment). PValue cannot resolve values below 1/(formed resamples).
	RatioMean, RatioSD, CILow, CIHigh, PValue float64
	// Iterations is the number of resamples drawn, NotFormed how many of
	// them could not form a curve; ResampleSize is the number of test
	// presences each draws (ResampleSize).
	Iterations, NotFormed, ResampleSize int
	// Formed reports whether the full-set ratio is defined; Reason says why
	// not (ReasonPartialNull or ReasonPartialTie).
	Formed bool
	Reason string
	// TiedAtCrossing is the number of test presences tied at TieValue, the
	// value on whose segment the crossing falls (ReasonPartialTie only).
	TiedAtCrossing int
	TieValue       float64
	// DiscreteFormed, DiscreteXE and DiscreteRatio are the
	// discrete-threshold reading of a tie crossing (see the type comment).
	DiscreteFormed            bool
	DiscreteXE, DiscreteRatio float64
	// XE is the full-set x_E: the share of area predicted present when the
	// curve first reaches 1-E.
	XE float64
	// ModelArea and NullArea are the full-set areas whose ratio is Ratio.
	ModelArea, NullArea float64
	// PRandom is the Monte Carlo p-value of Ratio against the ratios of
	// test points drawn at random over the extent's area (areaRandom),
	// from RandomFormed draws that formed a ratio; 0 when not computed,
	// with PRandomNote saying why (a p-value is never 0).
	PRandom      float64
	RandomFormed int
	PRandomNote  string
}

// ResampleSize is the number of test presences each resample of the
// published bootstrap draws from n with fraction f: max(1, round(f n)),
// halves rounded away from zero.
func ResampleSize(f float64, n int) int { return max(1, int(math.Round(f*float64(n)))) }

// snapCount rounds x to the nearest integer when it is within 1e-9
// (relative, at least absolute) of it.
func snapCount(x float64) float64 {
	r := math.Round(x)
	if math.Abs(x-r) <= 1e-9*math.Max(1, math.Abs(x)) {
		return r
	}
	return x
}

// crossing says how the curve met y = 1-E.
type crossing int

const (
	crossFormed crossing = iota // a proper crossing with x_E < 1
	crossNull                   // x_E = 1: no area is left to the right
	crossTie                    // the crossing lies among test points tied at one value
)

// partialResult is one partial ROC evaluation of a curve.
type partialResult struct {
	model, null, xE float64
	how             crossing
	// tied is the number of test presences sharing the value on whose
	// segment the crossing lies (crossTie only); tieValue is that value's
	// layout index.
	tied     int
	tieGroup int
}

// partialArea computes the partial ROC areas of the curve formed by the
// presences with counts[g] presences at group g (descending value order,
// r presences in all: r must be the sum of counts). When the crossing
// falls strictly inside the segment of a value shared by two or more
// distinct test presences of the full set (p.count, not counts: a
// resample that draws one presence twice makes no tie), how is crossTie
// and the areas are left at 0. It is partialAreas for one E.
func (p *presences) partialArea(counts []int, r int, e float64) partialResult {
	var res [1]partialResult
	var sc areaScratch
	p.partialAreas(counts, r, []float64{e}, res[:], &sc)
	return res[0]
}

// areaScratch is the working memory of partialAreas, reused across calls.
type areaScratch struct {
	nz    []int32   // the groups with presences after the first crossing
	cross []int     // per E: the crossing group (-1: none)
	ya    []int     // per E: the presences of the groups up to the crossing, its own included
	model []float64 // per E: the model area summed so far
}

// partialAreas sets res[i] to the partial ROC areas of the curve of counts
// (see partialArea) for allowable omission es[i], for every i. res must be
// as long as es.
//
// Nothing is added to the model area before the crossing, so each
// crossing group is found from the end (the presences at or above a
// group, r minus those after it, only grow along the groups) and the areas
// are summed from there in the curve's order: the same operations in the
// same order as a walk over every group from the start, so the same bits,
// in O(groups from the crossing on) rather than O(groups). The groups
// with presences after the first crossing are listed once (nz, without a
// branch per group, so the resamples' scattered empty groups cost no
// mispredicted branch), and every E walks that list; the terms each group
// adds (its horizontal and diagonal pieces) depend on the counts and
// areas alone, not on E, so with two values of E both sums are taken in
// one walk, each with its own operations in its own order.
func (p *presences) partialAreas(counts []int, r int, es []float64, res []partialResult, sc *areaScratch) {
	rf := float64(r)
	// last is the last group with presences.
	last := len(counts) - 1
	for last >= 0 && counts[last] == 0 {
		last--
	}
	nE := len(es)
	crossOf, yaOf := resize(sc.cross, nE), resize(sc.ya, nE)
	model := resize(sc.model, nE)
	sc.cross, sc.ya, sc.model = crossOf, yaOf, model
	first := last + 1
	for i, e := range es {
		tau := snapCount((1 - e) * rf)
		// cross is the first group with presences whose running count yb
		// reaches tau, ya the count before it. Walking down from last,
		// the count before a group without presences is its yb, which
		// reaches tau, so only the crossing group stops the walk.
		cross, ya := -1, 0
		if last >= 0 && float64(r) >= tau {
			g, yb := last, r
			for ; g >= 0; g-- {
				a := yb - counts[g]
				if !(float64(a) >= tau) {
					break
				}
				yb = a
			}
			if g < 0 { // tau <= 0: the first group with presences crosses
				g = 0
				for counts[g] == 0 {
					g++
				}
				yb = counts[g]
			}
			cross, ya = g, yb-counts[g]
		}
		res[i] = partialResult{}
		crossOf[i] = cross
		if cross < 0 {
			continue
		}
		first = min(first, cross)
		c := counts[cross]
		yb := ya + c
		xa, xb := p.xgt[cross], p.xge[cross]
		s := (tau - float64(ya)) / float64(c)
		if s >= 1 {
			res[i].xE = xb
		} else {
			res[i].xE = xa + s*(xb-xa)
			if p.count[cross] >= 2 && s > 0 {
				res[i].how, res[i].tied, res[i].tieGroup = crossTie, c, cross
			}
		}
		var m float64
		m += (xb - res[i].xE) * (tau + float64(yb)) / 2
		model[i], yaOf[i] = m, yb
	}
	// nz: the groups with presences after the first crossing, in order.
	var nz []int32
	if first < last {
		nz = grow(sc.nz, last-first)
		sc.nz = nz
		k := 0
		for g := first + 1; g <= last; g++ {
			nz[k] = int32(g)
			if counts[g] != 0 {
				k++
			}
		}
		nz = nz[:k]
	}
	// from returns the position in nz of the first group after the
	// crossing of E i.
	from := func(i int) int {
		k := 0
		for k < len(nz) && int(nz[k]) <= crossOf[i] {
			k++
		}
		return k
	}
	walk := func(i int) {
		if crossOf[i] < 0 {
			return
		}
		m, ya := model[i], yaOf[i]
		prevX := p.xge[crossOf[i]]
		for _, g := range nz[from(i):] {
			yb := ya + counts[g]
			xa, xb := p.xgt[g], p.xge[g]
			m += (xa - prevX) * float64(ya)     // horizontal B->A
			m += (xb - xa) * float64(ya+yb) / 2 // diagonal or vertical A->B
			prevX, ya = xb, yb
		}
		model[i] = m
	}
	if nE == 2 && crossOf[0] >= 0 && crossOf[1] >= 0 {
		// Both sums in one walk: the E with the earlier crossing alone up
		// to the other's crossing, then both, each adding the same terms
		// in the same order as walk.
		i0, i1 := 0, 1
		if crossOf[1] < crossOf[0] {
			i0, i1 = 1, 0
		}
		k0, k1 := from(i0), from(i1)
		m0, ya := model[i0], yaOf[i0]
		prevX := p.xge[crossOf[i0]]
		for _, g := range nz[k0:k1] {
			yb := ya + counts[g]
			xa, xb := p.xgt[g], p.xge[g]
			m0 += (xa - prevX) * float64(ya)
			m0 += (xb - xa) * float64(ya+yb) / 2
			prevX, ya = xb, yb
		}
		// Here prevX and ya are those of the later crossing group (the
		// last group with presences before nz[k1]), as walk starts i1.
		m1 := model[i1]
		for _, g := range nz[k1:] {
			yb := ya + counts[g]
			xa, xb := p.xgt[g], p.xge[g]
			m0 += (xa - prevX) * float64(ya)
			m0 += (xb - xa) * float64(ya+yb) / 2
			m1 += (xa - prevX) * float64(ya)
			m1 += (xb - xa) * float64(ya+yb) / 2
			prevX, ya = xb, yb
		}
		model[i0], model[i1] = m0, m1
	} else {
		for i := range es {
			walk(i)
		}
	}
	// The curve's last vertex is the last group's B (the origin when no
	// group has presences); from there to (1,1).
	prevX := 0.0
	if last >= 0 {
		prevX = p.xge[last]
	}
	for i := range es {
		m := model[i]
		if crossOf[i] < 0 {
			m = 0
		}
		m += (1 - prevX) * rf // last B -> (1,1)
		res[i].model = m / rf
		res[i].null = (1 - res[i].xE*res[i].xE) / 2
		if !(res[i].null > 0) {
			res[i].model, res[i].null, res[i].how = 0, 0, crossNull
		}
	}
}

// discreteArea is the partial ROC read at thresholds only: x_E is the
// area at or above the tied value g (the threshold that keeps every tied
// presence), and the model area runs from there. ok is false when that
// threshold keeps the whole area.
func (p *presences) discreteArea(counts []int, r int, g int) (model, null, xE float64, ok bool) {
	rf := float64(r)
	xE = p.xge[g]
	ya := 0
	for h := 0; h <= g; h++ {
		ya += counts[h]
	}
	prevX, prevY := xE, ya
	for h := g + 1; h < len(counts); h++ {
		c := counts[h]
		if c == 0 {
			continue
		}
		yb := prevY + c
		xa, xb := p.xgt[h], p.xge[h]
		model += (xa - prevX) * float64(prevY)
		model += (xb - xa) * float64(prevY+yb) / 2
		prevX, prevY = xb, yb
	}
	model += (1 - prevX) * rf
	model /= rf
	null = (1 - xE*xE) / 2
	if !(null > 0) {
		return 0, 0, xE, false
	}
	return model, null, xE, true
}

// Reasons given in PartialROC.Reason.
const (
	ReasonPartialNull = "the curve reaches 1 - E only at x = 1, so no area is left to compare"
	ReasonPartialTie  = "the 1 - E crossing falls among test points tied at one value; x_E there is only an interpolation"
)

// partialROC computes one PartialROC per E with the published half-size
// bootstrap.
func partialROC(p *presences, s Settings) []PartialROC {
	out := make([]PartialROC, len(s.E))
	for i, e := range s.E {
		pr := p.partialArea(p.count, p.n, e)
		out[i] = PartialROC{E: e, XE: pr.xE, Iterations: s.Iterations, ResampleSize: ResampleSize(s.Fraction, p.n)}
		switch pr.how {
		case crossFormed:
			out[i].Formed = true
			out[i].ModelArea, out[i].NullArea = pr.model, pr.null
			out[i].Ratio = pr.model / pr.null
		case crossNull:
			out[i].Reason = ReasonPartialNull
		case crossTie:
			out[i].Reason = ReasonPartialTie
			out[i].TiedAtCrossing = pr.tied
			out[i].TieValue = p.c.values[p.j[pr.tieGroup]]
			if m, nl, xe, ok := p.discreteArea(p.count, p.n, pr.tieGroup); ok {
				out[i].DiscreteFormed = true
				out[i].DiscreteXE, out[i].DiscreteRatio = xe, m/nl
			} else {
				out[i].DiscreteXE = xe
			}
		}
	}

	B := s.Iterations
	r := ResampleSize(s.Fraction, p.n)
	rng := pcgState{s.Seed, s.Seed ^ pcgStream} // rand.NewPCG(s.Seed, s.Seed^pcgStream)
	counts := make([]int, len(p.j))
	ratios := make([][]float64, len(s.E))
	for i := range ratios {
		ratios[i] = make([]float64, 0, B)
	}
	prs := make([]partialResult, len(s.E))
	var sc areaScratch
	for it := 0; it < B; it++ {
		clear(counts)
		rng = addDraws(rng, r, p.n, p.member, counts)
		p.partialAreas(counts, r, s.E, prs, &sc)
		for i, pr := range prs {
			if pr.how != crossFormed {
				out[i].NotFormed++
				continue
			}
			ratios[i] = append(ratios[i], pr.model/pr.null)
		}
	}
	for i := range out {
		rs := ratios[i]
		if len(rs) == 0 {
			continue
		}
		out[i].RatioMean, out[i].RatioSD = MeanSD(rs)
		le := 0
		for _, v := range rs {
			if v <= 1 {
				le++
			}
		}
		out[i].PValue = float64(le) / float64(len(rs))
		out[i].CILow = quantileSelect(rs, 0.025)
		out[i].CIHigh = quantileSelect(rs, 0.975)
	}
	return out
}

// curve returns the exact vertices of the full-set area ROC curve:
// (0,0), then A and B for each distinct test value in descending order,
// then (1,1), with consecutive duplicates removed.
func (p *presences) curve() []Point {
	pts := make([]Point, 0, 2*len(p.j)+2)
	add := func(x, y float64) {
		if k := len(pts); k > 0 && pts[k-1].X == x && pts[k-1].Y == y {
			return
		}
		pts = append(pts, Point{x, y})
	}
	add(0, 0)
	n := float64(p.n)
	ya := 0
	for g, c := range p.count {
		add(p.xgt[g], float64(ya)/n)
		ya += c
		add(p.xge[g], float64(ya)/n)
	}
	add(1, 1)
	return pts
}
