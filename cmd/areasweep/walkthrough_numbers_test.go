package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// The README's walkthrough of the demo quotes many numbers of one demo
// run. TestREADMEWalkthroughNumbers holds every one of them to the shared
// demo run (walkthroughDemo): every cell of the two tables ("Key numbers"
// and "The distance-only null on the demo"), read by its column header,
// every line of the printed run, and the numbers of the prose, each in a
// fragment of its sentence rebuilt from results.json (and the inputs, the
// printed lines or report.html where the README quotes those). The
// headline block and the sentences quoted from the headline and from
// methods.md are held word for word by TestREADMEWalkthroughQuotes. Any
// other digit left in the prose must be one of wtUnchecked, which says
// why it is not checked; TestREADMEWalkthroughNumbersCatch changes every
// other digit of the walkthrough in turn and sees the check fail.
//
// The rounding rules, as the README uses them:
//   - areas in thousand km²: the nearest whole thousand, with a comma
//     between thousands ("1,234");
//   - AUC, partial ROC ratios, shares, the Boyce index, sorting biases:
//     3 decimals; differences from base or from the null and their
//     interval ends: 3 decimals with a sign (+ or −), an interval written
//     "a to b"; the partial ROC bootstrap interval "low–high" unsigned;
//   - distances in km: 1 decimal; percentages: whole per cent;
//   - a negative number has the minus sign U+2212 ("−0.140"), as in the
//     rest of the README's prose (the report's headline has ASCII "-").

// wtUnchecked are the prose fragments with digits that the test does not
// check, each with the reason.
var wtUnchecked = []struct{ text, why string }{
	{"`areasweep run --study OUT/inputs/study.yaml --out OUT2`", "a folder name in a command line, not a number"},
	{"grown by about 150 km", "a parameter of the demo's generator (scenario.regionGrowKm), written to no output"},
	{"its lowest 45% of land", "a parameter of the demo's generator (scenario.coarseFloorShare); the floor's share of the valid area that results.json gives (the 50% below) is checked"},
	{"took about 1 s on two cores", "a wall-clock time, not a result: it varies with the machine and its load"},
	{"took 0.03 s in this run", "a wall-clock time, not a result"},
	{"2.5–97.5 percentile interval", "the definition of the 95% interval of the bootstrap, not a result"},
	{"(Peterson et al. 2008)", "a citation"},
	{"Student t 95% interval", "the definition of the interval"},
	{"the 1 − E crossing", "a formula"},
	{"at or above P10", "the threshold's name"},
	{"reaches y = 1 early", "the corner of the ROC plot, not a result"},
	{"their 95% coverage (see \"How often the 95% intervals cover\")", "the nominal level of the intervals and a section's title, not a result"},
	{"their 95% coverage, see below", "the nominal level of the intervals, not a result"},
	{"no calibrated test against 1 (see", "the ratio of a random ranking (1), not a result"},
	{"SE is about 0.02", "a round description of every extent's SE (0.015 to 0.027 in the Key numbers table, whose cells are checked), not one value"},
}

// modelVerdictJSON is what the walkthrough check reads of a model verdict
// in results.json.
type modelVerdictJSON struct {
	Metric      string  `json:"metric"`
	Model       string  `json:"model"`
	Verdict     string  `json:"verdict"`
	Tolerance   float64 `json:"tolerance"`
	Largest     int     `json:"largest"`
	Sentence    string  `json:"sentence"`
	Differences []struct {
		Extent       string  `json:"extent"`
		CommonPoints int     `json:"common_points"`
		Defined      bool    `json:"defined"`
		Diff         float64 `json:"diff"`
		CILow        float64 `json:"ci_low"`
		CIHigh       float64 `json:"ci_high"`
		Method       string  `json:"method"`
		TestSetShift float64 `json:"test_set_shift"`
		Position     string  `json:"position"`
	} `json:"differences"`
}

