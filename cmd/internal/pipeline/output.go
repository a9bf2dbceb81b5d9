package pipeline

import (
	"bytes"
	"encoding/csv"
	"math"
	"strconv"
	"strings"

	"github.com/airbusgeo/godal"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/encoding/wkb"
	"github.com/schollz/progressbar/v3"

	"areasweep/extent"
	"areasweep/extent/vocab"
	"areasweep/metrics"
	"areasweep/report"
)

func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// scoresCSV renders the scores as one tidy table: one row per model,
// extent and value, for scored pairs only. test_points is the number of
// test records inside the extent that every score of the row uses (for a
// model-minus-null row, the test points both sides share). role is
// "model" or "null". Partial
// ROC rows carry their E; threshold-test rows carry their rule
// ("minimum_training_presence", "p10_training_presence", "fixed_<value>")
// and give, per rule, the cut value, the test records missed (k) out of
// test_points, the share missed, the share of the extent at or above the
// cut and the one-sided binomial P.
func scoresCSV(r *report.Results) []byte {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	w.Write([]string{"model", "extent", "extent_kind", "extent_area_km2", "test_points", "metric", "e", "rule", "value", "role"})
	kinds := map[string]report.Extent{}
	for _, e := range r.Extents {
		kinds[e.ID] = e
	}
	roles := map[string]report.Model{}
	for _, m := range r.Models {
		roles[m.Name] = m
	}
	for _, sc := range r.Scores {
		if !sc.Scored {
			continue
		}
		ex := kinds[sc.Extent]
		n := strconv.Itoa(sc.TestPoints)
		role := report.RoleModel
		if roles[sc.Model].IsNull() {
			role = report.RoleNull
		}
		row := func(metric, e, rule string, v float64) {
			w.Write([]string{sc.Model, sc.Extent, string(ex.Kind), ftoa(ex.AreaKm2), n, metric, e, rule, ftoa(v), role})
		}
		row("auc", "", "", sc.AUC)
		row("auc_unweighted", "", "", sc.AUCUnweighted)
		if sc.TrainPoints > 0 {
			// results.json holds 0 without training points: no AUC.
			row("auc_train", "", "", sc.AUCTrain)
		}
		if sc.TestPoints >= 2 {
			// With one test point there is no spread to measure:
			// results.json holds 0 (or rounding dust), not an SE; nor
			// is there an SD of one resample (--iterations 1).
			if r.Settings.PairedResamples >= 2 {
				row("auc_boot_sd", "", "", sc.AUCBootSD)
			}
			row("auc_se", "", "", sc.AUCSE)
			row("auc_unweighted_se_delong", "", "", sc.AUCUnweightedSEDeLong)
		}
		for _, p := range sc.PartialROC {
			e := ftoa(p.E)
			if !p.Defined {
				// Undefined ratio (see results.json partial_roc): no value row.
				row("partial_roc_undefined", e, "", 1)
			} else {
				row("partial_roc_ratio", e, "", p.Ratio)
			}
			if p.PRandom > 0 {
				// The area-random test of the ratio (absent where not
				// computed; results.json's p_random_note says why).
				row("partial_roc_p_random", e, "", p.PRandom)
			}
			if p.Iterations <= p.NotFormed {
				// No resample formed a ratio: their mean, percentiles and
				// P do not exist (results.json holds 0 there, with
				// iterations_not_formed; a P of 0 would read as "< 1/B").
				continue
			}
			row("partial_roc_ratio_resample_mean", e, "", p.RatioMean)
			if !report.BootstrapReadable(p) {
				// Fewer test points than the cut-off (or one resample
				// formed): no percentiles and no P, as in the report.
				continue
			}
			row("partial_roc_resample_p2_5", e, "", p.CILow)
			row("partial_roc_resample_p97_5", e, "", p.CIHigh)
			row("partial_roc_p_value", e, "", p.PValue)
		}
		for _, t := range sc.Thresholds {
			rule := string(t.Name)
			if t.Name == metrics.ThresholdFixed {
				rule = "fixed_" + ftoa(t.Value)
			}
			row("cut_value", "", rule, t.Value)
			row("test_points_missed", "", rule, float64(t.N-t.Successes))
			row("share_missed", "", rule, t.Omission)
			row("extent_share_at_or_above_cut", "", rule, t.AreaFraction)
			row("binomial_p_one_sided", "", rule, t.PBinomial)
		}
		if sc.Boyce != nil {
			row("boyce_index", "", "", sc.Boyce.Index)
		}
		// The sorting bias belongs to the extent; it is listed with the
		// distance-only null, whose pass measures it.
		if sb := ex.SortingBias; sb != nil && sb.Defined && roles[sc.Model].NullKind == report.NullDistance {
			row("sorting_bias_ratio_mean", "", "", sb.RatioMean)
			row("sorting_bias_ratio_median", "", "", sb.RatioMedian)
			row("sorting_bias_test_mean_km", "", "", sb.TestMeanKm)
			row("sorting_bias_background_mean_km", "", "", sb.BackgroundMeanKm)
			row("sorting_bias_test_median_km", "", "", sb.TestMedianKm)
			row("sorting_bias_background_median_km", "", "", sb.BackgroundMedianKm)
		}
	}
	// Model minus null on each extent (results.json paired records of kind
	// "null"): the difference, its SE and 95% interval, on the row of the
	// model, with the null's name in the metric.
	for _, p := range r.Paired {
		if p.Kind != report.PairedKindNull || !p.Defined {
			continue
		}
		ex := kinds[p.Extent]
		var metric, e string
		switch {
		case p.Metric == "auc":
			metric = "auc_minus_" + p.OtherModel
		case strings.HasPrefix(p.Metric, "partial_roc_e"):
			metric, e = "partial_roc_ratio_minus_"+p.OtherModel, strings.TrimPrefix(p.Metric, "partial_roc_e")
		default:
			continue
		}
		se, lo, hi, _ := p.Interval() // a model against a null is judged: it has one
		for _, v := range []struct {
			suffix string
			v      float64
		}{{"", p.Diff}, {"_se", se}, {"_ci_low", lo}, {"_ci_high", hi}} {
			w.Write([]string{p.Model, p.Extent, string(ex.Kind), ftoa(ex.AreaKm2), strconv.Itoa(p.CommonPoints), metric + v.suffix, e, "", ftoa(v.v), report.RoleModel})
		}
	}
	w.Flush()
	return buf.Bytes()
}

