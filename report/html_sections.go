package report

import (
	"fmt"
	"strconv"
	"strings"

	"areasweep/extent/vocab"
	"areasweep/metrics"
)

// analysisView is the page's Analysis section. Optional parts are nil
// when the run has none.
type analysisView struct {
	BaseExtent string
	// StandIn, when the base extent could not be scored, says that
	// BaseExtent stands in for it and why; "" otherwise.
	StandIn                             string
	PairedResamples                     int
	MinPairedPoints, MinResampledPoints int
	// CrossingNote names the partial ROC ratio's larger cut-offs between
	// models at small E (crossingNote), "" when there are none.
	CrossingNote string
	// MinPercentileResamples is the cut-off on formed resamples.
	MinPercentileResamples int
	// MapModel is the model whose omitted test points the maps mark, ""
	// without maps.
	MapModel      string
	ModelVerdicts []badge
	Differences   htmlTable
	Rankings      *sentencesTable
	Spread        htmlTable
	Decomposition *decompositionView
	Chains        *chainsView
	Truncation    []string
	AboveNull     *aboveNullView
	// IndependenceSentence is always shown; Independence only when defined.
	// NullNote is scoresView.NullNote, for the omitted test points.
	NullNote             string
	IndependenceSentence string
	Independence         *htmlTable
	SortingBias          *notedTable
	Omitted              htmlTable
	// Lone, with fewer than two scored extents, holds the notes said in
	// place of those explaining differences, spreads and sums of squares;
	// nil otherwise.
	Lone *loneNotes
}

// loneNotes are the Analysis notes of a family with fewer than two
// scored extents. The notes that explain the differences, spread and
// sums-of-squares tables describe a comparison across extents; with one
// extent (or none) there is nothing to compare, as each verdict's
// sentence says, and the notes say so too.
type loneNotes struct {
	Differences, Spread, Decomposition string
}

// loneExtentNotes returns the notes of a family with fewer than two
// scored extents, naming the one extent scored; nil with two or more.
func loneExtentNotes(s *Sensitivity) *loneNotes {
	switch len(s.ScoredExtents) {
	case 0:
		const none = "No model could be scored on any extent, so there is nothing to compare"
		return &loneNotes{
			Differences:   none + ": no score has a difference from another extent.",
			Spread:        none + ": no score has a spread across extents.",
			Decomposition: none + ": there are no sums of squares to split.",
		}
	case 1:
		one := fmt.Sprintf("Only one extent, %s, could be scored, so there is nothing to compare", s.ScoredExtents[0])
		return &loneNotes{
			Differences: one + ": no score has another extent to take a difference from.",
			Spread: one + fmt.Sprintf(": the table gives each score on %s alone, so its range is 0 and it has no SD across extents (that needs two).",
				s.ScoredExtents[0]),
			Decomposition: one + ": with no second extent there is no extent effect to split from the model effect, and no second order of the models for Kendall's W to compare.",
		}
	}
	return nil
}

// sentencesTable is a list of sentences followed by a table.
type sentencesTable struct {
	Sentences []string
	Table     htmlTable
}

type decompositionView struct {
	Table htmlTable
	// Ranking is the order of the models by AUC per extent, if any.
	Ranking *htmlTable
}

type chainsView struct {
	// Note explains, when test points enter along some chain, that a
	// ring's inner AUC is on the outer extent's test points.
	Note          string
	Sentences     []string
	Steps, Slopes htmlTable
}

type aboveNullView struct {
	Sentences []string
	Note      string
	Table     htmlTable
}

