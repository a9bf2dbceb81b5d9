package report

import (
	"cmp"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"areasweep/extent/vocab"
	"areasweep/report/outfile"
)

// StudyResult is one study of a batch as the summary across studies sees
// it: its id and either its results or the error that stopped it.
type StudyResult struct {
	// ID names the study (its folder in the batch's output).
	ID string
	// Results are the study's results; nil when Err is set. Analyze is
	// run on them when their Sensitivity is missing.
	Results *Results
	// Err is why the study gave no results.
	Err error
	// Report is the path of the study's report.html relative to the
	// summary page ("" when there is none).
	Report string
}

// BatchSummary is the summary across the studies of a batch. Studies keep
// the order they were given in (the study table's order), rows follow
// them, models in each study's order. It holds no inference of its own:
// every verdict and interval is a study's own (Sensitivity), and the
// counts add them up.
type BatchSummary struct {
	// Software names the program, from the first study with results.
	Software Software
	// Studies lists every study, failed ones included.
	Studies []StudySummary
	// Rows holds one row per study and model (failed studies have none).
	Rows []BatchRow
	// Verdicts holds every study's per-model verdict of every metric.
	Verdicts []BatchVerdict
	// Counts adds up the AUC verdicts and the model-above-null readings.
	Counts BatchCounts
	// Tolerances lists the distinct AUC tolerances of the studies,
	// ascending.
	Tolerances []float64
}

// StudySummary is one study of a batch.
type StudySummary struct {
	ID     string
	OK     bool
	Error  string // why the study failed; "" when OK
	Report string // relative path of its report.html, "" for none
	// Verdict is the study's AUC verdict (Sensitivity.Verdicts, metric
	// "auc"): extent-sensitive when AUC is for at least one model, robust
	// when it is for every model, undetermined otherwise.
	Verdict    Judgement
	Models     []string
	BaseExtent string
	Extents    int // scored extents
	// StandIn is why the study's base extent was left out when another
	// extent (BaseExtent, the first scored one) stands in for it as the
	// reference every difference is taken from; "" when BaseExtent is the
	// base extent itself.
	StandIn string
	// NotJudged is true when no model of the study has an AUC difference
	// from BaseExtent on MinPairedPoints or more common test points (none
	// could be formed, or every one rests on fewer): the study's verdict
	// is undetermined without any difference having been judged.
	NotJudged bool
	// Unscored is true when no model of the study is scored on any
	// extent (a model with one value on every cell, say): then NotJudged
	// is true for that reason, and UnscoredWhy gives it (unscoredWhy).
	Unscored    bool
	UnscoredWhy string
	// BaseAreaKm2 is the area of BaseExtent (Results.Extents).
	BaseAreaKm2 float64
	// Occurrences is the SHA-256 of the study's occurrence file
	// (Results.Inputs), "" when not recorded.
	Occurrences string
	// Warnings are the study's warnings (Results.Warnings), as its
	// run.log and report give them.
	Warnings []string
}