// extentsCSV renders the family summary.
func extentsCSV(ex []report.Extent) []byte {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	w.Write([]string{"id", "kind", "params", "status", "duplicate_of", "chain", "cells", "area_km2", "share_of_raster", "train_points", "test_points"})
	for _, e := range ex {
		w.Write([]string{e.ID, string(e.Kind), e.Params, string(e.Status), e.DuplicateOf, e.Chain, strconv.FormatInt(e.Cells, 10), ftoa(e.AreaKm2),
			ftoa(e.ShareOfRaster), strconv.Itoa(e.TrainPoints), strconv.Itoa(e.TestPoints)})
	}
	w.Flush()
	return buf.Bytes()
}

// writeOmittedGPKG writes the test points with, per model and threshold, a
// 0/1 field saying whether the threshold omits them (layer
// "test_points", WGS84, longitudes on the grid's turn: lonOnGridTurn), so
// the spatial pattern of omission can be mapped over extents.gpkg.
func writeOmittedGPKG(path string, r *report.Results) error {
	wgs, err := godal.NewSpatialRefFromEPSG(4326)
	if err != nil {
		return err
	}
	defer wgs.Close()
	fields := []extent.LayerField{{Name: "line", Type: godal.FTInt}, {Name: "nearest_train_km", Type: godal.FTReal}}
	var omits []map[int]bool
	for _, o := range r.Omissions {
		name := "omit_" + o.Model + "_" + string(o.Threshold)
		if o.Threshold == metrics.ThresholdFixed {
			name += "_" + ftoa(o.Value)
		}
		om := map[int]bool{}
		for _, id := range o.Omitted {
			om[id] = true
		}
		omits = append(omits, om)
		fields = append(fields, extent.LayerField{Name: name, Type: godal.FTInt})
	}
	var feats []extent.Feature
	for _, p := range r.Points {
		if p.Role != vocab.RoleTest || p.Status != vocab.PointScored {
			continue
		}
		b, err := wkb.Marshal(orb.Point{lonOnGridTurn(p, r.Grid), p.Lat})
		if err != nil {
			return err
		}
		vals := []any{p.ID, p.NearestTrainKm}
		for _, om := range omits {
			v := 0
			if om[p.ID] {
				v = 1
			}
			vals = append(vals, v)
		}
		feats = append(feats, extent.Feature{WKB: b, Values: vals})
	}
	return extent.WriteLayer(path, "test_points", wgs, godal.GTPoint, fields, feats)
}

// lonOnGridTurn returns a scored point's longitude moved by whole turns to
// the turn of the cell it was scored on, on a latitude-longitude grid: a
// grid running 165°..195° takes a point given at −170° as 190°, where
// extents.gpkg's outlines (in the grid's coordinates) and the cell are.
// On a projected grid the longitude is as given.
func lonOnGridTurn(p report.Point, g report.Grid) float64 {
	if !g.Geographic {
		return p.Lon
	}
	centre := g.GeoTransform[0] + (float64(p.Col)+0.5)*g.GeoTransform[1]
	return p.Lon + 360*math.Round((centre-p.Lon)/360)
}

// bar is a progress bar on stderr, drawn only on a terminal.
type bar struct{ pb *progressbar.ProgressBar }

func (s *Study) progress(what string, total int) *bar {
	if s.o.Quiet || !s.io.Terminal || s.io.ErrOut == nil {
		return &bar{}
	}
	return &bar{progressbar.NewOptions(total, progressbar.OptionSetWriter(s.io.ErrOut), progressbar.OptionSetDescription(what),
		progressbar.OptionShowCount(), progressbar.OptionClearOnFinish())}
}

func (b *bar) update(done, total int) {
	if b.pb != nil {
		if total != b.pb.GetMax() {
			b.pb.ChangeMax(total) // a shard's pass covers fewer blocks
		}
		b.pb.Set(done)
	}
}

func (b *bar) finish() {
	if b.pb != nil {
		b.pb.Finish()
	}
}
