package metrics

import (
	"math"
	"math/rand/v2"
	"slices"
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
// The count (1-E)n is rounded to the nearest integer when it is within
// 1e-9 of one, so that for example E = 0.05 and n = 20 reaches the 19th
// presence exactly despite binary rounding of 0.95.
//
// The bootstrap repeats this on B resamples, each drawing
// max(1, round(f*n)) test presences with replacement (f = Settings.Fraction;
// math/rand/v2 PCG seeded with (Seed, Seed xor 0x9E3779B97F4A7C15); draws
// are positions in the ascending-sorted test values, so results depend only
// on the multiset of test values and the seed; the same resamples serve all
// E). A resample whose curve cannot be formed (null area 0 because x_E = 1)
// is counted in NotFormed and left out of RatioMean, RatioSD (sample SD,
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
	// bootstrap resamples (see the type comment).
	RatioMean, RatioSD, CILow, CIHigh, PValue float64
	// Iterations is the number of resamples drawn, NotFormed how many of
	// them could not form a curve.
	Iterations, NotFormed int
	// Formed reports whether the full-set curve could be formed.
	Formed bool
	// XE is the full-set x_E: the share of area predicted present when the
	// curve first reaches 1-E.
	XE float64
	// ModelArea and NullArea are the full-set areas whose ratio is Ratio.
	ModelArea, NullArea float64
}

// snapCount rounds x to the nearest integer when it is within 1e-9
// (relative, at least absolute) of it.
func snapCount(x float64) float64 {
	r := math.Round(x)
	if math.Abs(x-r) <= 1e-9*math.Max(1, math.Abs(x)) {
		return r
	}
	return x
}

// partialArea computes the partial ROC areas of the curve formed by the
// presences with counts[g] presences at group g (descending value order,
// r presences in all).
func (p *presences) partialArea(counts []int, r int, e float64) (model, null, xE float64, ok bool) {
	rf := float64(r)
	tau := snapCount((1 - e) * rf)
	ya := 0
	crossed := false
	prevX, prevY := 0.0, 0
	for g, c := range counts {
		if c == 0 {
			continue
		}
		yb := ya + c
		xa, xb := p.xgt[g], p.xge[g]
		switch {
		case crossed:
			model += (xa - prevX) * float64(prevY)  // horizontal B->A
			model += (xb - xa) * float64(ya+yb) / 2 // diagonal or vertical A->B
		case float64(yb) >= tau:
			s := (tau - float64(ya)) / float64(c)
			if s >= 1 {
				xE = xb
			} else {
				xE = xa + s*(xb-xa)
			}
			model += (xb - xE) * (tau + float64(yb)) / 2
			crossed = true
		}
		prevX, prevY = xb, yb
		ya = yb
	}
	model += (1 - prevX) * rf // last B -> (1,1)
	model /= rf
	null = (1 - xE*xE) / 2
	if !(null > 0) {
		return 0, 0, xE, false
	}
	return model, null, xE, true
}

// partialROC computes one PartialROC per E and the bootstrap SD of the
// weighted AUC.
func partialROC(p *presences, s Settings) ([]PartialROC, float64) {
	out := make([]PartialROC, len(s.E))
	for i, e := range s.E {
		model, null, xE, ok := p.partialArea(p.count, p.n, e)
		out[i] = PartialROC{E: e, Formed: ok, XE: xE, ModelArea: model, NullArea: null, Iterations: s.Iterations}
		if ok {
			out[i].Ratio = model / null
		}
	}

	B := s.Iterations
	r := max(1, int(math.Round(s.Fraction*float64(p.n))))
	rng := rand.New(rand.NewPCG(s.Seed, s.Seed^pcgStream))
	counts := make([]int, len(p.j))
	ratios := make([][]float64, len(s.E))
	for i := range ratios {
		ratios[i] = make([]float64, 0, B)
	}
	aucs := make([]float64, B)
	for it := 0; it < B; it++ {
		clear(counts)
		for k := 0; k < r; k++ {
			counts[p.member[rng.IntN(p.n)]]++
		}
		var auc float64
		for g, c := range counts {
			auc += float64(c) * p.below[g]
		}
		aucs[it] = auc / float64(r)
		for i, e := range s.E {
			model, null, _, ok := p.partialArea(counts, r, e)
			if !ok {
				out[i].NotFormed++
				continue
			}
			ratios[i] = append(ratios[i], model/null)
		}
	}
	for i := range out {
		rs := ratios[i]
		if len(rs) == 0 {
			continue
		}
		out[i].RatioMean, out[i].RatioSD = meanSD(rs)
		le := 0
		for _, v := range rs {
			if v <= 1 {
				le++
			}
		}
		out[i].PValue = float64(le) / float64(len(rs))
		slices.Sort(rs)
		out[i].CILow = quantileSorted(rs, 0.025)
		out[i].CIHigh = quantileSorted(rs, 0.975)
	}
	_, sd := meanSD(aucs)
	return out, sd
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
