package metrics

import (
	"fmt"
	"math"
	"math/bits"
	"slices"
)

// Reasons given in Scores.NotScored.
const (
	ReasonNoBackground = "no background cells"
	ReasonNoArea       = "background area is zero"
	ReasonNoTest       = "no test presences"
	ReasonConstant     = "constant suitability (minimum equals maximum on this extent)"
)

// Scores holds every metric of one model on one extent.
//
// No returned number is NaN or infinite. A quantity that is undefined is set
// to 0 and the reason is recorded: NotScored for the whole record,
// PartialROC.Formed / NotFormed for partial ROC, Boyce.Defined and
// Boyce.Reason for the Boyce index, TrainN == 0 for AUCTrain and the
// training-presence thresholds (which are then left out).
type Scores struct {
	// Scored is false when the extent cannot be scored; NotScored says why
	// (one of the Reason constants) and only Cells, Area, TestN and TrainN
	// are filled.
	Scored    bool
	NotScored string
	// Cells and Area are the background's cell count and total area weight.
	Cells int64
	Area  int64
	// TestN and TrainN are the numbers of test and training presences.
	TestN, TrainN int

	// AUC is the area-weighted full AUC of the test presences against the
	// background, AUCUnweighted the same with every cell counted once, and
	// AUCTrain the area-weighted AUC of the training presences (0 when
	// TrainN == 0). With the Mann-Whitney statistic (ties count 1/2) of
	// Hanley & McNeil (1982):
	//
	//	AUC = sum_p [ W(< v_p) + W(= v_p)/2 ] / (n * W_total)
	//
	// where W(.) is the background area (cell count for AUCUnweighted) with
	// value below / equal to the presence value v_p, n the number of
	// presences and W_total the whole background (the extent's cells,
	// presences' own cells included). The numerator is summed exactly in
	// 128-bit integers; the only rounding is the final division. The area
	// under Curve equals AUC.
	//
	// Hanley, J.A. & McNeil, B.J. (1982) The meaning and use of the area
	// under a receiver operating characteristic (ROC) curve. Radiology
	// 143:29-36.
	AUC, AUCUnweighted, AUCTrain float64
	// Placements holds, for each test presence in the order given to
	// Score, its placement V_i: the share of the extent's area scoring
	// below v_i plus half the share scoring exactly v_i (see Placements).
	// AUC is their mean. PlacementsUnweighted is the same with every cell
	// counted once (its mean is AUCUnweighted).
	Placements, PlacementsUnweighted []float64
	// AUCSE is the standard error of AUC from the test presences alone,
	// the background being the complete population of the extent's cells
	// (0 when TestN < 2; see PlacementSE).
	AUCSE float64
	// AUCUnweightedVarDeLong is DeLong's variance of AUCUnweighted with
	// the cells treated as a sample, each counted once (0 when TestN < 2 or
	// Cells < 2; see DeLongVariance).
	AUCUnweightedVarDeLong float64

	// PartialROC holds one result per Settings.E, in that order.
	PartialROC []PartialROC
	// Thresholds holds the minimum training presence and 10th-percentile
	// training presence thresholds (when TrainN > 0), then the fixed
	// thresholds in Settings order.
	Thresholds []Threshold
	// Boyce is the continuous Boyce index.
	Boyce Boyce
	// Curve is the ROC curve on the area axis for drawing: X = share of the
	// extent's area with value >= t, Y = share of test presences with value
	// >= t. Its vertices are exact curve vertices (see PartialROC), thinned
	// to at most MaxCurvePoints, from (0,0) to (1,1).
	Curve []Point
}

// Point is one vertex of a drawn curve.
type Point struct{ X, Y float64 }

// Score scores one model on one extent. a holds the extent's background
// cells (presences' own cells included); train and test are the model's
// values at the scored training and test presences, which must be finite
// and must be layout values (passed to NewLayout). Settings are validated
// and defaulted.
//
// Score's cost depends on the number of layout values, fine-histogram bins,
// presences and bootstrap iterations, never on the number of cells.
func Score(a *Accumulator, train, test []float64, s Settings) (Scores, error) {
	sc, _, err := score(a, train, test, s)
	return sc, err
}

// scored is what Score computed that NewEvaluator needs too, for the same
// accumulator, test values and settings (see ScoreEvaluator).
type scored struct {
	cum     *cumulative
	testIdx []int
	tp      *presences
	win     []boyceWindow
}