// BatchRow is one model of one study: its AUC across the study's scored
// extents, its extent effect and its standing against a null. Fields
// whose Defined flag is false are 0.
type BatchRow struct {
	Study      string
	Model      string
	BaseExtent string
	// Extents is the number of extents AUC was scored on.
	Extents int
	// AUCBase is AUC on the base extent.
	AUCBase        float64
	AUCBaseDefined bool
	// TestPoints is the number of the model's test points scored on the
	// base extent (Results.Scores); TestPointsKnown is false when the
	// results hold no score of the model there.
	TestPoints      int
	TestPointsKnown bool
	// AUCMin, AUCMax and AUCRange describe AUC across the scored extents
	// (Sensitivity.Spreads).
	AUCMin, AUCMax       float64
	MinExtent, MaxExtent string
	AUCRange             float64
	// Effect is the extent effect: of the paired AUC differences
	// "extent minus base extent" on the test points both share
	// (Sensitivity.ModelVerdicts), the one of largest magnitude, with its
	// 95% interval from the placements.
	EffectDefined         bool
	EffectExtent          string
	Effect                float64
	EffectLow, EffectHigh float64
	// EffectPoints is the number of test points the extent effect rests
	// on (those both extents hold); EffectJudged is false when they are
	// fewer than MinPairedPoints (the difference is reported, not judged).
	EffectPoints int
	EffectJudged bool
	// EffectNotJudged says why the extent effect is not judged
	// (ExtentDifference.NotJudged, or noDifference when there is none);
	// "" when it is.
	EffectNotJudged string
	// Tolerance and Verdict are the model's AUC tolerance and verdict
	// (JudgementSensitive, JudgementRobust or JudgementUndetermined).
	Tolerance float64
	Verdict   Judgement
	// Judged is true when at least one of the model's AUC differences
	// from the base extent rests on MinPairedPoints or more common test
	// points (so that its verdict was reached on a judged difference).
	Judged bool
	// Null names the null the model is compared with on the base extent
	// (see baseNullComparison); "" when the study scored none. NullDiff
	// is AUC of the model minus the null's on the test points both score,
	// with its 95% interval from the placements, and NullReading its
	// reading (ReadingAbove, ReadingNotAbove, ReadingBelow, ReadingTooFew
	// or ReadingUndefined); NullKind is the null's kind (NullDistance for
	// the distance-only null).
	Null              string
	NullKind          string
	NullDefined       bool
	NullDiff          float64
	NullLow, NullHigh float64
	NullReading       string
	// NullNotJudged says why the null comparison is not read
	// (NullGap.NotJudged); "" when it is.
	NullNotJudged string
	// NullNoSkill: read above the null while the model's own AUC is not
	// shown above 0.5 (aboveWithoutSkill), so the reading shows no skill:
	// the gap's ModelVsRandom, VsRandomAtOrBelow or VsRandomNotShown; ""
	// otherwise.
	NullNoSkill string
	// Warnings is the number of the study's warnings (StudySummary.Warnings).
	Warnings int
}

// BatchVerdict is one study's verdict on one metric for one model, with
// the difference from the base extent that the verdict names (the largest
// by magnitude).
type BatchVerdict struct {
	Study, Model, Metric, Label string
	Tolerance                   float64
	Verdict                     Judgement
	BaseExtent                  string
	Defined                     bool
	Extent                      string
	Diff, Low, High             float64
	// Interval is false when the difference has no interval (Low and
	// High 0): a point_difference (ExtentDifference.Low).
	Interval bool
	Method   string
	// NotJudged says why that difference is not judged
	// (ExtentDifference.NotJudged, or noDifference when there is none);
	// "" when it is.
	NotJudged string
}

// noDifference is the not-judged reason of a model none of whose
// differences from the base extent could be formed (on one common test
// point, say): its verdict is undetermined and counted as not judged, and
// the reason column says why instead of staying empty as for a judged one.
const noDifference = "no paired difference from the base extent could be formed"

// noDifferenceWhy is why model verdict mv of the study's results r has no
// difference from the base extent: the model is scored on no extent
// (unscoredWhy), else noDifference, with the cause when the metric is
// undefined on the base extent itself (a partial ROC ratio whose 1 - E
// crossing falls among tied test points, say).
func noDifferenceWhy(r *Results, mv ModelVerdict) string {
	if why, none := unscoredWhy(r, mv.Model); none {
		return "the model is " + why
	}
	if !mv.BaseDefined {
		return noDifference + ": the metric is undefined on the base extent"
	}
	return noDifference
}

// BatchCounts adds up the studies' own verdicts.
type BatchCounts struct {
	// Studies given, with results, failed.
	Studies, Succeeded, Failed int
	// Studies with results, by their AUC verdict; NotJudged counts the
	// undetermined ones with no judged difference (StudySummary.NotJudged)
	// and StandIn those whose base extent was replaced by another.
	// NotJudgedUnscored counts those of NotJudged none of whose models is
	// scored on any extent (StudySummary.Unscored).
	Sensitive, Robust, Undetermined, NotJudged, NotJudgedUnscored, StandIn int
	// Study x model pairs, by the model's AUC verdict; PairsNotJudged
	// counts the undetermined pairs with no judged difference.
	// PairsNotJudgedUnscored counts those of PairsNotJudged whose model
	// is scored on no extent.
	Pairs, PairsSensitive, PairsRobust, PairsUndetermined, PairsNotJudged, PairsNotJudgedUnscored int
	// Study x model pairs compared with a null on the base extent, by
	// reading: TooFew on fewer than MinPairedPoints common test points
	// (not read), the rest of NullPairs undefined. NullDistance counts the
	// pairs whose null is the distance-only null.
	// Same counts the pairs whose model scores as the null does (every
	// paired difference 0), apart from NotAbove: "within noise" said of
	// a copy of the null suggests noise where there is none.
	NullPairs, Above, NotAbove, Same, Below, TooFew, NullDistance int
	// AboveNoSkill counts the pairs of Above whose model's own AUC is not
	// shown above 0.5 (BatchRow.NullNoSkill).
	AboveNoSkill int
}

