package report

import (
	"fmt"
	"strings"
)

// joinList joins items as "a, b and c".
func joinList(items []string) string {
	switch len(items) {
	case 0:
		return ""
	case 1:
		return items[0]
	}
	return strings.Join(items[:len(items)-1], ", ") + " and " + items[len(items)-1]
}

func fmtList(vs []float64, unit string) string {
	var s []string
	for _, v := range vs {
		s = append(s, fmtG(v))
	}
	out := joinList(s)
	if unit != "" && out != "" {
		out += " " + unit
	}
	return out
}

// methodsText writes methods.md: a methods paragraph and a reply to a
// reviewer, both filled with the run's numbers.
func methodsText(r *Results) string {
	s := r.Sensitivity
	st := r.Settings
	var b strings.Builder
	sw := strings.TrimSpace(r.Software.Name + " " + r.Software.Version)
	if sw == "" {
		sw = "areasweep"
	}
	fmt.Fprintf(&b, "# Methods text (%s)\n\n", sw)
	b.WriteString("Ready to paste; every number comes from this run. Edit freely. The scores are evaluation aids: they describe how well the models rank the test records against the background of each extent, nothing more.\n\n")
	b.WriteString("## Methods\n\n")

	models := s.ModelNames
	var fam []string
	lo, hi := 0.0, 0.0
	first := true
	for _, e := range r.Extents {
		if e.Status != "ok" {
			continue
		}
		fam = append(fam, fmt.Sprintf("%s (%s; %s km²)", e.ID, e.Params, fmtArea(e.AreaKm2)))
		if first || e.AreaKm2 < lo {
			lo = e.AreaKm2
		}
		if first || e.AreaKm2 > hi {
			hi = e.AreaKm2
		}
		first = false
	}
	fmt.Fprintf(&b, "We rescored %d suitability model%s (%s) on a family of %d calibration extents built with %s: %s.",
		len(models), plural(len(models)), joinList(models), len(fam), sw, joinList(fam))
	if len(s.SkippedExtents) > 0 {
		var sk []string
		for _, e := range s.SkippedExtents {
			sk = append(sk, fmt.Sprintf("%s (%s)", e.ID, e.Reason))
		}
		fmt.Fprintf(&b, " Left out: %s.", joinList(sk))
	}
	if len(s.Unscored) > 0 {
		var us []string
		for _, u := range s.Unscored {
			us = append(us, fmt.Sprintf("%s on %s (%s)", u.Model, u.Extent, u.Reason))
		}
		fmt.Fprintf(&b, " Not scored: %s.", joinList(us))
	}
	pc := r.PointCounts
	fmt.Fprintf(&b, " We used %d training and %d test occurrence records", pc.Train, pc.Test)
	var dropped []string
	if pc.Thinned > 0 {
		dropped = append(dropped, fmt.Sprintf("%d thinned to one record per cell", pc.Thinned))
	}
	if pc.OutsideRaster > 0 {
		dropped = append(dropped, fmt.Sprintf("%d outside the raster", pc.OutsideRaster))
	}
	if pc.NoData > 0 {
		dropped = append(dropped, fmt.Sprintf("%d on no data", pc.NoData))
	}
	if len(dropped) > 0 {
		fmt.Fprintf(&b, " (%s)", joinList(dropped))
	}
	b.WriteString(".")
	fmt.Fprintf(&b, " On each extent we computed the full AUC of the test records against every cell, weighted by cell area (%s)", strings.TrimSpace(r.Grid.CellAreaNote))
	if len(st.E) > 0 {
		fmt.Fprintf(&b, ", the partial ROC ratio (Peterson et al. 2008) at E = %s from %d bootstrap resamples of %s%% of the test records (seed %d)",
			fmtList(st.E, ""), st.Iterations, fmtG(100*st.ResampleFraction), r.Seed)
	}
	b.WriteString(", omission rates at the minimum and 10th-percentile training presence")
	if len(st.FixedThresholds) > 0 {
		fmt.Fprintf(&b, " and at fixed threshold%s %s", plural(len(st.FixedThresholds)), fmtList(st.FixedThresholds, ""))
	}
	b.WriteString(" with a one-sided binomial test")
	if st.BoyceSteps > 0 {
		fmt.Fprintf(&b, ", and the continuous Boyce index (Hirzel et al. 2006; moving window of %s of the value range, %d steps)", fmtG(st.BoyceWindow), st.BoyceSteps)
	}
	b.WriteString(".")
	b.WriteString(" To describe the effect of the extent we report, per metric and model, the range and sample SD across extents beside the median within-extent bootstrap SD, and the ordinary least-squares slope against log2 of the extent area with its 95% confidence interval.")
	if len(models) >= 2 {
		b.WriteString(" The spread of each metric over the models x extents table was split into extent, model and non-additive sums of squares, and the agreement of the model rankings across extents was measured with Kendall's W corrected for ties (Legendre 2005).")
	}
	b.WriteString("\n\n")

	// Results in numbers.
	b.WriteString("Results: ")
	b.WriteString(resultNumbers(r))
	b.WriteString("\n\n")

	b.WriteString("## Reply to a reviewer\n\n")
	b.WriteString(reviewerText(r))
	b.WriteString("\n\n")
	b.WriteString("## References\n\n")
	b.WriteString("- Peterson, A.T., Papeş, M. & Soberón, J. (2008) Rethinking receiver operating characteristic analysis applications in ecological niche modeling. Ecological Modelling 213: 63-72.\n")
	b.WriteString("- Hirzel, A.H., Le Lay, G., Helfer, V., Randin, C. & Guisan, A. (2006) Evaluating the ability of habitat suitability models to predict species presences. Ecological Modelling 199: 142-152.\n")
	b.WriteString("- Legendre, P. (2005) Species associations: the Kendall coefficient of concordance revisited. Journal of Agricultural, Biological and Environmental Statistics 10: 226-245.\n")
	if len(nulls(r)) > 0 {
		b.WriteString("- Hijmans, R.J. (2012) Cross-validation of species distribution models: removing spatial sorting bias and calibration with a null model. Ecology 93: 679-688.\n")
	}
	return b.String()
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

// resultNumbers states the AUC and partial ROC spread per model.
func resultNumbers(r *Results) string {
	s := r.Sensitivity
	var parts []string
	for _, m := range s.ModelNames {
		sp := s.findSpread("auc", m)
		if sp == nil || sp.N == 0 {
			continue
		}
		t := fmt.Sprintf("AUC of %s ranged %s–%s over %d extents", m, f3(sp.Min), f3(sp.Max), sp.N)
		if sp.Slope.CIDefined {
			t += fmt.Sprintf(" (%s per doubling of area, 95%% CI %s to %s)", signed3(sp.Slope.PerDoubling), signed3(sp.Slope.CILow), signed3(sp.Slope.CIHigh))
		}
		if sp.BootSDDefined {
			t += fmt.Sprintf(", against a median bootstrap SD of %s", f3(sp.BootSDMedian))
		}
		if len(r.Settings.E) > 0 {
			e := r.Settings.E[0]
			if pr := s.findSpread("partial_roc_e"+fmtG(e), m); pr != nil && pr.N > 0 {
				t += fmt.Sprintf("; its partial ROC ratio at E = %s ranged %s–%s", fmtG(e), f3(pr.Min), f3(pr.Max))
			}
		}
		parts = append(parts, t)
	}
	out := ""
	if len(parts) > 0 {
		out = strings.Join(parts, ". ") + "."
	}
	if d := s.findDecomposition("auc"); d != nil && d.Defined {
		out += fmt.Sprintf(" Over the %d extents scored for every model, the extent accounted for %s of the sum of squares of AUC, the model for %s and the non-additive part for %s",
			len(d.Extents), pct(d.ShareExtent), pct(d.ShareModel), pct(d.ShareResidual))
		if d.KendallWDefined {
			out += fmt.Sprintf("; Kendall's W of the model rankings was %s (chi-square = %s, df = %d, %s)", f3(d.KendallW), f3(d.ChiSquare), d.DF, fmtPText(d.PValue))
		}
		out += "."
	}
	if s.Independence.Defined {
		out += fmt.Sprintf(" Test records lay a median %s km from the nearest training record; %s lay within %g cell widths.",
			trimFloat(s.Independence.Median, 3), pct(s.Independence.NearShare), NearCells)
	}
	out += nullSentences(r)
	return strings.TrimSpace(out)
}

// fmtP formats a p-value.
// fmtP formats a p-value for a table cell: "< 0.001" or "0.042".
func fmtP(p float64) string {
	if p < 0.001 {
		return "< 0.001"
	}
	return f3(p)
}

// fmtPText formats a p-value for prose: "p < 0.001" or "p = 0.042".
func fmtPText(p float64) string {
	if p < 0.001 {
		return "p < 0.001"
	}
	return "p = " + f3(p)
}

// reviewerText answers "is the score a property of the model or of the
// extent?" with this run's numbers.
func reviewerText(r *Results) string {
	s := r.Sensitivity
	var b strings.Builder
	n := len(s.ScoredExtents)
	b.WriteString("We thank the reviewer for raising the dependence of the evaluation scores on the calibration extent. ")
	fmt.Fprintf(&b, "We rescored the models on %d alternative extents", n)
	if n > 0 {
		lo, hi := -1.0, -1.0
		for _, e := range r.Extents {
			for _, id := range s.ScoredExtents {
				if id == e.ID {
					if lo < 0 || e.AreaKm2 < lo {
						lo = e.AreaKm2
					}
					if e.AreaKm2 > hi {
						hi = e.AreaKm2
					}
				}
			}
		}
		fmt.Fprintf(&b, " spanning %s–%s km²", fmtArea(lo), fmtArea(hi))
	}
	b.WriteString(" with the same test records and settings. ")
	var robust, sensitive []string
	for _, v := range s.Verdicts {
		switch v.Verdict {
		case "robust":
			robust = append(robust, v.Label)
		case "extent-sensitive":
			sensitive = append(sensitive, v.Label)
		}
	}
	if len(sensitive) > 0 {
		fmt.Fprintf(&b, "%s changed with the extent by more than their bootstrap noise or our cut-off of %g", upperFirst(joinList(sensitive)), RobustAbsRange)
		if len(robust) > 0 {
			fmt.Fprintf(&b, ", while %s did not", joinList(robust))
		}
		b.WriteString(". ")
	} else if len(robust) > 0 {
		fmt.Fprintf(&b, "%s stayed within their bootstrap noise or our cut-off of %g across extents. ", upperFirst(joinList(robust)), RobustAbsRange)
	}
	if d := s.findDecomposition("auc"); d != nil && d.Defined {
		fmt.Fprintf(&b, "The extent accounts for %s of the variation in AUC among models and extents and the model for %s", pct(d.ShareExtent), pct(d.ShareModel))
		if d.KendallWDefined {
			if len(d.DiffersFromBase) == 0 {
				fmt.Fprintf(&b, "; the ranking of the models was the same on every extent (Kendall's W = %s)", f3(d.KendallW))
			} else {
				fmt.Fprintf(&b, "; the ranking of the models changed on %d of %d extents relative to %s (Kendall's W = %s)", len(d.DiffersFromBase), len(d.Extents), d.BaseExtent, f3(d.KendallW))
			}
		}
		b.WriteString(". ")
	}
	b.WriteString("We therefore report the scores together with the extent they were computed on, read differences between models only within one extent, and treat the values as evaluation aids rather than as absolute measures of model quality.")
	if s.Independence.Warn {
		fmt.Fprintf(&b, " We also note that %s of the test records lie within %g cells of a training record, so all scores are likely optimistic.", pct(s.Independence.NearShare), NearCells)
	}
	return b.String()
}

func upperFirst(s string) string {
	if s == "" {
		return s
	}
	if s[0] >= 'a' && s[0] <= 'z' {
		return string(s[0]-'a'+'A') + s[1:]
	}
	return s
}