// ScoreEvaluator is Score, then, when the extent is scored, NewEvaluator
// on the same accumulator, test values and settings, with ids the test
// presences' global indices and the values of Score's thresholds as the
// thresholds; the evaluator takes what Score computed (the cumulative
// areas, the test presences' groups, the Boyce windows) instead of
// computing it again, so it is the evaluator NewEvaluator makes. ev is nil
// when sc.Scored is false.
func ScoreEvaluator(a *Accumulator, train, test []float64, ids []int, s Settings) (sc Scores, ev *Evaluator, err error) {
	sc, parts, err := score(a, train, test, s)
	if err != nil || !sc.Scored {
		return sc, nil, err
	}
	ths := make([]float64, len(sc.Thresholds))
	for i, t := range sc.Thresholds {
		ths[i] = t.Value
	}
	ev, err = newEvaluator(a, test, ids, ths, s, parts)
	return sc, ev, err
}

// score is Score, with what it computed that NewEvaluator needs (nil
// when the extent is not scored).
func score(a *Accumulator, train, test []float64, s Settings) (Scores, *scored, error) {
	if a == nil {
		return Scores{}, nil, fmt.Errorf("metrics: Score: nil accumulator")
	}
	if err := s.Validate(); err != nil {
		return Scores{}, nil, err
	}
	s = s.WithDefaults()
	l := a.layout
	for i, v := range train {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Scores{}, nil, fmt.Errorf("metrics: Score: training presence %d has non-finite value %v", i, v)
		}
	}
	for i, v := range test {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Scores{}, nil, fmt.Errorf("metrics: Score: test presence %d has non-finite value %v", i, v)
		}
	}
	trainIdx, err := layoutIndices(l, train, "training presence")
	if err != nil {
		return Scores{}, nil, err
	}
	testIdx, err := layoutIndices(l, test, "test presence")
	if err != nil {
		return Scores{}, nil, err
	}
	fixedIdx, err := layoutIndices(l, s.FixedThresholds, "fixed threshold")
	if err != nil {
		return Scores{}, nil, err
	}

	sc := Scores{Cells: a.cells, Area: a.area, TestN: len(test), TrainN: len(train)}
	switch {
	case a.cells == 0:
		sc.NotScored = ReasonNoBackground
		return sc, nil, nil
	case a.area == 0:
		sc.NotScored = ReasonNoArea
		return sc, nil, nil
	case len(test) == 0:
		sc.NotScored = ReasonNoTest
		return sc, nil, nil
	case a.min == a.max:
		sc.NotScored = ReasonConstant
		return sc, nil, nil
	}
	sc.Scored = true

	cum := newCumulative(a)
	tp := newPresences(cum, testIdx)
	sc.AUC = cum.auc(tp, false)
	sc.AUCUnweighted = cum.auc(tp, true)
	if len(train) > 0 {
		sc.AUCTrain = cum.auc(newPresences(cum, trainIdx), false)
	}

	sc.Placements = cum.placements(testIdx, false)
	sc.PlacementsUnweighted = cum.placements(testIdx, true)
	sc.AUCSE = PlacementSE(sc.Placements, sc.AUC)
	sc.AUCUnweightedVarDeLong = cum.delongVariance(tp, sc.PlacementsUnweighted, sc.AUCUnweighted)

	sc.PartialROC = partialROC(tp, s)
	areaRandom(a, cum, tp.n, s, sc.PartialROC)

	thTrain, thIdx := train, trainIdx
	if s.ThresholdTrain != nil {
		for i, v := range s.ThresholdTrain {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return Scores{}, nil, fmt.Errorf("metrics: Score: ThresholdTrain[%d] has non-finite value %v", i, v)
			}
		}
		if thIdx, err = layoutIndices(l, s.ThresholdTrain, "threshold training presence"); err != nil {
			return Scores{}, nil, err
		}
		thTrain = s.ThresholdTrain
	}
	sc.Thresholds = thresholds(cum, tp, thTrain, thIdx, s.FixedThresholds, fixedIdx)

	sortedTest := slices.Clone(test)
	slices.Sort(sortedTest)
	win := boyceWindows(a, s.BoyceWidth, s.BoyceSteps)
	sc.Boyce = boyce(win, s.BoyceSteps, sortedTest)

	sc.Curve = thinCurve(tp.curve(), MaxCurvePoints)
	return sc, &scored{cum: cum, testIdx: testIdx, tp: tp, win: win}, nil
}

