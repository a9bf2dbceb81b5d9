package report

import (
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
)

// summaryColumns are the columns of summary.csv, one row per study and
// model (tidy: one observation per row, one variable per column). A failed
// study has one row with status "failed", its error, and empty numbers.
// Undefined numbers are empty cells.
var summaryColumns = []string{
	"study", "status", "model", "base_extent", "extents",
	"auc_base", "test_points", "auc_min", "auc_min_extent", "auc_max", "auc_max_extent", "auc_range",
	"effect_extent", "auc_diff", "auc_diff_ci_low", "auc_diff_ci_high", "auc_diff_points", "auc_diff_not_judged_reason", "tolerance", "auc_verdict",
	"null", "auc_minus_null", "auc_minus_null_ci_low", "auc_minus_null_ci_high", "null_reading", "null_not_judged_reason",
	"warnings", "error",
}

// verdictColumns are the columns of summary_verdicts.csv: one row per
// study, model and metric, with the study's own verdict and the
// difference from the base extent of largest magnitude.
var verdictColumns = []string{
	"study", "model", "metric", "label", "tolerance", "verdict", "base_extent",
	"extent", "diff", "ci_low", "ci_high", "method", "not_judged_reason",
}

// The null_reading values of summary.csv for a pair read above the null
// whose model is not shown to rank better than random on the base extent
// (BatchRow.NullNoSkill): written "above", they were counted with the
// pairs that show skill by anyone filtering the column, while the summary
// page and its methods text qualified them.
const (
	// CSVReadingAboveNoSkill: the model's own AUC is at or below 0.5.
	CSVReadingAboveNoSkill = "above_no_skill"
	// CSVReadingAboveSkillNotShown: the model's own AUC is above 0.5,
	// its own 95% interval reaching 0.5.
	CSVReadingAboveSkillNotShown = "above_skill_not_shown"
)

// csvNullReading is r's null_reading in summary.csv: NullReading, with
// "above" told apart where the model shows no skill; "" without a null.
func csvNullReading(r BatchRow) string {
	if r.Null == "" {
		return ""
	}
	switch r.NullNoSkill {
	case VsRandomAtOrBelow:
		return CSVReadingAboveNoSkill
	case VsRandomNotShown:
		return CSVReadingAboveSkillNotShown
	}
	return r.NullReading
}

// num formats a number in full (shortest exact) precision, or "" when it
// is undefined.
func num(v float64, ok bool) string {
	if !ok {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// count formats a count, or "" when it is unknown.
func count(n int, ok bool) string {
	if !ok {
		return ""
	}
	return strconv.Itoa(n)
}

// WriteCSV writes summary.csv: one row per study and model, failed
// studies as one row each (see summaryColumns), in study order.
func (s *BatchSummary) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	recs := [][]string{summaryColumns}
	next := 0
	for _, st := range s.Studies {
		if !st.OK {
			rec := make([]string, len(summaryColumns))
			rec[0], rec[1], rec[len(rec)-1] = st.ID, "failed", st.Error
			recs = append(recs, rec)
			continue
		}
		for ; next < len(s.Rows) && s.Rows[next].Study == st.ID; next++ {
			recs = append(recs, summaryRecord(s.Rows[next]))
		}
	}
	if err := cw.WriteAll(recs); err != nil {
		return fmt.Errorf("report: write %s: %w", SummaryCSV, err)
	}
	return nil
}

// summaryRecord is one summary.csv row of a study that ran.
func summaryRecord(r BatchRow) []string {
	spread := r.Extents > 0
	return []string{
		r.Study, "ok", r.Model, r.BaseExtent, strconv.Itoa(r.Extents),
		num(r.AUCBase, r.AUCBaseDefined), count(r.TestPoints, r.TestPointsKnown), num(r.AUCMin, spread), r.MinExtent, num(r.AUCMax, spread), r.MaxExtent, num(r.AUCRange, spread),
		r.EffectExtent, num(r.Effect, r.EffectDefined), num(r.EffectLow, r.EffectDefined), num(r.EffectHigh, r.EffectDefined),
		count(r.EffectPoints, r.EffectDefined), r.EffectNotJudged, num(r.Tolerance, true), string(r.Verdict),
		r.Null, num(r.NullDiff, r.NullDefined), num(r.NullLow, r.NullDefined), num(r.NullHigh, r.NullDefined), csvNullReading(r), r.NullNotJudged,
		strconv.Itoa(r.Warnings), "",
	}
}

// WriteVerdictsCSV writes summary_verdicts.csv (see verdictColumns).
func (s *BatchSummary) WriteVerdictsCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	recs := [][]string{verdictColumns}
	for _, v := range s.Verdicts {
		recs = append(recs, []string{
			v.Study, v.Model, v.Metric, v.Label, num(v.Tolerance, true), string(v.Verdict), v.BaseExtent,
			v.Extent, num(v.Diff, v.Defined), num(v.Low, v.Defined && v.Interval), num(v.High, v.Defined && v.Interval), v.Method, v.NotJudged,
		})
	}
	if err := cw.WriteAll(recs); err != nil {
		return fmt.Errorf("report: write %s: %w", SummaryVerdicts, err)
	}
	return nil
}