// Summarize builds the summary across studies. Studies without results
// must carry an error and are listed as failed; results without a
// sensitivity analysis are analysed first (Analyze, which fills
// r.Sensitivity). It returns an error for a programmer's mistake only:
// an empty or repeated id, or a study with neither results nor error.
func Summarize(studies []StudyResult) (*BatchSummary, error) {
	s := &BatchSummary{Studies: []StudySummary{}, Rows: []BatchRow{}, Verdicts: []BatchVerdict{}}
	seen := map[string]bool{}
	for i, st := range studies {
		if st.ID == "" {
			return nil, fmt.Errorf("report: Summarize: study %d has no id", i+1)
		}
		if seen[strings.ToLower(st.ID)] {
			return nil, fmt.Errorf("report: Summarize: study id %q given twice", st.ID)
		}
		seen[strings.ToLower(st.ID)] = true
		s.Counts.Studies++
		ss := StudySummary{ID: st.ID, Report: st.Report, Models: []string{}}
		switch {
		case st.Err != nil:
			ss.Error = oneLine(st.Err.Error())
		case st.Results == nil:
			return nil, fmt.Errorf("report: Summarize: study %s has neither results nor an error", st.ID)
		default:
			if st.Results.Sensitivity == nil {
				if err := Analyze(st.Results); err != nil {
					ss.Error = oneLine(err.Error())
					break
				}
			}
			ss.OK = true
		}
		if !ss.OK {
			ss.Report = ""
			s.Counts.Failed++
			s.Studies = append(s.Studies, ss)
			continue
		}
		s.Counts.Succeeded++
		s.addStudy(st, &ss)
		s.Studies = append(s.Studies, ss)
		for _, mv := range st.Results.Sensitivity.ModelVerdicts {
			s.Verdicts = append(s.Verdicts, batchVerdict(st.Results, st.ID, mv))
		}
	}
	slices.Sort(s.Tolerances)
	return s, nil
}

// addStudy adds a study that was analysed to the summary: its base
// extent, models and AUC verdict into ss, one row per model (with its
// verdict and its reading against a null) and the counts.
func (s *BatchSummary) addStudy(st StudyResult, ss *StudySummary) {
	r := st.Results
	if s.Software == (Software{}) {
		s.Software = r.Software
	}
	sens := r.Sensitivity
	ss.BaseExtent, ss.Extents = sens.BaseExtent, len(sens.ScoredExtents)
	ss.StandIn = standInReason(r)
	ss.Occurrences = occurrenceHash(r)
	ss.Warnings = r.Warnings
	for _, e := range r.Extents {
		if e.ID == sens.BaseExtent {
			ss.BaseAreaKm2 = e.AreaKm2
		}
	}
	ss.Models = append(ss.Models, sens.ModelNames...)
	ss.Verdict = JudgementUndetermined
	for _, v := range sens.Verdicts {
		if v.Metric == "auc" {
			ss.Verdict = v.Verdict
		}
	}
	s.Counts.add(ss.Verdict, &s.Counts.Sensitive, &s.Counts.Robust, &s.Counts.Undetermined)
	if ss.StandIn != "" {
		s.Counts.StandIn++
	}
	judged, unscored := false, len(sens.ModelNames) > 0
	var whys []string
	for _, model := range sens.ModelNames {
		why, none := unscoredWhy(r, model)
		unscored = unscored && none
		whys = append(whys, model+": "+why)
		row := studyRow(r, st.ID, model)
		row.Warnings = len(r.Warnings)
		s.Rows = append(s.Rows, row)
		judged = judged || row.Judged
		s.Counts.Pairs++
		s.Counts.add(row.Verdict, &s.Counts.PairsSensitive, &s.Counts.PairsRobust, &s.Counts.PairsUndetermined)
		if row.Verdict == JudgementUndetermined && !row.Judged {
			s.Counts.PairsNotJudged++
			if none {
				s.Counts.PairsNotJudgedUnscored++
			}
		}
		if row.Null != "" {
			s.Counts.NullPairs++
			if row.NullKind == NullDistance {
				s.Counts.NullDistance++
			}
			switch row.NullReading {
			case ReadingAbove:
				s.Counts.Above++
				if row.NullNoSkill != "" {
					s.Counts.AboveNoSkill++
				}
			case ReadingNotAbove:
				if row.nullSame() {
					s.Counts.Same++
				} else {
					s.Counts.NotAbove++
				}
			case ReadingBelow:
				s.Counts.Below++
			case ReadingTooFew:
				s.Counts.TooFew++
			}
		}
		if !slices.Contains(s.Tolerances, row.Tolerance) {
			s.Tolerances = append(s.Tolerances, row.Tolerance)
		}
	}
	if ss.Verdict == JudgementUndetermined && !judged {
		ss.NotJudged = true
		s.Counts.NotJudged++
		if unscored {
			ss.Unscored, ss.UnscoredWhy = true, strings.Join(whys, "; ")
			s.Counts.NotJudgedUnscored++
		}
	}
}

