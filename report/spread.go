package report

import (
	"math"
	"strconv"
	"strings"

	"areasweep/metrics"
)

// thresholdLabels gives readable names for the run's threshold names.
var thresholdLabels = map[metrics.ThresholdRule]string{
	metrics.ThresholdMTP:   "minimum training presence",
	metrics.ThresholdP10:   "10th percentile training presence",
	metrics.ThresholdFixed: "fixed threshold",
}

func fmtG(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// buildMetrics lists the metrics present in r in report order, each with
// its tolerance from the settings.
func buildMetrics(r *Results) []MetricInfo {
	st := r.Settings
	ms := []MetricInfo{
		{Key: "auc", Label: "AUC", Kind: MetricAUC, HigherIsBetter: true, Tolerance: st.ToleranceAUC},
		{Key: "auc_unweighted", Label: "AUC (cells unweighted)", Kind: MetricAUCUnweighted, HigherIsBetter: true, Tolerance: st.ToleranceAUC},
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
		ms = append(ms, MetricInfo{Key: MetricKeyPartialROC(e), Label: "partial ROC ratio, E = " + fmtG(e),
			Kind: MetricPartialROC, E: e, HigherIsBetter: true, Tolerance: st.TolerancePartialROC})
	}
	seenT := map[string]bool{}
	hasMTP := false
	for _, s := range r.Scores {
		if !s.Scored {
			continue
		}
		for _, t := range s.Thresholds {
			key := MetricKeyOmission(t.Name, t.Value)
			label := "omission at " + thresholdLabel(t.Name)
			mi := MetricInfo{Kind: MetricOmission, Threshold: t.Name, Tolerance: st.ToleranceOmission}
			if t.Name == metrics.ThresholdFixed {
				label += " " + fmtG(t.Value)
				mi.ThresholdValue = t.Value
			}
			if t.Name == metrics.ThresholdMTP {
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
			Kind: MetricAreaFraction, Threshold: metrics.ThresholdMTP, Tolerance: st.ToleranceOmission})
	}
	for _, s := range r.Scores {
		if s.Scored && s.Boyce != nil {
			ms = append(ms, MetricInfo{Key: MetricKeyBoyce, Label: "Boyce index", Kind: MetricBoyce, HigherIsBetter: true, Tolerance: st.ToleranceBoyce})
			break
		}
	}
	return ms
}

func thresholdLabel(name metrics.ThresholdRule) string {
	if l, ok := thresholdLabels[name]; ok {
		return l
	}
	return strings.ReplaceAll(string(name), "_", " ")
}

// metricValue extracts metric m from s. ok is false when the score does
// not carry the metric (an undefined partial ROC ratio included); hasBoot
// tells whether boot holds a per-extent SD and lo/hi the interval to draw.
func metricValue(m MetricInfo, s *Score) (v float64, ok bool, boot, lo, hi float64, hasBoot bool) {
	switch m.Kind {
	case MetricAUC:
		hasBoot = s.AUCBootSD > 0
		return s.AUC, true, s.AUCBootSD, s.AUC - s.AUCBootSD, s.AUC + s.AUCBootSD, hasBoot
	case MetricAUCUnweighted:
		return s.AUCUnweighted, true, 0, 0, 0, false
	case MetricPartialROC:
		for _, p := range s.PartialROC {
			if math.Abs(p.E-m.E) > 1e-12 {
				continue
			}
			if !p.Defined {
				return 0, false, 0, 0, 0, false
			}
			hasBoot = BootstrapReadable(p)
			return p.Ratio, true, p.RatioSD, p.CILow, p.CIHigh, hasBoot
		}
	case MetricOmission, MetricAreaFraction:
		for _, t := range s.Thresholds {
			if t.Name != m.Threshold || (t.Name == metrics.ThresholdFixed && math.Abs(t.Value-m.ThresholdValue) > 1e-12) {
				continue
			}
			if m.Kind == MetricAreaFraction {
				return t.AreaFraction, true, 0, 0, 0, false
			}
			if t.N <= 0 {
				return 0, false, 0, 0, 0, false
			}
			return t.Omission, true, 0, 0, 0, false
		}
	case MetricBoyce:
		if s.Boyce != nil {
			return s.Boyce.Index, true, 0, 0, 0, false
		}
	}
	return 0, false, 0, 0, 0, false
}

// spread describes metric m for model across usable extents.
func (a *analysis) spread(m MetricInfo, model string) Spread {
	sp := Spread{Metric: m.Key, Model: model, Extents: []string{}, AreasKm2: []float64{}, Values: []float64{}}
	withBoot := m.Kind == MetricAUC || m.Kind == MetricPartialROC
	for _, e := range a.extents {
		sc := a.score(model, e.ID)
		if sc == nil {
			continue
		}
		v, ok, b, lo, hi, hasBoot := metricValue(m, sc)
		if !ok {
			continue
		}
		sp.Extents = append(sp.Extents, e.ID)
		sp.AreasKm2 = append(sp.AreasKm2, e.AreaKm2)
		sp.Values = append(sp.Values, v)
		if withBoot {
			if !hasBoot {
				b, lo, hi = 0, v, v
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
		sp.Mean = metrics.Mean(sp.Values)
	}
	if len(sp.Values) >= 2 {
		_, sp.SD = metrics.MeanSD(sp.Values)
		sp.SDDefined = true
	}
	return sp
}

// slopeOf regresses values on log2(area), ignoring non-positive areas: a
// description, with no interval.
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
	return sl
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

// signedVs formats v like signed3, with more decimals when three would
// print it as one of the cut-offs refs (0, ±T) that it is not: the bound
// of an interval read against 0 or a tolerance must show on which side of
// the cut-off it lies ("-0.0004", not "+0.000"; "+0.0201", not "+0.020",
// against ±0.02). It stops at 12 decimals, below which it prints all the
// digits that tell v apart.
func signedVs(v float64, refs ...float64) string {
	for dec := 3; dec <= 12; dec++ {
		s := signedDec(v, dec)
		clash := false
		for _, r := range refs {
			clash = clash || (v != r && s == signedDec(r, dec))
		}
		if !clash {
			return s
		}
	}
	s := strconv.FormatFloat(v, 'g', -1, 64)
	if !strings.HasPrefix(s, "-") {
		s = "+" + s
	}
	return s
}

// signedSmall formats a difference v as signedVs does against the
// cut-offs refs, and against 0 too: "the largest is +0.0002", not
// "+0.000", which reads as no difference at all. A v within 5e-7 of 0
// stays "+0.000": differences that small are the arithmetic's, not the
// data's (our cut-off).
func signedSmall(v float64, refs ...float64) string {
	if math.Abs(v) < 5e-7 {
		return signedVs(v, refs...)
	}
	return signedVs(v, append([]float64{0}, refs...)...)
}

// smallPositive formats a share v >= 0 with three decimals, or up to six
// when three would print it as 0 (signedSmall without its sign).
func smallPositive(v float64) string {
	return strings.TrimPrefix(signedSmall(v), "+")
}

// signedDec formats v with a sign and dec decimals (no negative zero).
func signedDec(v float64, dec int) string {
	s := strconv.FormatFloat(v, 'f', dec, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
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
