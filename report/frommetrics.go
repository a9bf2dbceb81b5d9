package report

import (
	"math"

	"areasweep/metrics"
)

// The hop from the scoring engine to the results schema: metrics computes,
// these copy its results into the types results.json holds.

// SetScores fills sc from out, the scores metrics.Score computed for one
// model on one extent: the cell count, the area (out.Area, in the
// accumulators' integer unit, divided by unitsPerKm2), the point counts
// and, when out is scored, the AUCs and their standard errors (the DeLong
// variance as its square root), the placements, the partial ROC per E, the
// threshold tests and the Boyce index. An unscored out gives NotScored
// its reason. Model, Extent, the points outside, the test point ids and
// AUCBootSD are left to the caller; PartialROC and Thresholds are appended
// to.
func (sc *Score) SetScores(out metrics.Scores, unitsPerKm2 float64) {
	sc.Cells, sc.AreaKm2 = out.Cells, float64(out.Area)/unitsPerKm2
	sc.TestPoints, sc.TrainPoints = out.TestN, out.TrainN
	if !out.Scored {
		sc.NotScored = out.NotScored
		if out.TestN == 0 {
			sc.NotScored = "no test points inside this extent"
		}
		return
	}
	sc.Scored = true
	sc.AUC, sc.AUCUnweighted, sc.AUCTrain, sc.AUCSE = out.AUC, out.AUCUnweighted, out.AUCTrain, out.AUCSE
	sc.AUCUnweightedSEDeLong = math.Sqrt(out.AUCUnweightedVarDeLong)
	sc.Placements, sc.PlacementsUnweighted = out.Placements, out.PlacementsUnweighted
	for _, p := range out.PartialROC {
		sc.PartialROC = append(sc.PartialROC, PartialROC{E: p.E, Defined: p.Formed, Reason: p.Reason, XE: p.XE,
			TiedAtCrossing: p.TiedAtCrossing, DiscreteDefined: p.DiscreteFormed, DiscreteXE: p.DiscreteXE, DiscreteRatio: p.DiscreteRatio,
			Ratio: p.Ratio, RatioMean: p.RatioMean, RatioSD: p.RatioSD,
			CILow: p.CILow, CIHigh: p.CIHigh, PValue: p.PValue, Iterations: p.Iterations, NotFormed: p.NotFormed, ResampleSize: p.ResampleSize,
			PRandom: p.PRandom, RandomFormed: p.RandomFormed})
		if p.Formed {
			sc.PartialROC[len(sc.PartialROC)-1].PRandomNote = p.PRandomNote
		}
	}
	for _, t := range out.Thresholds {
		sc.Thresholds = append(sc.Thresholds, Threshold{Name: t.Name, Value: t.Value, Omission: t.Omission,
			AreaFraction: t.AreaFraction, Successes: t.Successes, N: t.N, PBinomial: t.PBinomial})
	}
	if out.Boyce.Defined {
		sc.Boyce = &Boyce{Index: out.Boyce.Index, Windows: out.Boyce.Windows, Used: out.Boyce.Used, Mid: out.Boyce.Mid, Ratio: out.Boyce.Ratio}
	} else {
		sc.BoyceUndefined = out.Boyce.Reason
	}
}

// NewCurve is the ROC curve (area axis) of model on extent from metrics'
// vertices.
func NewCurve(model, extent string, pts []metrics.Point) Curve {
	cv := Curve{Model: model, Extent: extent}
	for _, pt := range pts {
		cv.X = append(cv.X, pt.X)
		cv.Y = append(cv.Y, pt.Y)
	}
	return cv
}

// NewRing is the results record of one ring decomposition (metrics.Ring,
// defined) of the nested extents inner inside outer of chain, for model;
// areas are divided by unitsPerKm2. ShareOfChange is set by the caller,
// which sees the whole chain.
func NewRing(chain, model, inner, outer string, r metrics.Ring, unitsPerKm2 float64) Ring {
	return Ring{Chain: chain, Model: model, Inner: inner, Outer: outer,
		InnerAreaKm2: float64(r.InnerArea) / unitsPerKm2, RingAreaKm2: float64(r.RingArea) / unitsPerKm2,
		RingCells: r.RingCells, AUCInner: r.AUCInner, AUCRing: r.AUCRing, AUCOuter: r.AUCOuter}
}