// unscoredWhy reports whether model is scored on no extent of r (some of
// its scores recorded, none scored), and then why: the reason its score
// on the base extent gives (the first extent's when the base extent has
// none), as "scored on no extent; on extent base: constant suitability
// (...)".
func unscoredWhy(r *Results, model string) (string, bool) {
	var first, base *Score
	for i := range r.Scores {
		sc := &r.Scores[i]
		if sc.Model != model {
			continue
		}
		if sc.Scored {
			return "", false
		}
		if first == nil {
			first = sc
		}
		if sc.Extent == r.Sensitivity.BaseExtent {
			base = sc
		}
	}
	switch {
	case first == nil:
		return "", false // no score of the model recorded: not known
	case base != nil && base.NotScored != "":
		return fmt.Sprintf("scored on no extent; on extent %s: %s", base.Extent, base.NotScored), true
	case first.NotScored != "":
		return fmt.Sprintf("scored on no extent; on extent %s: %s", first.Extent, first.NotScored), true
	}
	return "scored on no extent", true
}

// add counts verdict v into the matching counter.
func (c *BatchCounts) add(v Judgement, sensitive, robust, undetermined *int) {
	switch v {
	case JudgementSensitive:
		*sensitive++
	case JudgementRobust:
		*robust++
	default:
		*undetermined++
	}
}

// oneLine joins the lines of an error message with "; ".
func oneLine(s string) string {
	lines := strings.FieldsFunc(s, func(r rune) bool { return r == '\n' || r == '\r' })
	for i := range lines {
		lines[i] = strings.TrimSpace(lines[i])
	}
	return strings.Join(slices.DeleteFunc(lines, func(l string) bool { return l == "" }), "; ")
}