// wtResults is the part of results.json the walkthrough quotes.
type wtResults struct {
	Settings struct {
		E                   []float64 `json:"e"`
		Iterations          int       `json:"iterations"`
		PairedResamples     int       `json:"paired_resamples"`
		ToleranceAUC        float64   `json:"tolerance_auc"`
		TolerancePartialROC float64   `json:"tolerance_partial_roc"`
		ToleranceBoyce      float64   `json:"tolerance_boyce"`
	} `json:"settings"`
	Grid struct {
		Width        int        `json:"width"`
		Height       int        `json:"height"`
		Geotransform [6]float64 `json:"geotransform"`
		CRS          string     `json:"crs"`
		CellArea     string     `json:"cell_area_method"`
	} `json:"grid"`
	Models []struct {
		Name       string  `json:"name"`
		Role       string  `json:"role"`
		ValueMin   float64 `json:"value_min"`
		FloorShare float64 `json:"floor_share"`
	} `json:"models"`
	PointCounts struct {
		Train   int `json:"train"`
		Test    int `json:"test"`
		Thinned int `json:"thinned"`
	} `json:"point_counts"`
	Extents []struct {
		ID          string  `json:"id"`
		AreaKm2     float64 `json:"area_km2"`
		TestPoints  int     `json:"test_points"`
		SortingBias struct {
			TestMeanKm       float64 `json:"test_mean_km"`
			BackgroundMeanKm float64 `json:"background_mean_km"`
			RatioMean        float64 `json:"ratio_mean"`
			RatioMedian      float64 `json:"ratio_median"`
		} `json:"sorting_bias"`
	} `json:"extents"`
	Scores      []wtScore `json:"scores"`
	Sensitivity struct {
		ModelVerdicts []modelVerdictJSON `json:"model_verdicts"`
		Rankings      []struct {
			Metric  string `json:"metric"`
			Model   string `json:"model"`
			Other   string `json:"other"`
			Extents int    `json:"extents"`
			Better  int    `json:"better"`
			Worse   int    `json:"worse"`
		} `json:"rankings"`
		AboveNull []struct {
			Metric         string `json:"metric"`
			Model          string `json:"model"`
			Above          int    `json:"above"`
			NotAbove       int    `json:"not_above"`
			Below          int    `json:"below"`
			Defined        int    `json:"defined"`
			SmallestExtent string `json:"smallest_extent"`
			LargestExtent  string `json:"largest_extent"`
			Gaps           []struct {
				Extent       string  `json:"extent"`
				CommonPoints int     `json:"common_points"`
				ModelValue   float64 `json:"model_value"`
				NullValue    float64 `json:"null_value"`
				Diff         float64 `json:"diff"`
				CILow        float64 `json:"ci_low"`
				CIHigh       float64 `json:"ci_high"`
				Reading      string  `json:"reading"`
			} `json:"gaps"`
		} `json:"above_null"`
		Decompositions []struct {
			Metric        string  `json:"metric"`
			ShareExtent   float64 `json:"share_extent"`
			ShareModel    float64 `json:"share_model"`
			ShareResidual float64 `json:"share_residual"`
		} `json:"decompositions"`
		Chains []struct {
			Chain   string   `json:"chain"`
			Model   string   `json:"model"`
			Members []string `json:"members"`
			Steps   []struct {
				Inner       string  `json:"inner"`
				Outer       string  `json:"outer"`
				RingAreaKm2 float64 `json:"ring_area_km2"`
				AUCInner    float64 `json:"auc_inner"`
				AUCRing     float64 `json:"auc_ring"`
			} `json:"steps"`
			Slope struct {
				PerDoubling float64 `json:"per_doubling"`
			} `json:"slope"`
		} `json:"chains"`
		Independence struct {
			NearShare   float64 `json:"near_share"`
			NearKm      float64 `json:"near_km"`
			CellWidthKm float64 `json:"cell_width_km"`
			MedianKm    float64 `json:"median_km"`
		} `json:"independence"`
	} `json:"sensitivity"`
}

// wtScore is one score of results.json.
type wtScore struct {
	Model      string  `json:"model"`
	Extent     string  `json:"extent"`
	TestPoints int     `json:"test_points"`
	AUC        float64 `json:"auc"`
	AUCSE      float64 `json:"auc_se"`
	PartialROC []wtPR  `json:"partial_roc"`
	Thresholds []wtThr `json:"thresholds"`
	Boyce      struct {
		Index float64 `json:"index"`
	} `json:"boyce"`
}

// wtPR is one partial ROC reading.
type wtPR struct {
	E              float64 `json:"e"`
	Defined        bool    `json:"defined"`
	Ratio          float64 `json:"ratio"`
	CILow          float64 `json:"ci_low"`
	CIHigh         float64 `json:"ci_high"`
	PValue         float64 `json:"p_value"`
	PRandom        float64 `json:"p_random"`
	Iterations     int     `json:"iterations"`
	TiedAtCrossing int     `json:"tied_at_crossing"`
	DiscreteOK     bool    `json:"discrete_defined"`
	DiscreteXE     float64 `json:"discrete_x_e"`
	DiscreteRatio  float64 `json:"discrete_ratio"`
}

// wtThr is one threshold reading.
type wtThr struct {
	Name         string  `json:"name"`
	Value        float64 `json:"value"`
	Omission     float64 `json:"omission"`
	AreaFraction float64 `json:"area_fraction"`
	Successes    int     `json:"successes"`
	N            int     `json:"n"`
	PBinomial    float64 `json:"p_binomial"`
}

// wtRun is what the check reads besides results.json: the lines the
// demo printed, its report.html, and two facts of its inputs.
type wtRun struct {
	printed      []string // standard error and output, the out folder written as /tmp/readme-demo
	report       string
	units        int // features of inputs/ecoregions.gpkg
	coarseLevels int // distinct valid values of inputs/model_coarse.tif
}

// Number formats (see the rounding rules above).
func wtMinus(s string) string   { return strings.ReplaceAll(s, "-", "−") }
func wt3(x float64) string      { return wtMinus(fmt.Sprintf("%.3f", x)) }
func wtSigned(x float64) string { return wtMinus(fmt.Sprintf("%+.3f", x)) }
func wt1(x float64) string      { return wtMinus(fmt.Sprintf("%.1f", x)) }
func wtG(x float64) string      { return wtMinus(strconv.FormatFloat(x, 'g', -1, 64)) }
func wtPct(x float64) string    { return fmt.Sprintf("%.0f%%", 100*x) }

// wtSplit rounds shares adding up to 1 to whole percents adding up to
// 100 by largest remainder (the rule the report states), written out
// here apart from the report's own.
func wtSplit(shares ...float64) []int {
	out := make([]int, len(shares))
	rem := make([]float64, len(shares))
	left := 100
	for i, v := range shares {
		out[i] = int(math.Floor(100 * v))
		rem[i] = 100*v - float64(out[i])
		left -= out[i]
	}
	for ; left > 0; left-- {
		best := 0
		for i := range rem {
			if rem[i] > rem[best] {
				best = i
			}
		}
		out[best]++
		rem[best] = -1
	}
	return out
}
func wtComma(n int) string {
	s := strconv.Itoa(n)
	for i := len(s) - 3; i > 0; i -= 3 {
		s = s[:i] + "," + s[i:]
	}
	return s
}
func wtThousands(km2 float64) string { return wtComma(int(math.Round(km2 / 1000))) }
func wtInterval(d, lo, hi float64) string {
	return wtSigned(d) + " (" + wtSigned(lo) + " to " + wtSigned(hi) + ")"
}

