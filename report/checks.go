package report

import (
	"fmt"
	"math"
	"sort"
)

// truncation checks every model for a large floor and straight ROC tails.
func (a *analysis) truncation() []TruncationCheck {
	floors := map[string]float64{}
	for _, m := range a.r.Models {
		if _, ok := floors[m.Name]; !ok {
			floors[m.Name] = m.FloorShare
		}
	}
	var out []TruncationCheck
	for _, model := range a.models {
		t := TruncationCheck{Model: model, FloorShare: floors[model], Tails: []TailJump{}}
		t.FloorFlag = t.FloorShare >= FloorShareFlag
		for _, c := range a.r.Curves {
			if c.Model != model || a.score(model, c.Extent) == nil {
				continue
			}
			tj, ok := lastSegment(c)
			if !ok {
				continue
			}
			if tj.Jump > t.MaxJump {
				t.MaxJump = tj.Jump
			}
			if tj.Jump > TailJumpFlag {
				t.Tails = append(t.Tails, tj)
			}
		}
		t.Flag = t.FloorFlag || len(t.Tails) > 0
		t.Sentence = a.truncationSentence(&t)
		out = append(out, t)
	}
	return out
}

// lastSegment returns the last non-degenerate segment of a ROC curve on the
// area axis, i.e. the step to the lowest threshold (largest x). Vertices are
// taken in order of x (stable); trailing repeats of the last vertex are
// ignored.
func lastSegment(c Curve) (TailJump, bool) {
	n := len(c.X)
	if len(c.Y) < n {
		n = len(c.Y)
	}
	if n < 2 {
		return TailJump{}, false
	}
	idx := make([]int, n)
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(i, j int) bool { return c.X[idx[i]] < c.X[idx[j]] })
	last := idx[n-1]
	k := n - 2
	for k >= 0 && c.X[idx[k]] == c.X[last] && c.Y[idx[k]] == c.Y[last] {
		k--
	}
	if k < 0 {
		return TailJump{}, false
	}
	p := idx[k]
	return TailJump{Extent: c.Extent, XFrom: c.X[p], YFrom: c.Y[p], Jump: c.X[last] - c.X[p]}, true
}

func (a *analysis) truncationSentence(t *TruncationCheck) string {
	if !t.Flag {
		return fmt.Sprintf("Model %s shows no sign of truncated predictions (floor covers %s of the valid area; longest final ROC segment %s).",
			t.Model, pct(t.FloorShare), f3(t.MaxJump))
	}
	s := fmt.Sprintf("Model %s looks truncated:", t.Model)
	if t.FloorFlag {
		s += fmt.Sprintf(" its minimum value covers %s of the valid area", pct(t.FloorShare))
		if len(t.Tails) > 0 {
			s += " and"
		}
	}
	if len(t.Tails) > 0 {
		s += fmt.Sprintf(" on %d extent(s) its ROC curve ends in a straight segment spanning up to %s of the area axis", len(t.Tails), f3(t.MaxJump))
	}
	e := "E"
	if len(a.r.Settings.E) > 0 {
		e = "E = " + fmtG(a.r.Settings.E[0])
	}
	tied := 0
	for _, tj := range t.Tails {
		if tj.YFrom < 1 {
			tied++
		}
	}
	switch {
	case tied > 0:
		s += fmt.Sprintf(". On %d of those extents test points sit on the floor: full AUC gives them half credit against the whole tied area and so penalises the model where it simply did not predict", tied)
	case len(t.Tails) > 0:
		s += ". No test point sits on the floor, so full AUC is not lowered by it, but that part of the curve is a straight line, not a ranking"
	default:
		s += ". Where test points sit on the floor, full AUC gives them half credit against the whole tied area and so penalises the model where it simply did not predict"
	}
	s += fmt.Sprintf("; read the partial ROC (%s) beside it, which was proposed partly for predictions that do not span the whole area axis (Peterson et al. 2008).", e)
	return s
}

// independence summarises the test-to-training distances.
func (a *analysis) independence() Independence {
	var d []float64
	var latSum float64
	var latN int
	anyNonZero := false
	for _, p := range a.r.Points {
		if p.Status != "scored" {
			continue
		}
		latSum += p.Lat
		latN++
		if p.Role != "test" {
			continue
		}
		d = append(d, p.NearestTrainKm)
		if p.NearestTrainKm != 0 {
			anyNonZero = true
		}
	}
	ind := Independence{N: len(d)}
	if len(d) == 0 || !anyNonZero {
		ind.Sentence = "Distances from test to training points were not computed, so their independence is not assessed."
		return ind
	}
	ind.Defined = true
	sort.Float64s(d)
	ind.Min, ind.Max = d[0], d[len(d)-1]
	ind.Q1, ind.Median, ind.Q3 = quantile7(d, 0.25), quantile7(d, 0.5), quantile7(d, 0.75)
	g := a.r.Grid
	how := ""
	if g.Geographic {
		meanLat := latSum / float64(latN)
		ind.CellWidthKm = math.Abs(g.GeoTransform[1]) * KmPerDegree * math.Cos(meanLat*math.Pi/180)
		ind.CellWidthApprox = true
		how = ", approximate for a geographic grid"
	} else {
		ind.CellWidthKm = math.Abs(g.GeoTransform[1]) / 1000
	}
	ind.NearKm = NearCells * ind.CellWidthKm
	for _, v := range d {
		if v <= ind.NearKm {
			ind.NearCount++
		}
	}
	ind.NearShare = float64(ind.NearCount) / float64(len(d))
	ind.Warn = ind.NearKm > 0 && ind.NearShare > NearShareWarn
	ind.Sentence = fmt.Sprintf("The %d test points lie %s–%s km from the nearest training point (median %s km); %s lie within %g cell widths (%s km%s) of one",
		len(d), trimFloat(ind.Min, 3), trimFloat(ind.Max, 3), trimFloat(ind.Median, 3), pct(ind.NearShare), NearCells, trimFloat(ind.NearKm, 3), how)
	if ind.Warn {
		ind.Sentence += fmt.Sprintf(", more than our %s warning level: a random split under spatial autocorrelation inflates every score.", pct(NearShareWarn))
	} else {
		ind.Sentence += fmt.Sprintf(", below our %s warning level.", pct(NearShareWarn))
	}
	return ind
}

// omitted lists Results.Omissions with counts and shares.
func (a *analysis) omitted() []OmittedPoints {
	nTest := 0
	for _, p := range a.r.Points {
		if p.Role == "test" && p.Status == "scored" {
			nTest++
		}
	}
	out := []OmittedPoints{}
	for _, o := range a.r.Omissions {
		ids := append([]int{}, o.Omitted...)
		sort.Ints(ids)
		op := OmittedPoints{Model: o.Model, Threshold: o.Threshold, Value: o.Value, Count: len(ids), TestPoints: nTest, IDs: ids}
		if nTest > 0 {
			op.Share = float64(len(ids)) / float64(nTest)
		}
		out = append(out, op)
	}
	return out
}
