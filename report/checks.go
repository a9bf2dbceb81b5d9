package report

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"areasweep/extent/vocab"
	"areasweep/metrics"
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
			// Only a tie that starts below y = 1 (test points share the
			// lowest value with many cells) flags; a flat run at y = 1 is
			// background below every test point.
			if tj.Jump > TailJumpFlag && tj.YFrom < 1 {
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
		return fmt.Sprintf("Model %s shows no sign of truncated predictions by our cut-offs: its minimum value covers %s of the valid area (flagged from %s), and no ROC curve ends in a tie of test points with more than %s of the area axis.",
			t.Model, pctVs(t.FloorShare, FloorShareFlag), pct(FloorShareFlag), fmtG(TailJumpFlag))
	}
	if t.FloorShare >= 1 {
		// One value on every valid cell: constant, not truncated, and the
		// partial ROC's remedy for truncation does not apply.
		return fmt.Sprintf("Model %s is constant: its one value covers 100%% of the valid area, so it ranks no cell above another and no score can tell its test points from the background.", t.Model)
	}
	s := fmt.Sprintf("Model %s looks truncated by our cut-offs:", t.Model)
	if t.FloorFlag {
		s += fmt.Sprintf(" its minimum value covers %s of the valid area (flagged from %s)", pctVs(t.FloorShare, FloorShareFlag), pct(FloorShareFlag))
		if len(t.Tails) > 0 {
			s += " and"
		}
	}
	if len(t.Tails) > 0 {
		// The largest of the flagged ties: MaxJump spans every curve,
		// including a flat run at y = 1 (background below every test
		// point), which is no tie of test points.
		most := 0.0
		for _, tj := range t.Tails {
			most = math.Max(most, tj.Jump)
		}
		s += fmt.Sprintf(" on %d extent%s test points share its lowest value with up to %s of the area axis (flagged above %s)", len(t.Tails), Plural(len(t.Tails)), f3(most), fmtG(TailJumpFlag))
		s += ". Full AUC gives those test points half credit against the whole tied area"
	}
	e := "E"
	if len(a.r.Settings.E) > 0 {
		e = "E = " + fmtG(a.r.Settings.E[0])
	}
	s += fmt.Sprintf("; the partial ROC (%s) was proposed partly for predictions that do not span the whole area axis (Peterson et al. 2008), but where the 1 − E crossing falls among the tied test points it is undefined and only its reading at thresholds is given.", e)
	return s
}

// pctFine formats a share as a percentage with enough digits to tell a
// small share from zero (0.003%, 0.41%, 12%), and a share short of the
// whole from it (99.9%, not the 100% of a constant model).
func pctFine(v float64) string {
	switch {
	case v == 0:
		return "0%"
	case v < 0.01:
		return trimFloat(100*v, 1) + "%"
	case v < 1 && pct(v) == "100%":
		for dec := 1; dec <= 16; dec++ {
			if s := strconv.FormatFloat(100*v, 'f', dec, 64); !strings.HasPrefix(s, "100") {
				return s + "%"
			}
		}
	}
	return pct(v)
}

// pctVs formats a share like pctFine, with more decimals when a whole
// percentage would print it as the cut-off it is compared with but is not
// (24.6% against a 25% warning level, not "25%").
func pctVs(v, cut float64) string {
	s := pctFine(v)
	if v == cut || s != pct(cut) {
		return s
	}
	for dec := 1; dec <= 10; dec++ {
		if s = strconv.FormatFloat(100*v, 'f', dec, 64) + "%"; s != strconv.FormatFloat(100*cut, 'f', dec, 64)+"%" {
			return s
		}
	}
	return strconv.FormatFloat(100*v, 'g', -1, 64) + "%"
}

