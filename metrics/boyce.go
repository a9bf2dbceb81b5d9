package metrics

import (
	"math"
	"sort"
)

// Boyce is the continuous Boyce index after Hirzel, Le Lay, Helfer, Randin &
// Guisan (2006).
//
// Over the extent's value range [min, max] a window of width
// w = BoyceWidth*(max-min) moves in BoyceSteps equal steps from [min, min+w]
// to [max-w, max] (one window at min when BoyceSteps == 1). For window i,
// both ends inclusive:
//
//	P_i = share of test presences with value in the window
//	E_i = share of the extent's area with value in the window
//	F_i = P_i / E_i
//
// Windows with E_i = 0 are skipped (E_i <= 1e-12, rounding dust of the
// interpolation below, counts as 0). The index is the Spearman rank
// correlation (average ranks for ties) between F_i and the window midpoints
// over the used windows.
//
// Approximation: E_i is read from the extent's fine histogram (Accumulator:
// equal bins of width 2^e on a dyadic grid, at least (HistBins-1)/2 of them
// across [min, max], fixed by the extent's own cells) and its exact bins.
// The area exactly at each layout value (every presence value and fixed
// threshold: an exact bin of the Layout) is a point mass, counted wholly
// by the windows that hold the value, as P_i counts the presences there,
// and taken out of the histogram bin that holds the value. The rest of
// each bin's area is taken as spread uniformly over the bin's interval
// clipped to [min, max], counting the overlapping part of partial bins
// (linear interpolation). A bin whose clipped interval is a single point
// counts wholly when the point lies in the window. Only the spread area of
// the bins that a window cuts contributes an error, so E_i is exact when
// window ends fall on bin edges, and for every window when each value of
// the extent's cells is a layout value (a model with few values, such as
// a Byte raster, whose values all hold presences). P_i is exact. Without
// the point masses a window ending on a value held by presences would
// count those presences in P_i but only a sliver (or all) of the value's
// area in E_i, depending on the rounding of the window's end.
//
// Index is 0 and Defined false, with Reason saying why, when fewer than 3
// windows are used or F or the midpoints do not vary. Mid and Ratio list the
// used windows' midpoints and F_i.
//
// Hirzel, A.H., Le Lay, G., Helfer, V., Randin, C. & Guisan, A. (2006)
// Evaluating the ability of habitat suitability models to predict species
// presences. Ecological Modelling 199:142-152.
type Boyce struct {
	Index   float64
	Windows int
	Used    int
	Mid     []float64
	Ratio   []float64
	Defined bool
	// Reason says why the index is undefined (empty when Defined).
	Reason string
}

// minBoyceShare is the area share at or below which a window counts as
// empty: interpolation can leave rounding dust in windows that only touch a
// bin's edge.
const minBoyceShare = 1e-12

// boyceWindow is one used Boyce window: its ends (inclusive), midpoint and
// share of the extent's area. When exact, the window's area is units of
// the extent's total area units (point masses only: no bin's area spread
// over an interval reaches into the window), and its P/E ratios are
// computed from those integers (ratio).
type boyceWindow struct {
	lo, hi, mid, share float64
	exact              bool
	units, total       int64
}

// ratio is the window's P/E for run of n presences in it:
//
//	F = (run / n) / share.
//
// For an exact window share is units / total, and F is computed from the
// fraction run / units in lowest terms, p / q:
//
//	F = (p / n) / (q / total),
//
// so that ratios equal in exact arithmetic (two windows of as many
// equal-area cells, presences in proportion: the same p / q) are equal
// bit for bit and rank as a tie, as they do on exact areas; rounding
// (run / n) / share left them one unit in the last place apart now and
// then, ranked as two values.
func (w *boyceWindow) ratio(run, n int) float64 {
	if !w.exact || run == 0 {
		return (float64(run) / float64(n)) / w.share
	}
	g := gcd(uint64(w.units), uint64(run))
	p, q := uint64(run)/g, uint64(w.units)/g
	return (float64(p) / float64(n)) / (float64(q) / float64(w.total))
}

// gcd returns the greatest common divisor of a and b (Euclid).
func gcd(a, b uint64) uint64 {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}

