package report

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// decompose builds the models x extents table of metric m over the extents
// scored for every model and splits its sum of squares (see Decomposition).
func (a *analysis) decompose(m MetricInfo) Decomposition {
	d := Decomposition{Metric: m.Key, Models: append([]string{}, a.models...), Extents: []string{},
		Values: [][]float64{}, Rankings: []ExtentRanking{}, DiffersFromBase: []string{}}
	cols := a.table(m, &d)
	I, J := len(a.models), len(d.Extents)
	// An extent enters the table when m is defined there for every model:
	// every model may be scored on every extent and m still undefined for
	// one (a partial ROC ratio whose crossing falls among tied test points).
	if J == 0 {
		d.Note = "no extent has the score defined for every model"
		d.Sentence = fmt.Sprintf("%s: no extent has it defined for every model, so models cannot be compared.", upperFirst(m.Label))
		return d
	}
	d.rank(cols, a.models, m.HigherIsBetter)
	if J < 2 || I < 2 {
		d.Note = "fewer than two extents with the score defined for every model"
		d.Sentence = fmt.Sprintf("%s: only %d extent has it defined for every model, too few to split extent from model effects.", upperFirst(m.Label), J)
		if I < 2 {
			d.Sentence = fmt.Sprintf("%s: only one model, so extent and model effects cannot be split.", upperFirst(m.Label))
		}
		return d
	}
	d.sumsOfSquares()
	if d.SSTotal <= 0 || allEqual(d.Values) {
		// Equal values give sums of squares of rounding alone (ten
		// omission rates of 0.1 have the grand mean 0.09999999999999999,
		// and each share came out 100%).
		d.SSTotal, d.SSExtent, d.SSModel, d.SSResidual = 0, 0, 0, 0
		d.Note = "every model scores the same on every extent"
		d.Sentence = fmt.Sprintf("%s is identical for every model and extent.", upperFirst(m.Label))
		return d
	}
	d.Defined = true
	d.ShareExtent = d.SSExtent / d.SSTotal
	d.ShareModel = d.SSModel / d.SSTotal
	d.ShareResidual = d.SSResidual / d.SSTotal
	d.Sentence = decompositionSentence(m, &d)
	return d
}

// table sets d's extents (those where m is defined for every model) and
// values (one row per model), and returns the same values by extent.
func (a *analysis) table(m MetricInfo, d *Decomposition) [][]float64 {
	cols := [][]float64{}
	for _, e := range a.extents {
		col := make([]float64, 0, len(a.models))
		for _, model := range a.models {
			sc := a.score(model, e.ID)
			if sc == nil {
				break
			}
			v, ok, _, _, _, _ := metricValue(m, sc)
			if !ok {
				break
			}
			col = append(col, v)
		}
		if len(col) == len(a.models) {
			d.Extents = append(d.Extents, e.ID)
			cols = append(cols, col)
		}
	}
	I, J := len(a.models), len(d.Extents)
	for i := 0; i < I; i++ {
		row := make([]float64, J)
		for j := 0; j < J; j++ {
			row[j] = cols[j][i]
		}
		d.Values = append(d.Values, row)
	}
	return cols
}

// rank sets d's rankings of models on each extent (cols: the values by
// extent, best first as higherIsBetter says), the extents whose order
// differs from the base extent's, and Kendall's W of the rankings.
func (d *Decomposition) rank(cols [][]float64, models []string, higherIsBetter bool) {
	J := len(cols)
	ranks := make([][]float64, J)
	ties := make([]float64, J)
	for j := 0; j < J; j++ {
		ranks[j], ties[j] = ranksBestFirst(cols[j], higherIsBetter)
	}
	d.BaseExtent = BaseExtent(d.Extents)
	base := 0
	for j, id := range d.Extents {
		if id == d.BaseExtent {
			base = j
		}
	}
	for j := 0; j < J; j++ {
		er := ExtentRanking{Extent: d.Extents[j], Ranks: ranks[j], Order: orderByRank(models, ranks[j])}
		for i := range ranks[j] {
			if ranks[j][i] != ranks[base][i] {
				er.DiffersFromBase = true
				break
			}
		}
		if er.DiffersFromBase {
			d.DiffersFromBase = append(d.DiffersFromBase, er.Extent)
		}
		d.Rankings = append(d.Rankings, er)
	}
	if w, ok := kendallW(ranks, ties); ok {
		d.KendallW, d.KendallWDefined = w, true
	}
}