// studyRow builds the row of one model of an analysed study.
func studyRow(r *Results, id, model string) BatchRow {
	sens := r.Sensitivity
	row := BatchRow{Study: id, Model: model, BaseExtent: sens.BaseExtent, Verdict: JudgementUndetermined, NullReading: ReadingUndefined}
	for _, sp := range sens.Spreads {
		if sp.Metric == "auc" && sp.Model == model {
			row.Extents = sp.N
			if sp.N > 0 {
				row.AUCMin, row.AUCMax, row.AUCRange = sp.Min, sp.Max, sp.Range
				row.MinExtent, row.MaxExtent = sp.MinExtent, sp.MaxExtent
			}
		}
	}
	for _, mv := range sens.ModelVerdicts {
		if mv.Metric != "auc" || mv.Model != model {
			continue
		}
		row.Tolerance, row.Verdict = mv.Tolerance, mv.Verdict
		row.AUCBase, row.AUCBaseDefined = mv.BaseValue, mv.BaseDefined
		for _, d := range mv.Diffs {
			row.Judged = row.Judged || (d.Defined && !d.notJudged())
		}
		if k := effectIndex(mv); k >= 0 {
			d := mv.Diffs[k]
			row.EffectDefined, row.EffectExtent = true, d.Extent
			// The AUC's differences carry an interval (placements).
			lo, hi, _ := d.Interval()
			row.Effect, row.EffectLow, row.EffectHigh = d.Diff, lo, hi
			row.EffectPoints, row.EffectJudged, row.EffectNotJudged = d.CommonPoints, !d.notJudged(), d.why()
		} else {
			row.EffectNotJudged = noDifferenceWhy(r, mv)
		}
	}
	for _, sc := range r.Scores {
		if sc.Model == model && sc.Extent == sens.BaseExtent {
			row.TestPoints, row.TestPointsKnown = sc.TestPoints, true
		}
	}
	if an := baseNullComparison(r, model); an != nil {
		row.Null, row.NullKind = an.Null, an.NullKind
		if g := an.gap(an.BaseExtent); g != nil && g.Defined {
			row.NullDefined = true
			row.NullDiff, row.NullLow, row.NullHigh = g.Diff, g.Low, g.High
			row.NullReading, row.NullNotJudged = an.BaseReading, g.why()
			if aboveWithoutSkill(MetricAUC, g) {
				row.NullNoSkill = g.vsRandom(MetricAUC)
			}
		}
	}
	return row
}

// nullSame tells whether r's model scores as its null does on the base
// extent: read not above, with the difference and its interval 0 (as
// NullGap.zero), which the study's own text calls "the same".
func (r BatchRow) nullSame() bool {
	return r.NullDefined && r.NullReading == ReadingNotAbove && r.NullDiff == 0 && r.NullLow == 0 && r.NullHigh == 0
}

// standInReason is why the study's base extent was left out when another
// extent stands in for it: the reason its scores gave when they all gave
// the same one ("no test points inside this extent"), else the reason the
// analysis recorded; "" when the base extent itself is the reference, or
// when no extent was scored (BaseExtent is empty: nothing stands in).
func standInReason(r *Results) string {
	sens := r.Sensitivity
	if sens.BaseExtent == vocab.BaseID || sens.BaseExtent == "" {
		return ""
	}
	why := ""
	for _, u := range sens.Unscored {
		if u.Extent != vocab.BaseID {
			continue
		}
		if why != "" && why != u.Reason {
			why = ""
			break
		}
		why = u.Reason
	}
	if why == "" {
		for _, e := range sens.SkippedExtents {
			if e.ID == vocab.BaseID {
				why = e.Reason
			}
		}
	}
	if why == "" {
		why = "not scored"
	}
	return why
}

// occurrenceHash is the SHA-256 of the study's occurrence file, "" when
// the results do not record it.
func occurrenceHash(r *Results) string {
	for _, in := range r.Inputs {
		if in.Role == "occurrences" {
			return in.SHA256
		}
	}
	return ""
}

// SharedOccurrences lists the groups of studies (ids in study order)
// whose occurrence files are byte-identical (same SHA-256): their
// verdicts rest on the same records and are not independent of one
// another. Groups are in the order of their first study.
func (s *BatchSummary) SharedOccurrences() [][]string {
	var groups [][]string
	at := map[string]int{}
	for _, st := range s.Studies {
		if !st.OK || st.Occurrences == "" {
			continue
		}
		if i, ok := at[st.Occurrences]; ok {
			groups[i] = append(groups[i], st.ID)
			continue
		}
		at[st.Occurrences] = len(groups)
		groups = append(groups, []string{st.ID})
	}
	return slices.DeleteFunc(groups, func(g []string) bool { return len(g) < 2 })
}

// baseNullComparison picks the null a model is compared with in the
// summary: the distance-only null when it was scored, else the first null
// in Results.Models order (AUC only). Nil when the study has no null.
func baseNullComparison(r *Results, model string) *AboveNull {
	var first *AboveNull
	for i := range r.Sensitivity.AboveNull {
		an := &r.Sensitivity.AboveNull[i]
		if an.Metric != "auc" || an.Model != model {
			continue
		}
		if an.NullKind == NullDistance {
			return an
		}
		if first == nil {
			first = an
		}
	}
	return first
}