func analysisSection(r *Results) analysisView {
	s := r.Sensitivity
	label := map[string]string{}
	for _, m := range s.Metrics {
		label[m.Key] = m.Label
	}
	v := analysisView{BaseExtent: s.BaseExtent, PairedResamples: r.Settings.PairedResamples, MinPairedPoints: MinPairedPoints, MinResampledPoints: MinResampledPoints, CrossingNote: crossingNote(r.Settings), MinPercentileResamples: MinPercentileResamples, NullNote: nullThresholdNote(r)}
	if s.BaseExtent == "" {
		// No extent scored: the differences would be taken from the
		// base extent, and none stands in for it.
		v.BaseExtent = vocab.BaseID
	} else if s.BaseExtent != vocab.BaseID {
		v.StandIn = standInText(s)
		if v.StandIn == "" {
			v.StandIn = ", the first scored extent"
		}
	}
	if _, ok := mapFigure(r); ok && len(r.Models) > 0 {
		v.MapModel = r.Models[0].Name
	}
	v.ModelVerdicts, v.Differences = differencesSection(s, label)
	v.Rankings = rankingsSection(s, label)
	v.Spread = spreadTable(s, label)
	v.Decomposition = decompositionSection(s, label)
	v.Chains = chainsSection(s)
	v.Truncation = []string{}
	for _, t := range s.Truncation {
		v.Truncation = append(v.Truncation, t.Sentence)
	}
	v.AboveNull = aboveNullSection(r)
	v.IndependenceSentence, v.Independence, v.SortingBias = independenceSection(r)
	v.Omitted = omittedTable(s)
	v.Lone = loneExtentNotes(s)
	return v
}

// differencesSection is each verdict's badge and the table of every
// paired difference from the base extent.
func differencesSection(s *Sensitivity, label map[string]string) ([]badge, htmlTable) {
	var badges []badge
	var rows [][]cell
	for _, mv := range s.ModelVerdicts {
		badges = append(badges, verdictBadge(mv.Metric, mv.Verdict, mv.Sentence))
		for _, d := range mv.Diffs {
			row := []cell{tc(label[mv.Metric]), tc(mv.Model), tc(d.Extent), ic(d.TestPoints), ic(d.CommonPoints)}
			if !d.Defined {
				row = append(row, dash, dash, dash, dash, tc("undefined"))
				rows = append(rows, row)
				continue
			}
			if d.notJudged() {
				// The difference describes; its interval is not read. The
				// Boyce index's reason (and the partial ROC ratio's between
				// extents) is the same on every row and its
				// verdict's sentence above gives it whole.
				why := d.why()
				if d.Position == positionNotCalibrated {
					why = "intervals not calibrated: see the sentence above"
				}
				row = append(row, nc(d.Diff, 4), dash, tc(strings.ReplaceAll(d.Method, "_", " ")), nc(d.TestSetShift, 4), tc("not judged ("+why+")"))
				rows = append(rows, row)
				continue
			}
			lo, hi, _ := d.Interval() // judged: it has one
			row = append(row, nc(d.Diff, 4), cell{text: f4(lo) + " to " + f4(hi), num: lo, isN: true, cls: "n"},
				tc(strings.ReplaceAll(d.Method, "_", " ")), nc(d.TestSetShift, 4), tc(d.Position))
			rows = append(rows, row)
		}
	}
	return badges, table("tbl-differences", []string{"metric", "model", "extent", "test points", "common", "difference", "95% interval", "method", "test-set shift", "against tolerance"}, rows)

}

// rankingsSection is the models' paired comparisons, sentences and
// table; nil with one model.
func rankingsSection(s *Sensitivity, label map[string]string) *sentencesTable {
	if len(s.Rankings) == 0 {
		return nil
	}
	st := &sentencesTable{}
	var rows [][]cell
	for _, rk := range s.Rankings {
		st.Sentences = append(st.Sentences, rk.Sentence)
		rows = append(rows, []cell{tc(label[rk.Metric]), tc(rk.Model + " − " + rk.Other), ic(rk.Extents), ic(rk.Better), ic(rk.Worse), ic(rk.WithinNoise)})
	}
	st.Table = table("tbl-model-differences", []string{"metric", "models", "extents", "better beyond noise", "worse beyond noise", "within noise"}, rows)
	return st
}

