package report

import (
	"fmt"
	"math"
	"strings"
)

// findSpread returns the spread of metric key for model, or nil.
func (s *Sensitivity) findSpread(key, model string) *Spread {
	for i := range s.Spreads {
		if s.Spreads[i].Metric == key && s.Spreads[i].Model == model {
			return &s.Spreads[i]
		}
	}
	return nil
}

// findDecomposition returns the decomposition of metric key, or nil.
func (s *Sensitivity) findDecomposition(key string) *Decomposition {
	for i := range s.Decompositions {
		if s.Decompositions[i].Metric == key {
			return &s.Decompositions[i]
		}
	}
	return nil
}

// areaRange formats "from A to B km²", in thousands when B >= 10,000.
func areaRange(lo, hi float64) string {
	if hi >= 1e4 {
		return fmt.Sprintf("from %s to %s thousand km²", trimFloat(lo/1000, 2+boolInt(lo >= 1e4)), trimFloat(hi/1000, 3))
	}
	return fmt.Sprintf("from %s to %s km²", fmtArea(lo), fmtArea(hi))
}

func boolInt(b bool) int {
	if b {
		return 1
	}
	return 0
}

// headline writes the two or three summary sentences.
func headline(a *analysis, s *Sensitivity) string {
	if len(s.ScoredExtents) == 0 {
		return "No extent could be scored, so the scores cannot be compared across extents."
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, e := range a.extents {
		for _, id := range s.ScoredExtents {
			if id == e.ID {
				lo, hi = math.Min(lo, e.AreaKm2), math.Max(hi, e.AreaKm2)
			}
		}
	}
	var lead *Spread
	var others []string
	for _, m := range a.models {
		sp := s.findSpread("auc", m)
		if sp == nil || sp.N == 0 {
			continue
		}
		if lead == nil {
			lead = sp
			continue
		}
		others = append(others, fmt.Sprintf("%s %s–%s", m, f3(sp.Min), f3(sp.Max)))
	}
	var b strings.Builder
	fmt.Fprintf(&b, "Across %d extents %s, ", len(s.ScoredExtents), areaRange(lo, hi))
	if lead == nil {
		b.WriteString("no model has an AUC.")
		return b.String()
	}
	fmt.Fprintf(&b, "AUC of model %s ranged %s–%s", lead.Model, f3(lead.Min), f3(lead.Max))
	if lead.Slope.Defined {
		fmt.Fprintf(&b, " (%s per doubling of area)", signed3(lead.Slope.PerDoubling))
	}
	if len(others) > 0 {
		fmt.Fprintf(&b, "; other models: %s", strings.Join(others, ", "))
	}
	if len(a.r.Settings.E) > 0 {
		e := a.r.Settings.E[0]
		if sp := s.findSpread("partial_roc_e"+fmtG(e), lead.Model); sp != nil && sp.N >= 2 {
			fmt.Fprintf(&b, ". Partial ROC at E = %s for %s ", fmtG(e), lead.Model)
			switch {
			case sp.Verdict == "robust" && sp.BootSDDefined:
				fmt.Fprintf(&b, "stayed within %s–%s, inside its bootstrap noise", f3(sp.Min), f3(sp.Max))
			case sp.Verdict == "robust":
				fmt.Fprintf(&b, "stayed within %s–%s", f3(sp.Min), f3(sp.Max))
			case sp.BootSDDefined:
				fmt.Fprintf(&b, "ranged %s–%s, %.1f times its median bootstrap SD", f3(sp.Min), f3(sp.Max), sp.RangeOverBootSD)
			default:
				fmt.Fprintf(&b, "ranged %s–%s", f3(sp.Min), f3(sp.Max))
			}
		}
	}
	b.WriteString(".")
	if d := s.findDecomposition("auc"); d != nil && d.Defined {
		switch {
		case d.ShareExtent >= 0.5:
			fmt.Fprintf(&b, " The extent, not the model, explains most of the AUC differences (%s of the sum of squares; model %s).", pct(d.ShareExtent), pct(d.ShareModel))
		case d.ShareModel >= 0.5:
			fmt.Fprintf(&b, " The model, not the extent, explains most of the AUC differences (%s of the sum of squares; extent %s).", pct(d.ShareModel), pct(d.ShareExtent))
		default:
			fmt.Fprintf(&b, " Neither extent (%s) nor model (%s) explains most of the AUC differences; the rest is non-additive.", pct(d.ShareExtent), pct(d.ShareModel))
		}
	} else if s.Independence.Warn {
		fmt.Fprintf(&b, " %s of test points lie within %g cells of a training point, so every score is likely inflated.", pct(s.Independence.NearShare), NearCells)
	}
	return b.String()
}