// boyceWindows returns the windows with background area (share above
// minBoyceShare), in order, for an extent's accumulator.
func boyceWindows(a *Accumulator, width float64, steps int) []boyceWindow {
	mn, mx := a.min, a.max
	span := mx - mn
	if math.IsInf(span, 0) || math.IsNaN(span) {
		return nil // a range wider than float64 holds: no window can be placed
	}
	w := width * span

	// The bins that can hold a cell, each with its interval clipped to
	// [min, max].
	i0, i1 := a.occupied()
	nb := i1 - i0 + 1
	e0 := make([]float64, nb)
	e1 := make([]float64, nb)
	for k := range nb {
		lo, hi := a.histEdges(i0 + k)
		lo, hi = math.Max(lo, mn), math.Min(hi, mx)
		if hi < lo {
			hi = lo
		}
		e0[k], e1[k] = lo, hi
	}
	total := float64(a.area)
	spread, pv, pcum := a.pointMasses(i0, nb)
	// A bin whose spread area can lie at one value only (the model's
	// value set holds one value in it besides the layout's) holds it as
	// a point mass there.
	if point, one := a.binPoints(i0, nb); point != nil {
		for k := range nb {
			if one[k] && spread[k] > 0 {
				e0[k], e1[k] = point[k], point[k]
			}
		}
	}
	// whole[k] is bin k's term when a window holds all of its interval
	// (ov below is then e1[k] - e0[k], the same operands): computed once
	// per bin instead of once per window holding it (about ten).
	whole := make([]float64, nb)
	for k := range nb {
		if ar := spread[k]; ar != 0 && e1[k] > e0[k] {
			whole[k] = spreadArea(float64(ar), e1[k]-e0[k], e1[k]-e0[k])
		}
	}

	// areaIn returns the area in [lo, hi], and whether it is the exact
	// sum units of point masses (no spread bin reaches into the window).
	areaIn := func(lo, hi float64) (s float64, units int64, exact bool) {
		exact = true
		// Bins whose interval can touch [lo, hi] (one more on each side,
		// for the clipped ends).
		k0 := max(0, int(gridBin(lo, a.he)-a.hbase)-i0-1)
		k1 := min(nb-1, int(gridBin(hi, a.he)-a.hbase)-i0+1)
		for k := k0; k <= k1; k++ {
			ar := spread[k]
			if ar == 0 {
				continue
			}
			if e1[k] > e0[k] {
				if e0[k] >= lo && e1[k] <= hi {
					s += whole[k]
					exact = false
					continue
				}
				ov := math.Min(e1[k], hi) - math.Max(e0[k], lo)
				if ov > 0 {
					s += spreadArea(float64(ar), ov, e1[k]-e0[k])
					exact = false
				}
			} else if e0[k] >= lo && e0[k] <= hi {
				s += float64(ar)
				units += ar
			}
		}
		pa, pu := pointArea(pv, pcum, lo, hi)
		return s + pa, units + pu, exact
	}

	var step float64
	if steps > 1 {
		step = (span - w) / float64(steps-1)
	}
	var out []boyceWindow
	for i := 0; i < steps; i++ {
		lo := mn + float64(i)*step
		hi := lo + w
		if i == steps-1 && steps > 1 {
			hi = mx
		}
		ar, units, exact := areaIn(lo, hi)
		e := ar / total
		if !(e > minBoyceShare) {
			continue
		}
		out = append(out, boyceWindow{lo: lo, hi: hi, mid: lo + w/2, share: e, exact: exact && units > 0, units: units, total: a.area})
	}
	return out
}

// pointMasses splits the histogram bins i0..i0+nb-1 of a: spread[k] is
// bin i0+k's area less the area exactly at the layout values it holds;
// pv are those values with area, ascending, and pcum their cumulative
// areas (pcum[0] = 0, pcum[j+1] = pcum[j] + area at pv[j]). Every cell at a
// layout value lies in that value's histogram bin; a bin that would go
// negative (which the accumulator's invariants rule out) keeps its area
// spread.
func (a *Accumulator) pointMasses(i0, nb int) (spread []int64, pv []float64, pcum []int64) {
	spread = make([]int64, nb)
	for k := range nb {
		spread[k] = a.hist[i0+k].area
	}
	pcum = []int64{0}
	for j, v := range a.layout.d {
		m := a.bins[2*j+1].area
		if m <= 0 {
			continue
		}
		if v == 0 {
			v = 0 // cells at -0 and +0 are added as +0
		}
		k := int(gridBin(v, a.he)-a.hbase) - i0
		if k < 0 || k >= nb || spread[k] < m {
			continue
		}
		spread[k] -= m
		pv = append(pv, v)
		pcum = append(pcum, pcum[len(pcum)-1]+m)
	}
	return spread, pv, pcum
}

// pointArea returns the area of the point masses pv (cumulative areas
// pcum, see pointMasses) that lie in [lo, hi], as a float64 and in units.
func pointArea(pv []float64, pcum []int64, lo, hi float64) (float64, int64) {
	i := sort.SearchFloat64s(pv, lo)
	j := sort.Search(len(pv), func(k int) bool { return pv[k] > hi })
	if j <= i {
		return 0, 0
	}
	return float64(pcum[j] - pcum[i]), pcum[j] - pcum[i]
}

// boyce computes the continuous Boyce index on the used windows win of
// an extent (boyceWindows) of steps windows; sortedTest is ascending.
func boyce(win []boyceWindow, steps int, sortedTest []float64) Boyce {
	b := Boyce{Windows: steps}
	for i := range win {
		w := &win[i]
		c := sort.SearchFloat64s(sortedTest, math.Nextafter(w.hi, math.Inf(1))) - sort.SearchFloat64s(sortedTest, w.lo)
		b.Mid = append(b.Mid, w.mid)
		b.Ratio = append(b.Ratio, w.ratio(c, len(sortedTest)))
	}
	b.Used = len(b.Mid)
	b.Index, b.Defined, b.Reason = boyceIndex(b.Ratio, b.Mid)
	return b
}

// Reasons given in Boyce.Reason.
const (
	ReasonBoyceWindows = "fewer than 3 windows with background area"
	ReasonBoyceFlat    = "no variation in the predicted/expected ratio or the window midpoints"
)

// boyceIndex is the Spearman correlation of the P/E ratios with the window
// midpoints, or the reason it is undefined.
func boyceIndex(ratio, mid []float64) (float64, bool, string) {
	if len(ratio) < 3 {
		return 0, false, ReasonBoyceWindows
	}
	rho, ok := Spearman(ratio, mid)
	if !ok {
		return 0, false, ReasonBoyceFlat
	}
	return rho, true, ""
}

// spreadArea is the part of a bin's area ar (its width w) on an overlap
// of width ov, ar * ov / w, computed as ar * (ov / w) where ar * ov
// overflows (a model whose values reach about 1e295: area units times a
// bin's width pass the largest float64, and a window's share became +Inf),
// so that every other case keeps its bits.
func spreadArea(ar, ov, w float64) float64 {
	if x := ar * ov; !math.IsInf(x, 0) {
		return x / w
	}
	return ar * (ov / w)
}