// spreadTable is each score's spread across extents (a description).
func spreadTable(s *Sensitivity, label map[string]string) htmlTable {
	var rows [][]cell
	for _, sp := range s.Spreads {
		row := []cell{tc(label[sp.Metric]), tc(sp.Model), ic(sp.N)}
		if sp.N == 0 {
			row = append(row, dash, dash, dash, dash)
			rows = append(rows, row)
			continue
		}
		row = append(row, nc(sp.Min, 3), nc(sp.Max, 3), nc(sp.Range, 3), defNum(sp.SD, sp.SDDefined, 3))
		rows = append(rows, row)
	}
	return table("tbl-spread", []string{"metric", "model", "extents scored", "minimum", "maximum", "range", "SD across extents"}, rows)

}

// aboveNullSection is the models against the nulls, every metric,
// sentences and table; nil without a null.
func aboveNullSection(r *Results) *aboveNullView {
	s := r.Sensitivity
	if rows := aboveNullRows(r); len(rows) > 0 {
		an := &aboveNullView{Note: aboveNullNote}
		for _, x := range s.AboveNull {
			an.Sentences = append(an.Sentences, x.Sentence)
		}
		an.Table = table("tbl-above-null", []string{"metric", "model", "null", "extent", "area (km²)", "common test points", "model", "null", "model minus null", "95% interval", "method", "reading"}, rows)
		return an
	}

	return nil
}

// independenceSection is the check of the test points' independence from
// the training points: its sentence (with our cut-offs named), the table
// of distances and the sorting bias per extent (each nil when not
// defined).
func independenceSection(r *Results) (sentence string, dist *htmlTable, sorting *notedTable) {
	ind := r.Sensitivity.Independence
	sentence = ind.Sentence
	if ind.Defined {
		sentence += fmt.Sprintf(" The distance of %g cell widths and the %s level are our cut-offs for a quick check, not a published test.", NearCells, pct(NearShareWarn))
	}
	if ind.Defined {
		dist = &htmlTable{ID: "tbl-independence", Caption: "Distance from each test point to the nearest training point (km)",
			Head: []string{"n", "min", "lower quartile", "median", "upper quartile", "max", "cell width km", "within km", "share within"},
			Rows: [][]cell{{ic(ind.N), nc(ind.Min, 2), nc(ind.Q1, 2), nc(ind.Median, 2), nc(ind.Q3, 2), nc(ind.Max, 2), nc(ind.CellWidthKm, 2), nc(ind.NearKm, 2), nc(ind.NearShare, 2)}}}
	}
	if sb := sortingBiasRows(r); len(sb) > 0 {
		sorting = &notedTable{Note: sortingBiasNoteFor(r), Table: htmlTable{ID: "tbl-sorting-bias",
			Caption: "Distance to the nearest training point: test points against the extent's cells",
			Head: []string{"extent", "area (km²)",
				"test points", "test mean km", "cells mean km", "ratio of means", "test median km", "cells median km", "ratio of medians"},
			Rows: sb}}
	}
	return sentence, dist, sorting
}

// omittedTable lists, per model and threshold rule, the test records the
// rule misses.
func omittedTable(s *Sensitivity) htmlTable {
	var rows [][]cell
	for _, o := range s.OmittedPoints {
		ids := make([]string, len(o.IDs))
		for i, id := range o.IDs {
			ids[i] = strconv.Itoa(id)
		}
		rows = append(rows, []cell{tc(o.Model), tc(thresholdLabel(o.Threshold)), nc(o.Value, 4), ic(o.Count), ic(o.TestPoints), nc(o.Share, 3), tc(idList(ids))})
	}
	return table("tbl-omitted", []string{"model", "rule", "cut value", "test records missed", "test records", "share missed", "ids of the missed records"}, rows)
}

// pctCell is a table cell showing the whole percent p of share v, sorted
// by v.
func pctCell(p int, v float64) cell {
	return cell{text: strconv.Itoa(p), num: 100 * v, isN: true, cls: "n"}
}