// effectIndex is the index in mv.Diffs of the difference from the base
// extent of largest magnitude, judged or not, as the summary defines the
// extent effect, or -1 when none is defined. It is not mv.Largest, which
// for an extent-sensitive verdict is the largest judged difference (a
// summary row gave -0.107 on points_50km as the effect of largest
// magnitude beside -0.161 on points_25km, on 9 common test points).
func effectIndex(mv ModelVerdict) int {
	if mv.Largest < 0 || mv.Largest >= len(mv.Diffs) {
		return -1
	}
	return largestDefined(mv.Diffs)
}

// batchVerdict turns one model verdict of the study's results r into a
// summary row.
func batchVerdict(r *Results, study string, mv ModelVerdict) BatchVerdict {
	v := BatchVerdict{Study: study, Model: mv.Model, Metric: mv.Metric, Label: mv.Label, Tolerance: mv.Tolerance,
		Verdict: mv.Verdict, BaseExtent: mv.Base}
	if k := effectIndex(mv); k >= 0 {
		d := mv.Diffs[k]
		v.Low, v.High, v.Interval = d.Interval()
		v.Defined, v.Extent, v.Diff, v.Method, v.NotJudged = true, d.Extent, d.Diff, d.Method, d.why()
	} else {
		v.NotJudged = noDifferenceWhy(r, mv)
	}
	return v
}

// TestPoints is the number of test points study id scored on its base
// extent: the largest over its models (they share the occurrence records;
// a model with no data under some of them scores fewer). False when no
// model's count is known.
func (s *BatchSummary) TestPoints(id string) (int, bool) {
	n, ok := 0, false
	for _, r := range s.Rows {
		if r.Study == id && r.TestPointsKnown {
			n, ok = max(n, r.TestPoints), true
		}
	}
	return n, ok
}

// Models lists the model names of the summary, in order of first
// appearance (study order, then each study's model order).
func (s *BatchSummary) Models() []string {
	var out []string
	for _, row := range s.Rows {
		if !slices.Contains(out, row.Model) {
			out = append(out, row.Model)
		}
	}
	return out
}

// EffectOrder returns the studies that have at least one defined extent
// effect, sorted by their sort key ascending (ties by id, numbers in ids
// compared as numbers: sp2 before sp10, see idCompare): the study's
// effect of largest magnitude among its models, with its sign. It is the
// order of the figure's rows, from the bottom up.
func (s *BatchSummary) EffectOrder() []string {
	type keyed struct {
		id  string
		key float64
	}
	keys := map[string]*keyed{}
	var out []*keyed
	for _, row := range s.Rows {
		if !row.EffectDefined {
			continue
		}
		k := keys[row.Study]
		if k == nil {
			k = &keyed{id: row.Study, key: row.Effect}
			keys[row.Study] = k
			out = append(out, k)
		} else if math.Abs(row.Effect) > math.Abs(k.key) {
			k.key = row.Effect
		}
	}
	slices.SortStableFunc(out, func(a, b *keyed) int {
		if c := cmp.Compare(a.key, b.key); c != 0 {
			return c
		}
		return idCompare(a.id, b.id)
	})
	ids := make([]string, len(out))
	for i, k := range out {
		ids[i] = k.id
	}
	return ids
}

// idCompare orders study ids as a reader counts them: runs of ASCII
// digits compare as the numbers they write (sp2 before sp10, leading
// zeros aside), everything else byte by byte; ids equal so (sp02 and
// sp2) fall back to their bytes, so the order is total.
func idCompare(a, b string) int {
	isDigit := func(c byte) bool { return '0' <= c && c <= '9' }
	i, j := 0, 0
	for i < len(a) && j < len(b) {
		if !isDigit(a[i]) || !isDigit(b[j]) {
			if a[i] != b[j] {
				return cmp.Compare(a[i], b[j])
			}
			i, j = i+1, j+1
			continue
		}
		i0, j0 := i, j
		for i < len(a) && isDigit(a[i]) {
			i++
		}
		for j < len(b) && isDigit(b[j]) {
			j++
		}
		na, nb := strings.TrimLeft(a[i0:i], "0"), strings.TrimLeft(b[j0:j], "0")
		if c := cmp.Compare(len(na), len(nb)); c != 0 {
			return c
		}
		if c := strings.Compare(na, nb); c != 0 {
			return c
		}
	}
	if c := cmp.Compare(len(a)-i, len(b)-j); c != 0 {
		return c
	}
	return strings.Compare(a, b)
}