var wtWords = []string{"none", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten", "eleven", "twelve"}

func wtWord(n int) string {
	if n >= 0 && n < len(wtWords) {
		return wtWords[n]
	}
	return strconv.Itoa(n)
}

func wtFlat(s string) string { return strings.Join(strings.Fields(s), " ") }

// checkWalkthroughNumbers returns what of the README's walkthrough does
// not match the demo run, with the number of table cells, printed lines
// and prose fragments it checked.
func checkWalkthroughNumbers(readme string, r *wtResults, run wtRun) (problems []string, cells, lines, frags int) {
	bad := func(format string, a ...any) { problems = append(problems, fmt.Sprintf(format, a...)) }
	start, end := strings.Index(readme, "## Walkthrough: the demo"), strings.Index(readme, "## Inputs and formats")
	if start < 0 || end < start {
		return []string{"README has no walkthrough section"}, 0, 0, 0
	}
	walk := readme[start:end]

	// Look-ups. A missing entry is a problem, reported once, and reads as
	// zero values so that the check goes on.
	sc := func(model, ext string) *wtScore {
		for i := range r.Scores {
			if s := &r.Scores[i]; s.Model == model && s.Extent == ext {
				return s
			}
		}
		bad("results.json has no score of %s on %s", model, ext)
		return &wtScore{}
	}
	extIdx := func(id string) int {
		for i, e := range r.Extents {
			if e.ID == id {
				return i
			}
		}
		return -1
	}
	proc := func(s *wtScore, e float64) wtPR {
		for _, p := range s.PartialROC {
			if math.Abs(p.E-e) < 1e-12 {
				return p
			}
		}
		bad("results.json: no partial ROC at E = %g for %s on %s", e, s.Model, s.Extent)
		return wtPR{}
	}
	th := func(s *wtScore, name string) wtThr {
		for _, t := range s.Thresholds {
			if t.Name == name {
				return t
			}
		}
		bad("results.json: no threshold %s for %s on %s", name, s.Model, s.Extent)
		return wtThr{}
	}
	const mtp, p10 = "minimum_training_presence", "p10_training_presence"
	verdict := func(metric, model string) int {
		for i, v := range r.Sensitivity.ModelVerdicts {
			if v.Metric == metric && v.Model == model {
				return i
			}
		}
		bad("results.json: no verdict of %s for %s", metric, model)
		return -1
	}
	// diffOf returns the paired difference from base of metric for model
	// on ext; diffCell writes it as the tables do, "—" on base itself.
	type difference struct {
		ok                  bool
		common              int
		diff, lo, hi, shift float64
		position, method    string
	}
	diffOf := func(metric, model, ext string) difference {
		if i := verdict(metric, model); i >= 0 {
			for _, d := range r.Sensitivity.ModelVerdicts[i].Differences {
				if d.Extent == ext {
					return difference{d.Defined, d.CommonPoints, d.Diff, d.CILow, d.CIHigh, d.TestSetShift, d.Position, d.Method}
				}
			}
		}
		bad("results.json: no difference from base of %s for %s on %s", metric, model, ext)
		return difference{}
	}
	diffCell := func(metric, model, ext string) string {
		if ext == "base" {
			return "—"
		}
		d := diffOf(metric, model, ext)
		if !d.ok {
			return "(no defined difference in results.json)"
		}
		if d.method == "point_difference" {
			// Described, not judged: no interval.
			return wtSigned(d.diff)
		}
		return wtInterval(d.diff, d.lo, d.hi)
	}
	aboveNull := func(metric, model string) int {
		for i, a := range r.Sensitivity.AboveNull {
			if a.Metric == metric && a.Model == model {
				return i
			}
		}
		bad("results.json: no comparison with the null of %s for %s", metric, model)
		return -1
	}
	type gap struct {
		common                    int
		model, null, diff, lo, hi float64
		reading                   string
	}
	gapOf := func(metric, model, ext string) gap {
		if i := aboveNull(metric, model); i >= 0 {
			for _, g := range r.Sensitivity.AboveNull[i].Gaps {
				if g.Extent == ext {
					return gap{g.CommonPoints, g.ModelValue, g.NullValue, g.Diff, g.CILow, g.CIHigh, g.Reading}
				}
			}
		}
		bad("results.json: no gap of %s from the null for %s on %s", metric, model, ext)
		return gap{}
	}
	area := func(ext string) string {
		if i := extIdx(ext); i >= 0 {
			return wtThousands(r.Extents[i].AreaKm2)
		}
		return "(no such extent)"
	}

	// The tables: each cell by its column header.
	const e05 = 0.05
	if !slices.Contains(r.Settings.E, e05) {
		bad("the tables give partial ROC at E = 0.05, which the demo's settings.e %v lacks", r.Settings.E)
	}
	columns := map[string]func(ext string) string{
		"area (thousand km²)": area,
		"test points": func(ext string) string {
			if i := extIdx(ext); i >= 0 {
				return strconv.Itoa(r.Extents[i].TestPoints)
			}
			return "(no such extent)"
		},
		// Key numbers, model good.
		"AUC (SE)": func(ext string) string {
			s := sc("good", ext)
			return wt3(s.AUC) + " (" + wt3(s.AUCSE) + ")"
		},
		"AUC − base (95%)": func(ext string) string { return diffCell("auc", "good", ext) },
		"partial ROC, E = 0.05": func(ext string) string {
			p := proc(sc("good", ext), e05)
			return wt3(p.Ratio) + " (" + wt3(p.CILow) + "–" + wt3(p.CIHigh) + ")"
		},
		"ratio − base":                        func(ext string) string { return diffCell("partial_roc_e0.05", "good", ext) },
		"share of test points missed at P10":  func(ext string) string { return wt3(th(sc("good", ext), p10).Omission) },
		"share of the extent at or above MTP": func(ext string) string { return wt3(th(sc("good", ext), mtp).AreaFraction) },
		"Boyce index":                         func(ext string) string { return wt3(sc("good", ext).Boyce.Index) },
		// The distance-only null.
		"AUC null":             func(ext string) string { return wt3(sc("distance_null", ext).AUC) },
		"AUC `good`":           func(ext string) string { return wt3(sc("good", ext).AUC) },
		"AUC `coarse`":         func(ext string) string { return wt3(sc("coarse", ext).AUC) },
		"partial ROC null":     func(ext string) string { return wt3(proc(sc("distance_null", ext), e05).Ratio) },
		"partial ROC `good`":   func(ext string) string { return wt3(proc(sc("good", ext), e05).Ratio) },
		"test mean km":         func(ext string) string { return wt1(r.Extents[max(extIdx(ext), 0)].SortingBias.TestMeanKm) },
		"cells mean km":        func(ext string) string { return wt1(r.Extents[max(extIdx(ext), 0)].SortingBias.BackgroundMeanKm) },
		"sorting bias (means)": func(ext string) string { return wt3(r.Extents[max(extIdx(ext), 0)].SortingBias.RatioMean) },
		"sorting bias (medians)": func(ext string) string {
			return wt3(r.Extents[max(extIdx(ext), 0)].SortingBias.RatioMedian)
		},
	}
	tables := 0
	var header []string
	for n, line := range strings.Split(walk, "\n") {
		if !strings.HasPrefix(line, "|") {
			header = nil
			continue
		}
		cellsOf := strings.Split(strings.Trim(strings.TrimSpace(line), "|"), "|")
		for i := range cellsOf {
			cellsOf[i] = strings.TrimSpace(cellsOf[i])
		}
		switch {
		case header == nil:
			header = cellsOf
			tables++
			if header[0] != "extent" {
				bad("walkthrough table %d: first column %q, want extent", tables, header[0])
			}
			for _, h := range header[1:] {
				if columns[h] == nil {
					bad("walkthrough table %d: column %q is not one this test knows how to compute: add it to the test", tables, h)
				}
			}
		case strings.Trim(line, "|-: ") == "":
		default:
			ext := cellsOf[0]
			if extIdx(ext) < 0 {
				bad("walkthrough table %d, line %d: %q is no extent of the demo", tables, n+1, ext)
				continue
			}
			if len(cellsOf) != len(header) {
				bad("walkthrough table %d, row %s: %d cells, header %d", tables, ext, len(cellsOf), len(header))
				continue
			}
			for i, h := range header[1:] {
				f := columns[h]
				if f == nil {
					continue
				}
				cells++
				if want := f(ext); cellsOf[i+1] != want {
					bad("walkthrough table %d, row %s, column %q: README %q, the demo %q", tables, ext, h, cellsOf[i+1], want)
				}
			}
		}
	}
	if tables != 2 {
		bad("walkthrough has %d tables, the test knows the Key numbers and the distance-only null ones", tables)
	}

	// The printed run: each line of the text block is a line the demo
	// printed (one ending in "; ..." begins one), the out folder read as
	// /tmp/readme-demo.
	if i := strings.Index(walk, "```text\n"); i < 0 {
		bad("walkthrough lost the printed run")
	} else {
		block := walk[i+len("```text\n"):]
		block = block[:strings.Index(block, "```")]
		for _, l := range strings.Split(strings.TrimSuffix(block, "\n"), "\n") {
			if l == "..." {
				continue
			}
			lines++
			prefix, cut := strings.CutSuffix(l, " ...")
			found := false
			for _, p := range run.printed {
				found = found || p == l || cut && strings.HasPrefix(p, prefix)
			}
			if !found {
				bad("walkthrough's printed run shows %q, which the demo did not print", l)
			}
		}
	}

	// The prose: each fragment rebuilt from the run must be in it.
	var prose strings.Builder
	inBlock := false
	for _, l := range strings.Split(walk, "\n") {
		if strings.HasPrefix(l, "```") {
			inBlock = !inBlock
			continue
		}
		if inBlock || strings.HasPrefix(l, "|") || strings.HasPrefix(l, "> ") || strings.HasPrefix(l, "#") {
			continue
		}
		prose.WriteString(l + "\n")
	}
	text := wtFlat(prose.String())
	var checked []string
	frag := func(f string) {
		f = wtFlat(f)
		frags++
		checked = append(checked, f)
		if !strings.Contains(text, f) {
			bad("walkthrough should say %q (from the demo run)", f)
		}
	}
	must := func(ok bool, format string, a ...any) {
		if !ok {
			bad("the walkthrough's prose no longer holds for the demo: "+format, a...)
		}
	}

	// The invented scenario.
	gt := r.Grid.Geotransform
	frag(fmt.Sprintf("(longitude %s to %s, latitude %s to %s, %s)", wtG(gt[0]), wtG(gt[0]+float64(r.Grid.Width)*gt[1]),
		wtG(math.Round((gt[3]+float64(r.Grid.Height)*gt[5])*1e9)/1e9), wtG(gt[3]), r.Grid.CRS))
	frag(fmt.Sprintf("The grid is %d × %d cells of %s°.", r.Grid.Width, r.Grid.Height, wtG(gt[1])))
	must(gt[1] == -gt[5], "cells of %g° by %g°", gt[1], -gt[5])
	must(strings.Contains(r.Grid.CellArea, "WGS84"), "the cell areas are %q", r.Grid.CellArea)
	frag("weights every cell by its true area on the WGS84 ellipsoid")
	pc := r.PointCounts
	frag(fmt.Sprintf("%d presences were drawn", pc.Train+pc.Test))
	frag(fmt.Sprintf("split %d/%d into training and test", int(math.Round(100*float64(pc.Train)/float64(pc.Train+pc.Test))), int(math.Round(100*float64(pc.Test)/float64(pc.Train+pc.Test)))))
	frag(fmt.Sprintf("%s duplicate records were added", strings.ToUpper(wtWord(pc.Thinned)[:1])+wtWord(pc.Thinned)[1:]))
	frag(fmt.Sprintf("There are %d ecoregion units", run.units))
	var models []string
	var coarseMin, coarseFloor float64
	for _, m := range r.Models {
		if m.Role == "model" {
			models = append(models, m.Name)
		}
		if m.Name == "coarse" {
			coarseMin, coarseFloor = m.ValueMin, m.FloorShare
		}
	}
	frag(fmt.Sprintf("There are %s models.", wtWord(len(models))))
	must(slices.Equal(models, []string{"good", "coarse"}), "the models are %v, not good and coarse", models)
	frag(fmt.Sprintf("noisy response with only %d distinct values", run.coarseLevels))
	frag(fmt.Sprintf("cut to a floor of %s (rounding to the %d values puts more land on it: the floor covers %s of the valid area", wtG(coarseMin), run.coarseLevels, wtPct(coarseFloor)))

	// What the run prints.
	frag(fmt.Sprintf("The family has %d members", len(r.Extents)))

	// Key numbers.
	// "ratio − base": the point difference, no interval, no resamples
	// (it said "over the 500 full-size paired resamples", which no
	// difference between extents of the ratio uses).
	frag("a description with no interval and no")
	frag("(`method` `point_difference` in `results.json`")
	for _, e := range r.Extents {
		if e.ID == "base" {
			continue
		}
		if d := diffOf("partial_roc_e0.05", "good", e.ID); d.method != "point_difference" {
			bad("good's partial ROC ratio difference from base on %s has method %q, not point_difference", e.ID, d.method)
		}
	}
	frag(`"MTP" is the minimum training presence threshold and "P10" the 10th-percentile one`)
	// The area-random test: good's ratio at E = 0.05 above random on
	// every extent at the smallest p the draws resolve, 1/(draws + 1).
	for _, e := range r.Extents {
		if p := proc(sc("good", e.ID), e05); math.Abs(p.PRandom-1/float64(r.Settings.Iterations+1)) > 1e-15 {
			bad("good's p_random on %s is not 1/(%d + 1)", e.ID, r.Settings.Iterations)
		}
	}
	frag(fmt.Sprintf("at the smallest p its %d draws resolve, 1/%d", r.Settings.Iterations, r.Settings.Iterations+1))

	// How to read them.
	gb, gw := sc("good", "base"), sc("good", "whole_raster")
	frag(fmt.Sprintf("The AUC of `good` is %s on the base region and %s on `whole_raster`.", wt3(gb.AUC), wt3(gw.AUC)))
	must(gb.TestPoints == gw.TestPoints, "base and whole_raster hold %d and %d test points", gb.TestPoints, gw.TestPoints)
	frag(fmt.Sprintf("the two AUCs share their %d test points", gb.TestPoints))
	dw := diffOf("auc", "good", "whole_raster")
	frag(fmt.Sprintf("difference is far better known: %s with a 95%% interval of %s to %s.", wtSigned(dw.diff), wtSigned(dw.lo), wtSigned(dw.hi)))
	if i := verdict("auc", "good"); i >= 0 {
		v := r.Sensitivity.ModelVerdicts[i]
		out := 0
		for _, d := range v.Differences {
			if d.Position == "outside" {
				out++
			}
		}
		frag(fmt.Sprintf("On %d of the %d other extents the interval of the difference from `base` lies wholly beyond our tolerance of ±%s", out, len(v.Differences), wtG(v.Tolerance)))
		must(v.Verdict == "extent-sensitive", "AUC of good is %s", v.Verdict)
	}
	if i := verdict("auc", "coarse"); i >= 0 {
		must(r.Sensitivity.ModelVerdicts[i].Verdict == "extent-sensitive", "AUC of coarse is %s", r.Sensitivity.ModelVerdicts[i].Verdict)
	}
	must(r.Settings.ToleranceAUC == 0.02, "--tolerance-auc is %g", r.Settings.ToleranceAUC)
	p50, hull := sc("good", "points_50km"), sc("good", "hull")
	frag(fmt.Sprintf("`points_50km` holds %d of the %d test points and `hull` %d.", p50.TestPoints, pc.Test, hull.TestPoints))
	d50 := diffOf("auc", "good", "points_50km")
	frag(fmt.Sprintf("(%s for `points_50km`)", wtSigned(d50.diff)))
	frag(fmt.Sprintf("(`test_set_shift`, %s there)", wtSigned(d50.shift)))
	frag(fmt.Sprintf("the AUC of `good` on `points_50km` is %s, of which %s comes from the smaller background and %s from dropping %s test points",
		wt3(p50.AUC), wtSigned(d50.diff), wtSigned(d50.shift), wtWord(pc.Test-p50.TestPoints)))
	for _, c := range r.Sensitivity.Chains {
		if c.Chain != "region" || c.Model != "good" {
			continue
		}
		n := len(c.Members)
		if n < 4 {
			bad("the region chain has %d members", n)
			break
		}
		frag(fmt.Sprintf("`%s ⊂ %s ⊂ %s ⊂ … ⊂ %s`", c.Members[0], c.Members[1], c.Members[2], c.Members[n-1]))
		for _, s := range c.Steps {
			if s.Inner == "base" && s.Outer == "region_100km" {
				frag(fmt.Sprintf("The ring between `base` and `region_100km` (%s,000 km²) has an AUC of %s against %s inside `base`",
					wtThousands(s.RingAreaKm2), wt3(s.AUCRing), wt3(s.AUCInner)))
			}
		}
		rises := "rises"
		if c.Slope.PerDoubling < 0 {
			rises = "falls"
		}
		frag(fmt.Sprintf("Along that chain AUC %s by %s per doubling of the area: a description of these %s nested extents",
			rises, wt3(math.Abs(c.Slope.PerDoubling)), wtWord(n)))
	}
	pb, pw := proc(gb, e05), proc(gw, e05)
	dpr := diffOf("partial_roc_e0.05", "good", "whole_raster")
	frag(fmt.Sprintf("At E = %s the ratio of `good` is %s on `base` and %s on `whole_raster`, a paired difference of %s against a tolerance of ±%s.",
		wtG(e05), wt3(pb.Ratio), wt3(pw.Ratio), wtSigned(dpr.diff), wtG(r.Settings.TolerancePartialROC)))
	must(pb.PValue == 0, "the p-value of good's ratio on base is %g, not 'none of the resamples'", pb.PValue)
	pv := "< " + wtG(1/float64(pb.Iterations))
	frag(fmt.Sprintf("None of the %d resamples of its published bootstrap gives a ratio at or below 1, so its one-sided p-value is printed as \"%s\": %d resamples cannot resolve less.",
		pb.Iterations, pv, pb.Iterations))
	must(strings.Contains(run.report, strings.ReplaceAll(pv, "<", "&lt;")), "report.html does not print %q", pv)
	cb := sc("coarse", "base")
	c05, c10 := proc(cb, e05), proc(cb, 0.1)
	frag(fmt.Sprintf("%d of its %d test points sit on its floor value", c05.TiedAtCrossing, cb.TestPoints))
	must(!c05.Defined && !c05.DiscreteOK && c05.DiscreteXE == 1, "coarse's ratio at E = 0.05 on base: defined %v, at thresholds %v, x_E %g", c05.Defined, c05.DiscreteOK, c05.DiscreteXE)
	frag(fmt.Sprintf("at E = %s the threshold that keeps those points keeps the whole area, so no ratio can be formed; at E = %s it gives x_E = %s and a ratio of %s.",
		wtG(e05), wtG(c10.E), wt3(c10.DiscreteXE), wt3(c10.DiscreteRatio)))
	must(!c10.Defined && c10.DiscreteOK, "coarse's ratio at E = 0.1 on base: defined %v, at thresholds %v", c10.Defined, c10.DiscreteOK)
	// Omission at P10 on every extent holding all the test points.
	om := th(gb, p10)
	for _, e := range r.Extents {
		if e.TestPoints != pc.Test {
			continue
		}
		t := th(sc("good", e.ID), p10)
		must(t.N-t.Successes == om.N-om.Successes && t.N == om.N, "omission at P10 on %s is %d of %d", e.ID, t.N-t.Successes, t.N)
	}
	frag(fmt.Sprintf("Omission at P10 is %d of %d (%s) on every extent that holds all the points", om.N-om.Successes, om.N, wt3(om.Omission)))
	if i := verdict("omission_p10_training_presence", "good"); i >= 0 {
		for _, d := range r.Sensitivity.ModelVerdicts[i].Differences {
			must(d.Defined && d.Diff == 0, "the omission difference at P10 from base on %s is %g", d.Extent, d.Diff)
		}
		must(r.Sensitivity.ModelVerdicts[i].Verdict == "robust", "omission at P10 of good is %s", r.Sensitivity.ModelVerdicts[i].Verdict)
	}
	frag("on the common test points every difference from `base` is exactly 0 (*robust*)")
	frag(fmt.Sprintf("falls from %s (`base`) to %s (`whole_raster`)", wt3(om.AreaFraction), wt3(th(gw, p10).AreaFraction)))
	for _, k := range r.Sensitivity.Rankings {
		if k.Metric == "auc" && k.Model == "good" && k.Other == "coarse" {
			frag(fmt.Sprintf("`good` is above `coarse` beyond noise on %d of %d extents", k.Better, k.Extents))
		}
	}
	if i := verdict("auc", "good"); i >= 0 {
		frag(fmt.Sprintf("not adjusted for the %d comparisons with `base`", len(r.Sensitivity.ModelVerdicts[i].Differences)))
	}
	for _, d := range r.Sensitivity.Decompositions {
		if d.Metric == "auc" {
			// The report's whole percents add up to 100 (largest
			// remainder), and so do the README's.
			p := wtSplit(d.ShareExtent, d.ShareModel, d.ShareResidual)
			frag(fmt.Sprintf("(extent %d%%, model %d%% here)", p[0], p[1]))
		}
	}
	// Cautions.
	frag(fmt.Sprintf("its floor value covers %s of the valid area", wtPct(coarseFloor)))
	for _, e := range r.Extents {
		t := th(sc("coarse", e.ID), mtp)
		must(t.Value == coarseMin && t.AreaFraction == 1 && t.PBinomial == 1, "coarse on %s: MTP %g (floor %g), area share %g, binomial p %g", e.ID, t.Value, coarseMin, t.AreaFraction, t.PBinomial)
	}
	frag(fmt.Sprintf("Its MTP equals the floor (%s), so the area share ≥ MTP is 1 and the binomial p is 1 on every extent", wtG(coarseMin)))
	cr := sc("coarse", "region_500km")
	dcb := diffOf("boyce", "coarse", "region_500km")
	beyond := func(v modelVerdictJSON) (n, of int) {
		for _, d := range v.Differences {
			if d.Defined {
				of++
				if math.Abs(d.Diff) > v.Tolerance {
					n++
				}
			}
		}
		return n, of
	}
	if i := verdict("boyce", "coarse"); i >= 0 {
		v := r.Sensitivity.ModelVerdicts[i]
		must(strings.Contains(v.Sentence, "described, not judged"), "Boyce of coarse: %s", v.Sentence)
		n, of := beyond(v)
		frag(fmt.Sprintf("With only %d distinct values, the Boyce index of `coarse` jumps from %s on `base` to %s on `region_500km` (paired difference %s), and %d of its %d differences from `base` lie beyond ±%s",
			run.coarseLevels, wt3(cb.Boyce.Index), wt3(cr.Boyce.Index), wtSigned(dcb.diff), n, of, wtG(v.Tolerance)))
	}
	if i := verdict("boyce", "good"); i >= 0 {
		v := r.Sensitivity.ModelVerdicts[i]
		if v.Largest < 0 || v.Largest >= len(v.Differences) {
			bad("results.json: no largest Boyce difference of good")
		} else {
			d := v.Differences[v.Largest]
			n, _ := beyond(v)
			must(n == 0, "Boyce of good: %d differences beyond the tolerance", n)
			frag(fmt.Sprintf("For `good` the largest Boyce difference is %s on `%s`, and none lies beyond ±%s", wtSigned(d.Diff), d.Extent, wtG(v.Tolerance)))
		}
	}
	ind := r.Sensitivity.Independence
	frag(fmt.Sprintf("%s of the test points lie within %s cell widths (%s km) of a training point (median %s km)",
		wtPct(ind.NearShare), wtG(math.Round(ind.NearKm/ind.CellWidthKm*1e9)/1e9), wt1(ind.NearKm), wt1(ind.MedianKm)))

	// The distance-only null.
	frag(fmt.Sprintf("partial ROC at E = %s, full-sample ratio", wtG(e05)))
	if i := aboveNull("auc", "good"); i >= 0 {
		a := r.Sensitivity.AboveNull[i]
		g := gapOf("auc", "good", "base")
		frag(fmt.Sprintf("On `base`, AUC of `good` minus the null's is %s (%s against %s; 95%% interval %s to %s, from the placements): %s the null.",
			wtSigned(g.diff), wt3(g.model), wt3(g.null), wtSigned(g.lo), wtSigned(g.hi), g.reading))
		s, l := gapOf("auc", "good", a.SmallestExtent), gapOf("auc", "good", a.LargestExtent)
		reading := map[string]string{"not_above": "not above", "above": "above", "below": "below"}[s.reading]
		frag(fmt.Sprintf("Across the %d extents the gap runs from %s on `%s` (%d test points, interval %s to %s, %s) to %s on `%s` (%s to %s)",
			a.Defined, wtSigned(s.diff), a.SmallestExtent, s.common, wtSigned(s.lo), wtSigned(s.hi), reading, wtSigned(l.diff), a.LargestExtent, wtSigned(l.lo), wtSigned(l.hi)))
		var within []string
		for _, g := range a.Gaps {
			if g.Reading == "not_above" {
				within = append(within, "`"+g.Extent+"`")
			}
		}
		frag(fmt.Sprintf("above the null beyond noise on %s, within noise on %d (", wtWord(a.Above), a.NotAbove))
		frag(fmt.Sprintf(") and below on %d.", a.Below))
		// The extents within noise, in any order.
		if m := regexp.MustCompile(`within noise on \d+ \(([^)]*)\)`).FindStringSubmatch(text); m == nil {
			bad("walkthrough no longer lists the extents on which good is within noise of the null")
		} else {
			listed := strings.Split(m[1], ", ")
			sort.Strings(listed)
			sort.Strings(within)
			if !slices.Equal(listed, within) {
				bad("walkthrough lists %v as within noise of the null, the demo %v", listed, within)
			}
		}
	}
	gp := gapOf("partial_roc_e0.05", "good", "base")
	frag(fmt.Sprintf("The partial ROC ratio at E = %s says the same: %s on `base` (%s against %s; %s to %s over the paired resamples).",
		wtG(e05), wtSigned(gp.diff), wt3(gp.model), wt3(gp.null), wtSigned(gp.lo), wtSigned(gp.hi)))
	if i := aboveNull("auc", "coarse"); i >= 0 {
		a := r.Sensitivity.AboveNull[i]
		g, s, l := gapOf("auc", "coarse", "base"), gapOf("auc", "coarse", a.SmallestExtent), gapOf("auc", "coarse", a.LargestExtent)
		must(s.reading == "not_above", "coarse against the null on %s reads %s, not within noise", a.SmallestExtent, s.reading)
		frag(fmt.Sprintf("**`coarse` is below the null on %d of %d extents**: %s on `base` (%s to %s), from %s on `%s` (within noise) to %s on `%s`.",
			a.Below, a.Defined, wtSigned(g.diff), wtSigned(g.lo), wtSigned(g.hi), wtSigned(s.diff), a.SmallestExtent, wtSigned(l.diff), a.LargestExtent))
	}
	must(!c05.Defined, "coarse's partial ROC ratio is defined on base")
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, e := range r.Extents {
		a := sc("distance_null", e.ID).AUC
		lo, hi = math.Min(lo, a), math.Max(hi, a)
	}
	frag(fmt.Sprintf("just as the models do**, from %s to %s:", wt3(lo), wt3(hi)))
	if i, j := extIdx("base"), extIdx("whole_raster"); i >= 0 && j >= 0 {
		b, w := r.Extents[i].SortingBias, r.Extents[j].SortingBias
		must(wt1(b.TestMeanKm) == wt1(w.TestMeanKm), "the test points' mean distance differs on base and whole_raster")
		frag(fmt.Sprintf("Their mean distance to the nearest training point is %s km, against %s km for the cells of `base` (sorting bias %s) and %s km for the whole raster (%s).",
			wt1(b.TestMeanKm), wt1(b.BackgroundMeanKm), wt3(b.RatioMean), wt1(w.BackgroundMeanKm), wt3(w.RatioMean)))
	}
	for _, e := range r.Extents {
		t := th(sc("distance_null", e.ID), mtp)
		must(t.Omission == 1, "the null's omission at MTP on %s is %g", e.ID, t.Omission)
	}
	frag("The null's omission at the minimum training presence is 1 on every extent")
	frag(fmt.Sprintf("The null's pass over the demo's %s cells", wtComma(r.Grid.Width*r.Grid.Height)))

	// Every other digit of the prose is one of wtUnchecked, or in a
	// sentence quoted from the headline or methods.md (held word for word
	// by TestREADMEWalkthroughQuotes), or in a code span (names such as
	// `points_50km`, checked where a fragment names them).
	rest := text
	for _, f := range checked {
		rest = strings.ReplaceAll(rest, f, " ")
	}
	rest = regexp.MustCompile(`(says it in one sentence|puts it so): "[^"]+"`).ReplaceAllString(rest, " ")
	for _, u := range wtUnchecked {
		if !strings.Contains(text, u.text) {
			bad("wtUnchecked names %q, which the walkthrough no longer says: update the list", u.text)
		}
		rest = strings.ReplaceAll(rest, u.text, " ")
	}
	rest = codeSpan.ReplaceAllString(rest, " ")
	for _, m := range regexp.MustCompile(`\S*\d\S*`).FindAllStringIndex(rest, -1) {
		bad("walkthrough's prose has %q (in %q), which this test neither checks nor lists in wtUnchecked", rest[m[0]:m[1]], rest[max(0, m[0]-40):min(len(rest), m[1]+40)])
	}
	return problems, cells, lines, frags
}

// loadWalkthroughRun reads what the check needs from the shared demo run.
func loadWalkthroughRun(t *testing.T) (*wtResults, wtRun) {
	t.Helper()
	w := walkthroughDemo(t)
	b, err := os.ReadFile(filepath.Join(w.dir, "results.json"))
	if err != nil {
		t.Fatal(err)
	}
	var r wtResults
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	var run wtRun
	for _, l := range strings.Split(w.stderr+w.stdout, "\n") {
		run.printed = append(run.printed, strings.ReplaceAll(l, w.dir, "/tmp/readme-demo"))
	}
	html, err := os.ReadFile(filepath.Join(w.dir, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	run.report = string(html)

	// The inputs: ecoregion units and the coarse model's distinct values.
	eco, err := godal.Open(filepath.Join(w.dir, "inputs", "ecoregions.gpkg"), godal.VectorOnly())
	if err != nil {
		t.Fatal(err)
	}
	defer eco.Close()
	for _, l := range eco.Layers() {
		n, err := l.FeatureCount()
		if err != nil {
			t.Fatal(err)
		}
		run.units += n
	}
	ds, err := godal.Open(filepath.Join(w.dir, "inputs", "model_coarse.tif"))
	if err != nil {
		t.Fatal(err)
	}
	defer ds.Close()
	st := ds.Structure()
	band := ds.Bands()[0]
	buf := make([]float64, st.SizeX*st.SizeY)
	if err := band.Read(0, 0, buf, st.SizeX, st.SizeY); err != nil {
		t.Fatal(err)
	}
	nodata, hasNodata := band.NoData()
	seen := map[float64]bool{}
	for _, v := range buf {
		if !math.IsNaN(v) && !(hasNodata && v == nodata) {
			seen[v] = true
		}
	}
	run.coarseLevels = len(seen)
	return &r, run
}

func TestREADMEWalkthroughNumbers(t *testing.T) {
	r, run := loadWalkthroughRun(t)
	problems, cells, lines, frags := checkWalkthroughNumbers(readREADME(t), r, run)
	for _, p := range problems {
		t.Error(p)
	}
	t.Logf("checked %d table cells, %d printed lines and %d prose fragments", cells, lines, frags)
}

// TestREADMEWalkthroughNumbersCatch changes each digit of the walkthrough
// in turn (to the next digit) and checks that the number check, or the
// quote check for the headline and the quoted sentences, reports it;
// digits inside wtUnchecked fragments are skipped.
func TestREADMEWalkthroughNumbersCatch(t *testing.T) {
	r, run := loadWalkthroughRun(t)
	readme := readREADME(t)
	if p, _, _, _ := checkWalkthroughNumbers(readme, r, run); len(p) > 0 {
		t.Skip("the README does not pass TestREADMEWalkthroughNumbers")
	}
	start, end := strings.Index(readme, "## Walkthrough: the demo"), strings.Index(readme, "## Inputs and formats")
	skip := make([]bool, len(readme))
	mark := func(re *regexp.Regexp) {
		for _, m := range re.FindAllStringIndex(readme[start:end], -1) {
			for i := m[0]; i < m[1]; i++ {
				skip[start+i] = true
			}
		}
	}
	// Held by TestREADMEWalkthroughQuotes: the headline block and the
	// quoted sentences.
	mark(regexp.MustCompile(`(?m)^> .*$`))
	mark(regexp.MustCompile(`(says it in one sentence|puts it so): "[^"]+"`))
	for _, u := range wtUnchecked {
		// A fragment may wrap over lines in the README.
		mark(regexp.MustCompile(strings.Join(strings.Fields(regexp.QuoteMeta(u.text)), `\s+`)))
	}
	tried := 0
	for i := start; i < end; i++ {
		c := readme[i]
		if c < '0' || c > '9' || skip[i] {
			continue
		}
		tried++
		bad := readme[:i] + string('0'+(c-'0'+1)%10) + readme[i+1:]
		if p, _, _, _ := checkWalkthroughNumbers(bad, r, run); len(p) == 0 {
			line := strings.Count(readme[:i], "\n") + 1
			t.Errorf("README line %d with the digit %c changed to %c: the check found nothing", line, c, '0'+(c-'0'+1)%10)
		}
	}
	t.Logf("changed %d digits of the walkthrough one at a time; each was reported", tried)
}