// decompositionSection is the sums-of-squares table and the order of the
// models by AUC per extent; nil without decompositions.
func decompositionSection(s *Sensitivity, label map[string]string) *decompositionView {
	if len(s.Decompositions) == 0 {
		return nil
	}
	var rows [][]cell
	for _, d := range s.Decompositions {
		row := []cell{tc(label[d.Metric]), ic(len(d.Extents))}
		if d.Defined {
			// Whole percents that add up to 100, as the sentence gives them.
			p := sharePercents(d.ShareExtent, d.ShareModel, d.ShareResidual)
			row = append(row, pctCell(p[0], d.ShareExtent), pctCell(p[1], d.ShareModel), pctCell(p[2], d.ShareResidual))
		} else {
			row = append(row, dash, dash, dash)
		}
		row = append(row, defNum(d.KendallW, d.KendallWDefined, 3))
		row = append(row, tc(d.BaseExtent), tc(extentList(d.DiffersFromBase)))
		rows = append(rows, row)
	}
	v := &decompositionView{Table: table("tbl-decomposition", []string{"metric", "extents", "extent %", "model %", "non-additive %", "Kendall's W", "base extent", "order differs on"}, rows)}
	d := s.findDecomposition("auc")
	if d == nil || len(d.Rankings) == 0 {
		return v
	}
	rows = nil
	for _, er := range d.Rankings {
		row := []cell{tc(er.Extent)}
		for _, rk := range er.Ranks {
			row = append(row, nc(rk, 1))
		}
		row = append(row, tc(orderText(d.Models, er.Ranks)), tc(yesNo(er.DiffersFromBase)))
		rows = append(rows, row)
	}
	head := []string{"extent"}
	for _, m := range d.Models {
		head = append(head, "rank of "+m)
	}
	head = append(head, "order (best first)", "differs from "+d.BaseExtent)
	t := table("tbl-ranking", head, rows)
	v.Ranking = &t
	return v
}

// maxExtentNames is the most extents a cell names.
const maxExtentNames = 8

// extentList joins extent ids for a table cell; a longer list than
// maxExtentNames gives its count and first names: at 60 extents the
// order of the models differed from the base extent's on 50 of them.
func extentList(ids []string) string {
	if len(ids) <= maxExtentNames {
		return strings.Join(ids, ", ")
	}
	return fmt.Sprintf("%d extents: %s, …", len(ids), strings.Join(ids[:maxExtentNames], ", "))
}

// maxIDs is the most ids of missed test points a cell of the omitted
// table lists: a null or a poor model can miss hundreds, and the cell
// then fills screens.
const maxIDs = 30

// idList joins ids, the first maxIDs of a longer list followed by how
// many more there are and where every one is listed.
func idList(ids []string) string {
	if len(ids) <= maxIDs {
		return strings.Join(ids, ", ")
	}
	return fmt.Sprintf("%s and %d more (results.json, omissions, lists every one)", strings.Join(ids[:maxIDs], ", "), len(ids)-maxIDs)
}

// chainsEnteringNote is chainsView.Note.
const chainsEnteringNote = "Test points enter along some chains (rows \"test points entering\" in the table). " +
	"A ring's AUC is compared with the AUC of the inner extent's cells on the test points of the outer one, " +
	"so where test points have entered, that inner AUC in a sentence differs from the inner extent's own AUC in the Scores table; " +
	"the step of entering test points accounts for the difference."

