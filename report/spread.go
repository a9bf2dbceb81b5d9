package report

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// thresholdLabels gives readable names for the run's threshold names.
var thresholdLabels = map[string]string{
	"minimum_training_presence": "minimum training presence",
	"p10_training_presence":     "10th percentile training presence",
	"fixed":                     "fixed threshold",
}

func fmtG(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// buildMetrics lists the metrics present in r in report order.
func buildMetrics(r *Results) []MetricInfo {
	ms := []MetricInfo{
		{Key: "auc", Label: "AUC", Kind: "auc", HigherIsBetter: true, BootstrapSD: "auc_boot_sd"},
		{Key: "auc_unweighted", Label: "AUC (cells unweighted)", Kind: "auc_unweighted", HigherIsBetter: true},
	}
	es := append([]float64(nil), r.Settings.E...)
	seenE := map[float64]bool{}
	for _, e := range es {
		seenE[e] = true
	}
	for _, s := range r.Scores {
		for _, p := range s.PartialROC {
			if !seenE[p.E] {
				seenE[p.E] = true
				es = append(es, p.E)
			}
		}
	}
	for _, e := range es {
		ms = append(ms, MetricInfo{Key: "partial_roc_e" + fmtG(e), Label: "partial ROC ratio, E = " + fmtG(e),
			Kind: "partial_roc", E: e, HigherIsBetter: true, BootstrapSD: "ratio_sd"})
	}
	seenT := map[string]bool{}
	hasMTP := false
	for _, s := range r.Scores {
		if !s.Scored {
			continue
		}
		for _, t := range s.Thresholds {
			key := "omission_" + t.Name
			label := "omission at " + thresholdLabel(t.Name)
			mi := MetricInfo{Kind: "omission", Threshold: t.Name}
			if t.Name == "fixed" {
				key += "_" + fmtG(t.Value)
				label += " " + fmtG(t.Value)
				mi.ThresholdValue = t.Value
			}
			if t.Name == "minimum_training_presence" {
				hasMTP = true
			}
			if seenT[key] {
				continue
			}
			seenT[key] = true
			mi.Key, mi.Label = key, label
			ms = append(ms, mi)
		}
	}
	if hasMTP {
		ms = append(ms, MetricInfo{Key: "area_fraction_mtp", Label: "predicted area at minimum training presence",
			Kind: "area_fraction", Threshold: "minimum_training_presence"})
	}
	for _, s := range r.Scores {
		if s.Scored && s.Boyce != nil {
			ms = append(ms, MetricInfo{Key: "boyce", Label: "Boyce index", Kind: "boyce", HigherIsBetter: true})
			break
		}
	}
	return ms
}

func thresholdLabel(name string) string {
	if l, ok := thresholdLabels[name]; ok {
		return l
	}
	return strings.ReplaceAll(name, "_", " ")
}

// metricValue extracts metric m from s. ok is false when the score does
// not carry the metric; hasBoot tells whether boot holds a bootstrap SD and
// lo/hi the interval to draw.
func metricValue(m MetricInfo, s *Score, iterations int) (v float64, ok bool, boot, lo, hi float64, hasBoot bool) {
	switch m.Kind {
	case "auc":
		hasBoot = iterations >= 2
		return s.AUC, true, s.AUCBootSD, s.AUC - s.AUCBootSD, s.AUC + s.AUCBootSD, hasBoot
	case "auc_unweighted":
		return s.AUCUnweighted, true, 0, 0, 0, false
	case "partial_roc":
		for _, p := range s.PartialROC {
			if math.Abs(p.E-m.E) > 1e-12 {
				continue
			}
			if p.Iterations > 0 && p.NotFormed >= p.Iterations {
				return 0, false, 0, 0, 0, false
			}
			hasBoot = p.Iterations-p.NotFormed >= 2
			return p.Ratio, true, p.RatioSD, p.CILow, p.CIHigh, hasBoot
		}
	case "omission", "area_fraction":
		for _, t := range s.Thresholds {
			if t.Name != m.Threshold || (t.Name == "fixed" && math.Abs(t.Value-m.ThresholdValue) > 1e-12) {
				continue
			}
			if m.Kind == "area_fraction" {
				return t.AreaFraction, true, 0, 0, 0, false
			}
			if t.N <= 0 {
				return 0, false, 0, 0, 0, false
			}
			return t.Omission, true, 0, 0, 0, false
		}
	case "boyce":
		if s.Boyce != nil {
			return s.Boyce.Index, true, 0, 0, 0, false
		}
	}
	return 0, false, 0, 0, 0, false
}

// spread computes the Spread of metric m for model across usable extents.
func (a *analysis) spread(m MetricInfo, model string) Spread {
	sp := Spread{Metric: m.Key, Model: model, Extents: []string{}, AreasKm2: []float64{}, Values: []float64{}}
	var boots []float64
	withBoot := m.BootstrapSD != ""
	for _, e := range a.extents {
		sc := a.score(model, e.ID)
		if sc == nil {
			continue
		}
		v, ok, b, lo, hi, hasBoot := metricValue(m, sc, a.r.Settings.Iterations)
		if !ok {
			continue
		}
		sp.Extents = append(sp.Extents, e.ID)
		sp.AreasKm2 = append(sp.AreasKm2, e.AreaKm2)
		sp.Values = append(sp.Values, v)
		if withBoot {
			if !hasBoot {
				b, lo, hi = 0, v, v
			} else {
				boots = append(boots, b)
			}
			sp.BootSD = append(sp.BootSD, b)
			sp.BootLow = append(sp.BootLow, lo)
			sp.BootHigh = append(sp.BootHigh, hi)
		}
	}
	sp.N = len(sp.Values)
	if sp.N > 0 {
		sp.Min, sp.Max = sp.Values[0], sp.Values[0]
		sp.MinExtent, sp.MaxExtent = sp.Extents[0], sp.Extents[0]
		for i, v := range sp.Values {
			if v < sp.Min {
				sp.Min, sp.MinExtent = v, sp.Extents[i]
			}
			if v > sp.Max {
				sp.Max, sp.MaxExtent = v, sp.Extents[i]
			}
		}
		sp.Range = sp.Max - sp.Min
		sp.Mean = meanOf(sp.Values)
	}
	sp.SD, sp.SDDefined = sampleSD(sp.Values)
	if med, ok := medianOf(boots); ok && med > 0 {
		sp.BootSDMedian, sp.BootSDDefined = med, true
		sp.RangeOverBootSD, sp.RangeOverBootSDDefined = sp.Range/med, true
	}
	sp.Slope = slopeOf(sp.AreasKm2, sp.Values)
	switch {
	case sp.BootSDDefined:
		sp.Rule = fmt.Sprintf("range <= %g x median bootstrap SD", RobustBootFactor)
		sp.Limit = RobustBootFactor * sp.BootSDMedian
	default:
		sp.Rule = fmt.Sprintf("range <= %g (our cut-off)", RobustAbsRange)
		sp.Limit = RobustAbsRange
	}
	switch {
	case sp.N < 2:
		sp.Verdict = "undetermined"
	case sp.Range <= sp.Limit:
		sp.Verdict = "robust"
	default:
		sp.Verdict = "extent-sensitive"
	}
	return sp
}

// slopeOf regresses values on log2(area), ignoring non-positive areas.
func slopeOf(areas, values []float64) Slope {
	var x, y []float64
	for i, a := range areas {
		if a > 0 {
			x = append(x, math.Log2(a))
			y = append(y, values[i])
		}
	}
	f, ok := ols(x, y)
	sl := Slope{N: len(x)}
	if !ok {
		return sl
	}
	sl.Defined = true
	sl.PerDoubling, sl.Intercept = f.b, f.a
	sl.R2, sl.R2Defined = f.r2, f.r2Defined
	if f.ciDefined {
		sl.StdErr, sl.TQuantile = f.seB, f.t
		sl.CILow, sl.CIHigh, sl.CIDefined = f.ciLo, f.ciHi, true
	}
	return sl
}

// verdictFor combines the spreads of metric m over models.
func verdictFor(m MetricInfo, spreads []Spread) Verdict {
	v := Verdict{Metric: m.Key, Label: m.Label, Verdict: "undetermined", Sensitive: []string{}}
	var worst *Spread
	worstRatio := -1.0
	nDet := 0
	for i := range spreads {
		sp := &spreads[i]
		if sp.Metric != m.Key || sp.Verdict == "undetermined" {
			continue
		}
		nDet++
		if sp.Verdict == "extent-sensitive" {
			v.Sensitive = append(v.Sensitive, sp.Model)
		}
		ratio := sp.Range / sp.Limit
		if ratio > worstRatio {
			worstRatio, worst = ratio, sp
		}
	}
	if nDet == 0 || worst == nil {
		v.Sentence = fmt.Sprintf("%s: fewer than two scored extents for every model, so no verdict.", upperFirst(m.Label))
		return v
	}
	noise := func(sp *Spread) string {
		if sp.BootSDDefined {
			return fmt.Sprintf("%.1f times its median bootstrap SD (%s)", sp.RangeOverBootSD, f3(sp.BootSDMedian))
		}
		return fmt.Sprintf("range %s against our cut-off of %g", f3(sp.Range), RobustAbsRange)
	}
	if len(v.Sensitive) == 0 {
		v.Verdict = "robust"
		if worst.BootSDDefined {
			v.Sentence = fmt.Sprintf("%s is robust to the extent: for every model its range across extents stays within %g times the median bootstrap SD (widest: %s, %s–%s, %s).",
				upperFirst(m.Label), RobustBootFactor, worst.Model, f3(worst.Min), f3(worst.Max), noise(worst))
		} else {
			v.Sentence = fmt.Sprintf("%s is robust to the extent: for every model it moves by at most %g across extents (widest: %s, %s–%s).",
				upperFirst(m.Label), RobustAbsRange, worst.Model, f3(worst.Min), f3(worst.Max))
		}
		return v
	}
	v.Verdict = "extent-sensitive"
	v.Sentence = fmt.Sprintf("%s is extent-sensitive: for model %s it ranges %s (%s) to %s (%s) across %d extents, %s; the choice of extent moves it more than %s.",
		upperFirst(m.Label), worst.Model, f3(worst.Min), worst.MinExtent, f3(worst.Max), worst.MaxExtent, worst.N, noise(worst),
		map[bool]string{true: "resampling the test points does", false: "our cut-off allows"}[worst.BootSDDefined])
	return v
}

// f3 formats v with three decimals (no negative zero).
func f3(v float64) string {
	s := strconv.FormatFloat(v, 'f', 3, 64)
	if s == "-0.000" {
		s = "0.000"
	}
	return s
}

// signed3 formats v with a sign and three decimals.
func signed3(v float64) string {
	s := f3(v)
	if !strings.HasPrefix(s, "-") {
		s = "+" + s
	}
	return s
}

// pct formats a share as a whole percentage.
func pct(v float64) string {
	s := strconv.FormatFloat(100*v, 'f', 0, 64) + "%"
	if s == "-0%" {
		s = "0%"
	}
	return s
}