// sumsOfSquares splits the total sum of squares of d's models x extents
// table about its grand mean into the extents', the models' and the
// residual (interaction) parts.
func (d *Decomposition) sumsOfSquares() {
	I, J := len(d.Values), len(d.Extents)
	var gm float64
	rowMean := make([]float64, I)
	colMean := make([]float64, J)
	for i := 0; i < I; i++ {
		for j := 0; j < J; j++ {
			v := d.Values[i][j]
			gm += v
			rowMean[i] += v / float64(J)
			colMean[j] += v / float64(I)
		}
	}
	gm /= float64(I * J)
	d.GrandMean = gm
	for i := 0; i < I; i++ {
		for j := 0; j < J; j++ {
			dv := d.Values[i][j] - gm
			d.SSTotal += dv * dv
			res := d.Values[i][j] - rowMean[i] - colMean[j] + gm
			d.SSResidual += res * res
		}
	}
	for j := 0; j < J; j++ {
		dv := colMean[j] - gm
		d.SSExtent += float64(I) * dv * dv
	}
	for i := 0; i < I; i++ {
		dv := rowMean[i] - gm
		d.SSModel += float64(J) * dv * dv
	}
}

// allEqual reports whether every value of the table is the same number.
func allEqual(values [][]float64) bool {
	for _, row := range values {
		for _, v := range row {
			if v != values[0][0] {
				return false
			}
		}
	}
	return true
}

func orderByRank(models []string, ranks []float64) []string {
	idx := make([]int, len(models))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(x, y int) bool { return ranks[idx[x]] < ranks[idx[y]] })
	out := make([]string, len(idx))
	for k, i := range idx {
		out[k] = models[i]
	}
	return out
}

func decompositionSentence(m MetricInfo, d *Decomposition) string {
	p := sharePercents(d.ShareExtent, d.ShareModel, d.ShareResidual)
	s := fmt.Sprintf("Over this family of %d extents scored for %s, the sum of squares of %s splits into extent %d%%, model %d%% and non-additive %d%%; the split is a property of the extents chosen (another family gives another split), so it describes this table only.",
		len(d.Extents), allOfNoun(len(d.Models), "model"), m.Label, p[0], p[1], p[2])
	if d.KendallWDefined {
		s += fmt.Sprintf(" Kendall's W = %s (a description of agreement, no test): ", f3(d.KendallW))
		if len(d.DiffersFromBase) == 0 {
			// Of the point estimates: two models within noise on every
			// extent can still have W = 1.
			s += fmt.Sprintf("every extent orders the models' point estimates as %s does; see the paired model differences for whether that order is beyond noise.", d.BaseExtent)
		} else {
			s += fmt.Sprintf("the order of the point estimates differs from %s on %s; see the paired model differences for whether that is beyond noise.", d.BaseExtent, strings.Join(d.DiffersFromBase, ", "))
		}
	} else if len(d.Models) >= 2 && len(d.Extents) >= 2 {
		// kendallW's denominator is 0 only when every extent ties every
		// model: there is no order to agree on.
		s += " Kendall's W is undefined: the models tie on every extent."
	}
	return s
}

// sharePercents rounds shares that add up to 1 (the extent, model and
// non-additive parts of a sum of squares) to whole percents that add up
// to 100, by largest remainder: each rounded on its own, 0.4, 99.2 and
// 0.4% read "0%, 99% and 0%", and three thirds "33%" each, a split
// of 99% (50, 48 and 3% on the demo's AUC, 101%). The percents left over
// after rounding each down go to the largest remainders, an earlier
// share first on a tie, so that the same shares always print the same.
func sharePercents(shares ...float64) []int {
	out := make([]int, len(shares))
	rem := make([]float64, len(shares))
	total, sum := 0.0, 0
	for i, v := range shares {
		x := 100 * v
		total += x
		out[i] = int(math.Floor(x))
		rem[i] = x - float64(out[i])
		sum += out[i]
	}
	idx := make([]int, len(shares))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return rem[idx[a]] > rem[idx[b]] })
	for k := 0; k < int(math.Round(total))-sum && k < len(idx); k++ {
		out[idx[k]]++
	}
	return out
}