// chainsSection is the nested rings' sentences, steps and slopes; nil
// without chains.
func chainsSection(s *Sensitivity) *chainsView {
	if len(s.Chains) == 0 {
		return nil
	}
	v := &chainsView{}
	var rows [][]cell
	for _, c := range s.Chains {
		v.Sentences = append(v.Sentences, c.Sentence)
		for _, st := range c.Steps {
			if st.Kind == StepTestPoints {
				v.Note = chainsEnteringNote
			}
			what := "ring " + st.Outer + " − " + st.Inner
			if st.Kind == StepTestPoints {
				what = "test points entering with " + st.Outer
			}
			row := []cell{tc(c.Chain), tc(c.Model), tc(what)}
			if st.Kind == StepRing {
				row = append(row, areaCell(st.RingAreaKm2), defNum(st.AUCRing, st.AUCRingDefined, 3))
			} else {
				row = append(row, dash, dash)
			}
			row = append(row, nc(st.AUCInner, 3), nc(st.AUCOuter, 3), nc(st.Change, 4), defNum(100*st.Share, c.SharesDefined, 0))
			rows = append(rows, row)
		}
	}
	v.Steps = table("tbl-chains", []string{"nested chain", "model", "step", "ring area (km²)", "AUC of the ring alone", "AUC before", "AUC after", "change", "share of the chain's change (%)"}, rows)
	rows = nil
	for _, c := range s.Chains {
		rows = append(rows, []cell{tc(c.Chain), tc(c.Model), ic(c.Slope.N), defNum(c.Slope.PerDoubling, c.Slope.Defined, 4), defNum(c.Slope.R2, c.Slope.R2Defined, 2)})
	}
	v.Slopes = table("tbl-chain-slopes", []string{"nested chain", "model", "members", "AUC change per doubling of area", "r²"}, rows)
	return v
}

// orderText writes the models best first by their ranks: "a > b = c",
// with "=" between models of the same (mid-)rank, which tie on the point
// estimate (ties in model order).
func orderText(models []string, ranks []float64) string {
	order := orderByRank(models, ranks)
	rank := map[string]float64{}
	for i, m := range models {
		rank[m] = ranks[i]
	}
	var b strings.Builder
	for i, m := range order {
		if i > 0 {
			if rank[m] == rank[order[i-1]] {
				b.WriteString(" = ")
			} else {
				b.WriteString(" > ")
			}
		}
		b.WriteString(m)
	}
	return b.String()
}

func yesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}

func f4(v float64) string {
	s := strconv.FormatFloat(v, 'f', 4, 64)
	if s == "-0.0000" {
		s = "0.0000"
	}
	return s
}

func defNum(v float64, ok bool, dec int) cell {
	if !ok {
		return dash
	}
	return nc(v, dec)
}

// ruleName spells out a threshold rule: "minimum training presence",
// "10th percentile training presence" or "fixed cut 0.5".
func ruleName(t Threshold) string {
	if t.Name == metrics.ThresholdFixed {
		return "fixed cut " + fmtG(t.Value)
	}
	return thresholdLabel(t.Name)
}

// formedPartialROC reports whether at least one bootstrap resample formed a
// partial ROC ratio.
func formedPartialROC(pr PartialROC) bool {
	return !(pr.Iterations > 0 && pr.NotFormed >= pr.Iterations)
}

// scoresView is the page's Scores section: three long tables.
type scoresView struct {
	Iterations      int
	ResamplePercent string
	// BootstrapNote is bootstrapNote of the settings.
	BootstrapNote string
	// PublishedPSize is the constant of that name.
	PublishedPSize string
	// NullNote, when a distance-only null was scored, says why its
	// threshold rows omit nearly every test record.
	NullNote string
	// TooFewNote, when a row of PartialROC leaves out the percentiles
	// and P (BootstrapReadable), says why; "" otherwise.
	TooFewNote string
	// RandomNote describes the table's last column, the area-random
	// test, or says that the file holds none (randomTestAbsent).
	RandomNote string
	Main       htmlTable
	PartialROC htmlTable
	Thresholds htmlTable
}

// nullThresholdNote says, when a distance-only null was scored, that its
// threshold rows describe the null's construction, not a model: its value
// is minus the distance in metres to the nearest training record, so the
// cuts taken from the training records lie within about a cell of one and
// every test record farther than that from all of them is omitted.
func nullThresholdNote(r *Results) string {
	var names []string
	for _, m := range r.Models {
		if m.IsNull() && m.NullKind == NullDistance {
			names = append(names, m.Name)
		}
	}
	if len(names) == 0 {
		return ""
	}
	return fmt.Sprintf("The rows of %s (distance-only null) are not a model's: its value is minus the distance in metres to the nearest training record, "+
		"so a cut taken from the training records lies within about a cell of one, and every test record farther than that from all of them is missed. "+
		"Its omission rates describe how the null is built, not how well it predicts.", joinList(names))
}