// Files of a batch summary, written into the batch's output folder beside
// the study folders. A study id must not equal one of them (ignoring case).
const (
	SummaryCSV      = "summary.csv"
	SummaryVerdicts = "summary_verdicts.csv"
	SummaryHTML     = "summary.html"
	SummaryMethods  = "summary_methods.md"
	SummaryFigures  = "summary_figures"
	// EffectFigure is the base name of the extent-effect figure inside
	// SummaryFigures (.svg, .pdf and .png).
	EffectFigure = "extent_effect"
)

// SummaryNames lists the names WriteSummary creates in the batch folder.
func SummaryNames() []string {
	return []string{SummaryCSV, SummaryVerdicts, SummaryHTML, SummaryMethods, SummaryFigures}
}

// WriteSummary writes the summary across studies into dir (which exists):
// SummaryCSV, SummaryVerdicts, SummaryMethods, SummaryHTML and the
// extent-effect figure as SVG, PDF and PNG in SummaryFigures. Each file is
// written atomically. The output depends only on s.
func WriteSummary(dir string, s *BatchSummary) error {
	if s == nil {
		return errors.New("report: WriteSummary: nil summary")
	}
	if st, err := os.Stat(dir); err != nil {
		return fmt.Errorf("report: summary folder: %w", err)
	} else if !st.IsDir() {
		return fmt.Errorf("report: summary folder %s is not a folder", dir)
	}
	var rows, verdicts strings.Builder
	if err := s.WriteCSV(&rows); err != nil {
		return err
	}
	if err := s.WriteVerdictsCSV(&verdicts); err != nil {
		return err
	}
	// Everything is made first, then written together (outfile.WriteAll):
	// a full disk leaves the previous summary whole, not a mix of old and
	// new files.
	files := []outfile.File{
		{Path: filepath.Join(dir, SummaryCSV), Data: []byte(rows.String())},
		{Path: filepath.Join(dir, SummaryVerdicts), Data: []byte(verdicts.String())},
		{Path: filepath.Join(dir, SummaryMethods), Data: []byte(s.MethodsText())},
	}
	var svg []byte
	if f, ok := effectFigure(s); ok {
		figDir := filepath.Join(dir, SummaryFigures)
		for _, format := range figureFormats {
			data, err := render(f, format)
			if err != nil {
				return err
			}
			files = append(files, outfile.File{Path: filepath.Join(figDir, f.Name+"."+format), Data: data})
			if format == "svg" {
				svg = data
			}
		}
		if err := os.MkdirAll(figDir, 0o777); err != nil {
			return fmt.Errorf("report: create %s: %w", figDir, err)
		}
	}
	page, err := s.page(svg)
	if err != nil {
		return err
	}
	files = append(files, outfile.File{Path: filepath.Join(dir, SummaryHTML), Data: page})
	if err := outfile.WriteAll(files, 0o666); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	if svg == nil {
		return removeStaleFigure(dir)
	}
	return nil
}

// removeStaleFigure removes the extent-effect figure an earlier summary
// wrote into dir, once a summary without a figure (no study with a
// difference from its base extent) has replaced it: left there, it would
// draw studies and effects the new summary no longer holds. Only the
// figure's own files go, and SummaryFigures only when that leaves it
// empty; files the batch did not write stay.
func removeStaleFigure(dir string) error {
	figDir := filepath.Join(dir, SummaryFigures)
	for _, format := range figureFormats {
		p := filepath.Join(figDir, EffectFigure+"."+format)
		if err := os.Remove(p); err != nil && !errors.Is(err, fs.ErrNotExist) {
			return fmt.Errorf("report: remove the previous summary's figure %s: %w", p, err)
		}
	}
	if left, err := os.ReadDir(figDir); err == nil && len(left) == 0 {
		if err := os.Remove(figDir); err != nil && !errors.Is(err, fs.ErrNotExist) {
			return fmt.Errorf("report: remove %s: %w", figDir, err)
		}
	}
	return nil
}