// layoutIndices returns, for each value, its index j in the layout
// (v == d_j), or an error naming the first value that is not a layout value.
func layoutIndices(l *Layout, vals []float64, what string) ([]int, error) {
	idx := make([]int, len(vals))
	for i, v := range vals {
		j := l.index(v)
		if j < 0 {
			return nil, fmt.Errorf("metrics: Score: %s %d has value %v, which is not a layout value (pass every presence value and fixed threshold to NewLayout)", what, i, v)
		}
		idx[i] = j
	}
	return idx, nil
}

// cumulative holds, for each layout value d_j, the exact background area
// and cell count strictly below and at d_j.
type cumulative struct {
	w, n       int64   // total area and cells
	ltA, eqA   []int64 // area below / at d_j
	ltN, eqN   []int64 // cells below / at d_j
	values     []float64
	totalAreaF float64
}

func newCumulative(a *Accumulator) *cumulative {
	m := len(a.layout.d)
	c := &cumulative{
		w: a.area, n: a.cells, values: a.layout.d, totalAreaF: float64(a.area),
		ltA: make([]int64, m), eqA: make([]int64, m), ltN: make([]int64, m), eqN: make([]int64, m),
	}
	var sa, sn int64
	for j := 0; j < m; j++ {
		sa += a.bins[2*j].area
		sn += a.bins[2*j].n
		c.ltA[j], c.ltN[j] = sa, sn
		c.eqA[j], c.eqN[j] = a.bins[2*j+1].area, a.bins[2*j+1].n
		sa += c.eqA[j]
		sn += c.eqN[j]
	}
	return c
}

// geArea is the exact area at or above d_j.
func (c *cumulative) geArea(j int) int64 { return c.w - c.ltA[j] }

// presences is a set of presences grouped by distinct value, in descending
// value order, with the curve abscissae precomputed.
type presences struct {
	n     int
	j     []int     // layout index of each distinct value (descending value)
	count []int     // presences at that value
	xgt   []float64 // share of area with value > u
	xge   []float64 // share of area with value >= u
	below []float64 // (W(<u) + W(=u)/2) / W, the per-presence AUC term
	// member[i] is the position in j of the i-th presence in ascending
	// value order; the bootstrap draws positions i.
	member []int
	c      *cumulative
}

func newPresences(c *cumulative, idx []int) *presences {
	sorted := slices.Clone(idx)
	slices.Sort(sorted)
	// At most one group per presence: the groups' slices are sized once.
	n := len(sorted)
	p := &presences{n: n, c: c, member: make([]int, n),
		j: make([]int, 0, n), count: make([]int, 0, n),
		xgt: make([]float64, 0, n), xge: make([]float64, 0, n), below: make([]float64, 0, n)}
	for i := len(sorted) - 1; i >= 0; i-- {
		j := sorted[i]
		if k := len(p.j); k > 0 && p.j[k-1] == j {
			p.count[k-1]++
			continue
		}
		p.j = append(p.j, j)
		p.count = append(p.count, 1)
		ge := c.geArea(j)
		p.xge = append(p.xge, float64(ge)/c.totalAreaF)
		p.xgt = append(p.xgt, float64(ge-c.eqA[j])/c.totalAreaF)
		p.below = append(p.below, (float64(c.ltA[j])+float64(c.eqA[j])/2)/c.totalAreaF)
	}
	// member: ascending order of presences maps to descending groups.
	pos := 0
	for g := len(p.j) - 1; g >= 0; g-- {
		for k := 0; k < p.count[g]; k++ {
			p.member[pos] = g
			pos++
		}
	}
	return p
}

// auc returns the full AUC of the presences p against the background (see
// Scores.AUC for the formula and citation); cells selects cell counts
// instead of area weights.
func (c *cumulative) auc(p *presences, cells bool) float64 {
	lt, eq, total := c.ltA, c.eqA, c.w
	if cells {
		lt, eq, total = c.ltN, c.eqN, c.n
	}
	var hi, lo uint64
	for g, j := range p.j {
		term := 2*uint64(lt[j]) + uint64(eq[j]) // <= 2*W < 2^64
		h, l := bits.Mul64(uint64(p.count[g]), term)
		var carry uint64
		lo, carry = bits.Add64(lo, l, 0)
		hi += h + carry
	}
	num := float64(hi)*0x1p64 + float64(lo)
	// num <= 2 n W exactly; the conversions and the division may round
	// past 1 by an ulp, which is not a value an AUC can take.
	return math.Min(1, num/(2*float64(p.n)*float64(total)))
}