// scoresSection makes the scores as three long tables: the scores with
// one value per model and extent, the partial ROC results (one row per
// model, extent and E) and the threshold tests (one row per model, extent
// and rule).
func scoresSection(r *Results) scoresView {
	st := r.Settings
	v := scoresView{Iterations: st.Iterations, ResamplePercent: fmtG(100 * st.ResampleFraction), NullNote: nullThresholdNote(r),
		BootstrapNote: bootstrapNote(st), PublishedPSize: PublishedPSize}
	draws := metrics.RandomDraws(st.Iterations)
	v.RandomNote = fmt.Sprintf("The last column is a calibrated test: the one-sided p-value of the full-sample ratio against the ratios of as many test records drawn at random over the extent's area (%d draw%s; a model that knows nothing of where the species is), which on a model with no skill falls below 0.05 in about 5%% of studies (README); one from fewer than %d formed draws is not read (our cut-off: it could not fall below %s).", draws, Plural(draws), MinRandomDraws, fmtG(randomPCutoff))
	if randomTestAbsent(r) {
		v.RandomNote = "The last column is empty: " + noRandomTest + "."
	}
	head := []string{"model", "extent", "extent area (km²)", "test records inside", "training records inside", "scored",
		"AUC", "AUC standard error", "AUC with cells unweighted", "AUC on the training records", "AUC resample SD", "Boyce index"}
	var rows [][]cell
	for _, sc := range r.Scores {
		row := []cell{tc(ModelLabel(r, sc.Model)), tc(sc.Extent), areaCell(sc.AreaKm2)}
		if !sc.Scored {
			row = append(row, dash, dash, tc("no: "+sc.NotScored))
			for len(row) < len(head) {
				row = append(row, dash)
			}
			rows = append(rows, row)
			continue
		}
		row = append(row, ic(sc.TestPoints), ic(sc.TrainPoints), tc("yes"), nc(sc.AUC, 3), defNum(sc.AUCSE, sc.TestPoints >= 2, 4), nc(sc.AUCUnweighted, 3), defNum(sc.AUCTrain, sc.TrainPoints > 0, 3), defNum(sc.AUCBootSD, sc.TestPoints >= 2 && st.PairedResamples >= 2, 4))
		if sc.Boyce != nil {
			row = append(row, nc(sc.Boyce.Index, 3))
		} else {
			row = append(row, dash)
		}
		rows = append(rows, row)
	}
	v.Main = table("tbl-scores", head, rows)

	head = []string{"model", "extent", "E", "partial ROC ratio, full sample", "partial ROC ratio, resample mean", "2.5th to 97.5th percentile of resamples", "share of resamples at or below 1 (P)", "resamples formed", "p, test records at random over the area"}
	rows = nil
	for _, sc := range r.Scores {
		if !sc.Scored {
			continue
		}
		for _, pr := range sc.PartialROC {
			// E as given (0.001 is not "0.00", 0.999 not "1.00").
			row := []cell{tc(sc.Model), tc(sc.Extent), {text: fmtG(pr.E), num: pr.E, isN: true, cls: "n"}}
			full := nc(pr.Ratio, 3)
			if !pr.Defined {
				full = cell{text: "undefined: " + pr.Reason}
			}
			if !formedPartialROC(pr) {
				row = append(row, full, dash, dash, dash)
			} else if !BootstrapReadable(pr) {
				// Too few test points per resample (or resamples)
				// for an interval or a test: the mean only.
				row = append(row, full, nc(pr.RatioMean, 3), dash, dash)
				v.TooFewNote = fmt.Sprintf(" %s (our cut-off, as for the AUC's paired differences), or where fewer than %d resamples formed a ratio (our cut-off, as for the paired differences), the percentiles and P are not given (–): resamples of so few records, or so few resamples, are no basis for an interval or a test.", upperFirst(fewResampleWords(r.Settings)), MinPercentileResamples)
			} else {
				row = append(row, full, nc(pr.RatioMean, 3),
					cell{text: f3(pr.CILow) + " to " + f3(pr.CIHigh), num: pr.CILow, isN: true, cls: "n"},
					cell{text: fmtPResampled(pr.PValue, pr.Iterations-pr.NotFormed), num: pr.PValue, isN: true, cls: "n"})
			}
			row = append(row, cell{text: fmt.Sprintf("%d of %d", pr.Iterations-pr.NotFormed, pr.Iterations), num: float64(pr.Iterations - pr.NotFormed), isN: true, cls: "n"})
			switch {
			case pr.PRandom > 0 && !randomRead(pr):
				row = append(row, cell{text: fmt.Sprintf("not read: %d draw%s formed a ratio, fewer than %d (our cut-off)", pr.RandomFormed, Plural(pr.RandomFormed), MinRandomDraws)})
			case pr.PRandom > 0:
				row = append(row, cell{text: fmtP(pr.PRandom), num: pr.PRandom, isN: true, cls: "n"})
			case pr.PRandomNote != "":
				row = append(row, cell{text: "not computed: " + pr.PRandomNote})
			default:
				row = append(row, dash)
			}
			rows = append(rows, row)
		}
	}
	v.PartialROC = table("tbl-partial-roc", head, rows)

	head = []string{"model", "extent", "rule", "cut value", "test records missed (k of n)", "share missed", "share of the extent at or above the cut", "one-sided binomial P"}
	rows = nil
	for _, sc := range r.Scores {
		if !sc.Scored {
			continue
		}
		for _, t := range sc.Thresholds {
			missed := t.N - t.Successes
			row := []cell{tc(sc.Model), tc(sc.Extent), tc(ruleName(t)), nc(t.Value, 4),
				cell{text: fmt.Sprintf("%d of %d", missed, t.N), num: float64(missed), isN: true, cls: "n"}}
			if t.N > 0 {
				row = append(row, nc(t.Omission, 3))
			} else {
				row = append(row, dash)
			}
			row = append(row, nc(t.AreaFraction, 3), cell{text: fmtP(t.PBinomial), num: t.PBinomial, isN: true, cls: "n"})
			rows = append(rows, row)
		}
	}
	v.Thresholds = table("tbl-thresholds", head, rows)
	return v
}

