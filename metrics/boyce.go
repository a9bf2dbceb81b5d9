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
// Approximation: E_i is read from the fine histogram, taking each bin's area
// as spread uniformly over the bin's interval clipped to [min, max] (end
// bins extended to min and max when values were clamped into them), and
// counting the overlapping part of partial bins (linear interpolation). A
// bin whose clipped interval is a single point counts wholly when the point
// lies in the window. P_i is exact.
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
	l := a.layout
	mn, mx := a.min, a.max
	span := mx - mn
	w := width * span

	// Effective interval of every histogram bin.
	H := l.hBins
	e0 := make([]float64, H)
	e1 := make([]float64, H)
	for k := 0; k < H; k++ {
		lo, hi := l.histEdge(k), l.histEdge(k+1)
		if k == 0 || lo < mn {
			lo = mn
		}
		if k == H-1 || hi > mx {
			hi = mx
		}
		if hi < lo {
			hi = lo
		}
		e0[k], e1[k] = lo, hi
	}
	hw := l.histWidth()
	total := float64(a.area)

	areaIn := func(lo, hi float64) float64 {
		var s float64
		// Interior bins whose nominal interval can touch [lo, hi]; the
		// end bins (possibly extended) are visited separately.
		k0 := int(math.Max(1, math.Min(float64(H), math.Floor((lo-l.hMin)/hw)-1)))
		k1 := int(math.Max(0, math.Min(float64(H-2), math.Floor((hi-l.hMin)/hw)+1)))
		visit := func(k int) {
			ar := a.hist[k].area
			if ar == 0 {
				return
			}
			if e1[k] > e0[k] {
				ov := math.Min(e1[k], hi) - math.Max(e0[k], lo)
				if ov > 0 {
					s += float64(ar) * ov / (e1[k] - e0[k])
				}
			} else if e0[k] >= lo && e0[k] <= hi {
				s += float64(ar)
			}
		}
		visit(0)
		for k := k0; k <= k1; k++ {
			visit(k)
		}
		if H > 1 {
			visit(H - 1)
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