// independence summarises the test-to-training distances.
func (a *analysis) independence() Independence {
	var d []float64
	var latSum float64
	var latN int
	// The run measures the distances whenever a training point is
	// scored; 0 km is then a distance (a test point on a training point,
	// to the metre), not a missing one.
	anyTrain := false
	for _, p := range a.r.Points {
		if p.Status != vocab.PointScored {
			continue
		}
		latSum += p.Lat
		latN++
		if p.Role != vocab.RoleTest {
			anyTrain = anyTrain || p.Role == vocab.RoleTrain
			continue
		}
		d = append(d, p.NearestTrainKm)
	}
	ind := Independence{N: len(d)}
	if len(d) == 0 || !anyTrain {
		ind.Sentence = "Distances from test to training points were not computed, so their independence is not assessed."
		return ind
	}
	ind.Defined = true
	sort.Float64s(d)
	ind.Min, ind.Max = d[0], d[len(d)-1]
	ind.Q1, ind.Median, ind.Q3 = metrics.QuantileSorted(d, 0.25), metrics.QuantileSorted(d, 0.5), metrics.QuantileSorted(d, 0.75)
	g := a.r.Grid
	how := ""
	if g.Geographic {
		meanLat := latSum / float64(latN)
		ind.CellWidthKm = math.Abs(g.GeoTransform[1]) * KmPerDegree * math.Cos(meanLat*math.Pi/180)
		ind.CellWidthApprox = true
		how = ", approximate for a geographic grid"
	} else {
		ind.CellWidthKm, ind.CellWidthApprox = projectedCellWidthKm(g, a.r.Extents)
		if ind.CellWidthApprox {
			how = ", approximate: the mean true cell size of this projected grid"
		}
	}
	ind.NearKm = NearCells * ind.CellWidthKm
	for _, v := range d {
		if v <= ind.NearKm {
			ind.NearCount++
		}
	}
	ind.NearShare = float64(ind.NearCount) / float64(len(d))
	ind.Warn = ind.NearKm > 0 && ind.NearShare > NearShareWarn
	spread := fmt.Sprintf("The %d test points lie %s–%s km from the nearest training point (median %s km)", len(d), trimFloat(ind.Min, 3), trimFloat(ind.Max, 3), trimFloat(ind.Median, 3))
	if len(d) == 1 {
		// One distance: no range or median to give.
		spread = fmt.Sprintf("The 1 test point lies %s km from the nearest training point", trimFloat(ind.Min, 3))
	}
	if ind.Max == 0 {
		// Every test point on a training point: no spread to give.
		spread = fmt.Sprintf("All %d test points lie on a training point (0 km from the nearest, to the metre)", len(d))
		if len(d) == 1 {
			spread = "The 1 test point lies on a training point (0 km from the nearest, to the metre)"
		}
	}
	ind.Sentence = fmt.Sprintf("%s; %s lie within %g cell widths (%s km%s) of one",
		spread, pctVs(ind.NearShare, NearShareWarn), NearCells, trimFloat(ind.NearKm, 3), how)
	switch {
	case ind.Warn:
		// Whether the split was random, and how autocorrelated the
		// species is, the run does not know: say what the distances show.
		ind.Sentence += fmt.Sprintf(", more than our %s warning level: test points this near training points are unlikely to be independent of them (spatial autocorrelation), so every score computed from the test points is likely optimistic.", pct(NearShareWarn))
	case ind.NearShare == NearShareWarn:
		ind.Sentence += fmt.Sprintf(", at our %s warning level (we warn above it).", pct(NearShareWarn))
	default:
		ind.Sentence += fmt.Sprintf(", below our %s warning level.", pct(NearShareWarn))
	}
	return ind
}

// projectedCellWidthKm returns a projected grid's cell width on the
// ground in km, and whether it is approximate. The geotransform gives the
// width in the CRS's unit, g.UnitM metres each (taken as 1 when not
// recorded, as in files written before the field). On a projection that is
// not equal-area that map width is not the width on the ground, which the
// test-to-training distances are (a Web Mercator cell 4 km wide on the map
// is 1.4 km wide at 70° N), so the width is scaled by the square root of the
// grid's mean ratio of true to map cell area (the area over the cells of
// the extent with most cells, the whole raster in a run): the side of a square of the mean true cell area, for square
// map cells. It is approximate where that ratio differs from 1 by more than
// 0.1% (our choice: a UTM grid within its zone stays exact), since the
// scale then varies across the grid.
func projectedCellWidthKm(g Grid, extents []Extent) (float64, bool) {
	unit := g.UnitM
	if !(unit > 0) {
		unit = 1
	}
	width := math.Abs(g.GeoTransform[1]) * unit / 1000
	mapCellKm2 := math.Abs(g.GeoTransform[1]*g.GeoTransform[5]) * unit * unit / 1e6
	var big *Extent
	for i := range extents {
		if e := &extents[i]; e.Cells > 0 && e.AreaKm2 > 0 && (big == nil || e.Cells > big.Cells) {
			big = e
		}
	}
	if big == nil || !(mapCellKm2 > 0) {
		return width, false
	}
	ratio := big.AreaKm2 / float64(big.Cells) / mapCellKm2
	return width * math.Sqrt(ratio), math.Abs(ratio-1) > 1e-3
}

// omitted lists Results.Omissions with counts and shares.
func (a *analysis) omitted() []OmittedPoints {
	nTest := 0
	for _, p := range a.r.Points {
		if p.Role == vocab.RoleTest && p.Status == vocab.PointScored {
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