// extentsView is the page's Extents section.
type extentsView struct {
	Table    htmlTable
	Skipped  []SkippedExtent
	Unscored []UnscoredScore
}

func extentsSection(r *Results) extentsView {
	s := r.Sensitivity
	var rows [][]cell
	for _, e := range r.Extents {
		status := string(e.Status)
		if e.DuplicateOf != "" {
			status += " of " + e.DuplicateOf
		}
		rows = append(rows, []cell{tc(e.ID), tc(string(e.Kind)), tc(e.Params), tc(e.Chain), cell{text: groupThousands(e.Cells), num: float64(e.Cells), isN: true, cls: "n"},
			areaCell(e.AreaKm2), nc(e.ShareOfRaster, 3), ic(e.TrainPoints), ic(e.TestPoints), tc(status)})
	}
	return extentsView{
		Table:    table("tbl-extents", []string{"id", "kind", "parameters", "nested chain", "cells", "area (km²)", "share of the raster", "training records inside", "test records inside", "status"}, rows),
		Skipped:  s.SkippedExtents,
		Unscored: s.Unscored,
	}
}

// settingsView is the page's Settings and inputs section.
type settingsView struct{ Settings, Inputs, Models htmlTable }

func settingsSection(r *Results) settingsView {
	st := r.Settings
	fl := func(v []float64) string {
		if len(v) == 0 {
			return "none"
		}
		return fmtList(v, "")
	}
	rows := [][]cell{
		{tc("software"), tc(strings.TrimSpace(r.Software.Name + " " + r.Software.Version))},
		{tc("seed"), tc(strconv.FormatUint(r.Seed, 10))},
		{tc("region buffers (km)"), tc(fl(st.RegionBuffersKm))},
		{tc("point buffers (km)"), tc(fl(st.PointBuffersKm))},
		{tc("point buffers around all points"), tc(yesNo(st.PointBufferAll))},
		{tc("hull buffers (km)"), tc(fl(st.HullBuffersKm))},
		{tc("ecoregion minimum points"), tc(strconv.Itoa(st.EcoregionMinPoints))},
		{tc("ecoregion field"), tc(st.EcoregionField)},
		{tc("partial ROC E"), tc(fl(st.E))},
		{tc("bootstrap iterations (partial ROC bootstrap, Peterson et al. 2008)"), tc(strconv.Itoa(st.Iterations))},
		{tc("resample fraction (partial ROC bootstrap; the published one draws 0.5)"), tc(fmtG(st.ResampleFraction))},
		{tc("paired full-size resamples"), tc(strconv.Itoa(st.PairedResamples))},
		{tc("tolerances (our defaults unless set)"), tc(fmt.Sprintf("AUC ±%s; partial ROC ratio ±%s (between extents described, not judged); omission and predicted area ±%s; Boyce index ±%s (described, not judged)",
			fmtG(st.ToleranceAUC), fmtG(st.TolerancePartialROC), fmtG(st.ToleranceOmission), fmtG(st.ToleranceBoyce)))},
		{tc("fixed thresholds"), tc(fl(st.FixedThresholds))},
		{tc("thin to one record per cell"), tc(yesNo(st.ThinPerCell))},
		{tc("Boyce window"), tc(fmtG(st.BoyceWindow))},
		{tc("Boyce steps"), tc(strconv.Itoa(st.BoyceSteps))},
		{tc("grid"), tc(fmt.Sprintf("%d × %d cells, %s", r.Grid.Width, r.Grid.Height, r.Grid.CRS))},
		{tc("geotransform"), tc(fmt.Sprintf("%v", r.Grid.GeoTransform))},
		{tc("cell areas"), tc(r.Grid.CellAreaNote)},
		{tc("points"), tc(fmt.Sprintf("%d train, %d test, %d thinned, %d outside raster, %d on no data",
			r.PointCounts.Train, r.PointCounts.Test, r.PointCounts.Thinned, r.PointCounts.OutsideRaster, r.PointCounts.NoData))},
		{tc("analysis cut-offs (our choices)"), tc(fmt.Sprintf("floor flag ≥ %s of area; tie-tail flag > %g of the area axis; near = within %g cells, warn above %s",
			pct(FloorShareFlag), TailJumpFlag, NearCells, pct(NearShareWarn)))},
	}
	var in [][]cell
	for _, i := range r.Inputs {
		in = append(in, []cell{tc(i.Role), tc(i.Path), {text: i.SHA256, cls: "mono"}})
		for _, sc := range i.Sidecars {
			in = append(in, []cell{tc(i.Role + " (read with it)"), tc(sc.Path), {text: sc.SHA256, cls: "mono"}})
		}
	}
	var ms [][]cell
	for _, m := range r.Models {
		ms = append(ms, []cell{tc(ModelLabel(r, m.Name)), tc(m.Path), nc(m.ValueMin, 4), nc(m.ValueMax, 4), nc(m.FloorShare, 3)})
	}
	return settingsView{
		Settings: table("tbl-settings", []string{"setting", "value"}, rows),
		Inputs:   table("tbl-inputs", []string{"role", "path", "SHA-256"}, in),
		Models:   table("tbl-models", []string{"model", "path", "minimum", "maximum", "share of area at minimum"}, ms),
	}
}
