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
// across [min, max], fixed by the extent's own cells), taking each bin's
// area as spread uniformly over the bin's interval clipped to [min, max],
// and counting the overlapping part of partial bins (linear interpolation).
// A bin whose clipped interval is a single point counts wholly when the
// point lies in the window. Only the bins that a window cuts contribute an
// error, so E_i is exact when window ends fall on bin edges. P_i is exact.
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
// share of the extent's area.
type boyceWindow struct{ lo, hi, mid, share float64 }

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
	// whole[k] is bin k's term when a window holds all of its interval
	// (ov below is then e1[k] - e0[k], the same operands): computed once
	// per bin instead of once per window holding it (about ten).
	whole := make([]float64, nb)
	for k := range nb {
		if ar := a.hist[i0+k].area; ar != 0 && e1[k] > e0[k] {
			whole[k] = float64(ar) * (e1[k] - e0[k]) / (e1[k] - e0[k])
		}
	}

	areaIn := func(lo, hi float64) float64 {
		var s float64
		// Bins whose interval can touch [lo, hi] (one more on each side,
		// for the clipped ends).
		k0 := max(0, int(gridBin(lo, a.he)-a.hbase)-i0-1)
		k1 := min(nb-1, int(gridBin(hi, a.he)-a.hbase)-i0+1)
		for k := k0; k <= k1; k++ {
			ar := a.hist[i0+k].area
			if ar == 0 {
				continue
			}
			if e1[k] > e0[k] {
				if e0[k] >= lo && e1[k] <= hi {
					s += whole[k]
					continue
				}
				ov := math.Min(e1[k], hi) - math.Max(e0[k], lo)
				if ov > 0 {
					s += float64(ar) * ov / (e1[k] - e0[k])
				}
			} else if e0[k] >= lo && e0[k] <= hi {
				s += float64(ar)
			}
		}
		return s
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
		e := areaIn(lo, hi) / total
		if !(e > minBoyceShare) {
			continue
		}
		out = append(out, boyceWindow{lo: lo, hi: hi, mid: lo + w/2, share: e})
	}
	return out
}

// boyce computes the continuous Boyce index; sortedTest is ascending.
func boyce(a *Accumulator, sortedTest []float64, width float64, steps int) Boyce {
	b := Boyce{Windows: steps}
	n := float64(len(sortedTest))
	for _, w := range boyceWindows(a, width, steps) {
		c := sort.SearchFloat64s(sortedTest, math.Nextafter(w.hi, math.Inf(1))) - sort.SearchFloat64s(sortedTest, w.lo)
		b.Mid = append(b.Mid, w.mid)
		b.Ratio = append(b.Ratio, (float64(c)/n)/w.share)
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
