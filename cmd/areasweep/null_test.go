package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/cmd/internal/pass"
	"areasweep/cmd/internal/pipeline"
	"areasweep/extent"
	"areasweep/extent/geodesy"
	"areasweep/extent/nullmodel"
	"areasweep/extent/vocab"
	"areasweep/metrics"
	"areasweep/report"
)

// writeFloat64Raster writes vals as a Float64 GeoTIFF (EPSG:4326) on g.
func writeFloat64Raster(t *testing.T, path string, g *extent.Grid, vals []float64) {
	t.Helper()
	ds, err := godal.Create(godal.GTiff, path, 1, godal.Float64, g.Width, g.Height, godal.CreationOption("TILED=YES", "BLOCKXSIZE=16", "BLOCKYSIZE=16"))
	if err != nil {
		t.Fatal(err)
	}
	ds.SetGeoTransform(g.GeoTransform)
	sr, _ := godal.NewSpatialRefFromEPSG(4326)
	ds.SetSpatialRef(sr)
	if err := ds.Bands()[0].Write(0, 0, vals, g.Width, g.Height); err != nil {
		t.Fatal(err)
	}
	if err := ds.Close(); err != nil {
		t.Fatal(err)
	}
}

// runWithNullValues runs the small study into out, then computes the
// distance-only null's value on every cell from the run's scored training
// points (nullmodel.Field, as the run does), and returns the run's results,
// the grid (to be closed by the caller), the values and the training
// points' latitudes and longitudes.
func runWithNullValues(t *testing.T, s *smallStudy, out string) (res *report.Results, g *extent.Grid, vals, lats, lons []float64) {
	t.Helper()
	if _, se, code := runBin(t, s.args(out)...); code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	res = loadResults(t, out)
	for _, p := range res.Points {
		if p.Status == vocab.PointScored && p.Role == vocab.RoleTrain {
			lats, lons = append(lats, p.Lat), append(lons, p.Lon)
		}
	}
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		t.Fatal(err)
	}
	g, err = extent.OpenGrid(s.model)
	if err != nil {
		t.Fatal(err)
	}
	vals = make([]float64, g.Cells())
	nullmodel.New(ix, pass.CellCentres(g)).Fill(0, 0, g.Width, g.Height, nil, vals)
	return res, g, vals, lats, lons
}

// TestDistanceNullEqualsItsGeoTIFF is the end-to-end form of the null's
// defining property: the distance-only null's values, computed here on the
// study grid from the scored training points and written as a Float64
// GeoTIFF given with --null, score exactly what the virtual null scores on
// every extent: value range, AUCs, the placements and their SE, DeLong's
// full variance, the AUC's SD over the paired resamples (seeded by the run
// alone), the full-sample partial ROC ratio, every threshold test, rings and
// omission lists, and the Boyce index's windows. One thing differs by
// design and is not compared: the published half-size bootstrap (its
// stream is seeded by the model's name).
//
// The Boyce index's ratios and index are compared exactly too, but on a
// second, in-process run of the same study in which the copy's layout
// carries the null's histogram floor: the virtual null's fine histograms
// are never finer than its floor grid (metrics.WithHistFloor, the price of
// scoring cells from their bounds), while a raster, the copy included, has
// none, so in the binary's run the copy's Boyce index is read from finer
// histograms on the extents whose range is narrow. With the same floor the
// copy must score exactly what the null scores, Boyce index included.
//
// It also checks the roles, that the sensitivity analysis leaves both nulls
// out, and the sorting-bias ratios against a brute-force computation from
// the raw cells (Distance to every training point, true cell areas).
func TestDistanceNullEqualsItsGeoTIFF(t *testing.T) {
	s := newSmallStudy(t)
	out1 := filepath.Join(s.dir, "out1")
	_, g, vals, lats, lons := runWithNullValues(t, s, out1)
	defer g.Close()
	copyPath := filepath.Join(s.dir, "null.tif")
	writeFloat64Raster(t, copyPath, g, vals)

	out := filepath.Join(s.dir, "out2")
	if _, se, code := runBin(t, s.args(out, "--null", "copy="+copyPath)...); code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	res := loadResults(t, out)
	roles := map[string]report.Model{}
	for _, m := range res.Models {
		roles[m.Name] = m
	}
	dn, cp := roles[report.DistanceNullName], roles["copy"]
	if dn.Role != report.RoleNull || dn.NullKind != report.NullDistance || cp.Role != report.RoleNull || cp.NullKind != report.NullRaster || roles["m"].Role != report.RoleModel {
		t.Errorf("roles: %+v", res.Models)
	}
	if dn.ValueMin != cp.ValueMin || dn.ValueMax != cp.ValueMax || dn.FloorShare != cp.FloorShare {
		t.Errorf("value range: virtual %+v, GeoTIFF %+v", dn, cp)
	}
	// The run's log names each null as one, as the report does.
	logText, err := os.ReadFile(filepath.Join(out, "run.log"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{report.DistanceNullName + " (distance-only null) on base: AUC", "copy (null) on base: AUC", "\nm on base: AUC"} {
		if !strings.Contains(string(logText), want) {
			t.Errorf("run.log lacks %q", want)
		}
	}
	if res.Sensitivity == nil || slices.Contains(res.Sensitivity.ModelNames, "copy") || slices.Contains(res.Sensitivity.ModelNames, report.DistanceNullName) {
		t.Errorf("nulls in the sensitivity analysis: %v", res.Sensitivity)
	}
	compareNullAndCopy(t, res, false)
	floor := pass.DistanceNullFloor(pass.DistanceNull(g, mustIndex(t, lats, lons)), g, 4096)
	compareNullAndCopy(t, runCopyFloored(t, s.args(filepath.Join(s.dir, "out3"), "--null", "copy="+copyPath), "copy", floor), true)
	ringKey := func(model string) string {
		k := ""
		for _, r := range res.Rings {
			if r.Model == model {
				k += fmt.Sprint(r.Chain, r.Inner, r.Outer, r.AUCInner, r.AUCRing, r.AUCOuter, r.ShareOfChange)
			}
		}
		return k
	}
	if ringKey(report.DistanceNullName) == "" || ringKey(report.DistanceNullName) != ringKey("copy") {
		t.Error("rings of the virtual null and its GeoTIFF copy differ")
	}
	omitKey := func(model string) string {
		k := ""
		for _, o := range res.Omissions {
			if o.Model == model {
				k += fmt.Sprint(o.Threshold, o.Value, o.Omitted)
			}
		}
		return k
	}
	if omitKey(report.DistanceNullName) != omitKey("copy") {
		t.Error("omission lists of the virtual null and its GeoTIFF copy differ")
	}

	// Sorting bias by brute force.
	names, bands := readBands(t, filepath.Join(out, "extents.tif"))
	checked := 0
	for k, e := range res.Extents {
		if e.Status != vocab.StatusOK || names[k] != e.ID {
			continue
		}
		sb := e.SortingBias
		if sb == nil {
			t.Fatalf("%s: no sorting bias", e.ID)
		}
		var test []float64
		for _, p := range res.Points {
			if p.Status == vocab.PointScored && p.Role == vocab.RoleTest && bands[k][p.Row*g.Width+p.Col] == 1 {
				d := math.Inf(1)
				for j := range lats {
					d = math.Min(d, geodesy.Distance(p.Lat, p.Lon, lats[j], lons[j]))
				}
				test = append(test, d/1000)
			}
		}
		if len(test) == 0 {
			if sb.Defined {
				t.Errorf("%s: sorting bias defined without test points", e.ID)
			}
			continue
		}
		sw, swd := 0.0, 0.0
		for i, b := range bands[k] {
			if b != 1 {
				continue
			}
			r, c := i/g.Width, i%g.Width
			lat, lon := 48-(float64(r)+0.5)*0.25, 10+(float64(c)+0.5)*0.25
			d := math.Inf(1)
			for j := range lats {
				d = math.Min(d, geodesy.Distance(lat, lon, lats[j], lons[j]))
			}
			w := cellAreaKm2(lat-0.125, lat+0.125, 0.25)
			sw += w
			swd += w * d / 1000
		}
		mean := 0.0
		for _, d := range test {
			mean += d
		}
		mean /= float64(len(test))
		bgMean := swd / sw
		// Tolerances (our choice): 1e-9 relative for the test points' mean
		// (rounding); nullmodel.BracketTol (0.1%) for the background mean,
		// which the run sums from the pass's bracket midpoints, and twice
		// that for the ratio.
		if !sb.Defined || sb.TestPoints != len(test) || math.Abs(sb.TestMeanKm-mean) > 1e-9*mean || math.Abs(sb.BackgroundMeanKm-bgMean) > nullmodel.BracketTol*bgMean ||
			math.Abs(sb.RatioMean-mean/bgMean) > 2*nullmodel.BracketTol*mean/bgMean {
			t.Errorf("%s: sorting bias %+v, brute force test mean %.9f km (%d points), background mean %.9f km", e.ID, *sb, mean, len(test), bgMean)
		}
		checked++
	}
	if checked < 5 {
		t.Errorf("sorting bias checked on %d extents only", checked)
	}
}

// compareNullAndCopy checks that the virtual null and the raster null
// "copy" of res score the same on every extent, field for field; the Boyce
// index's ratios and index only with withBoyce (see
// TestDistanceNullEqualsItsGeoTIFF).
func compareNullAndCopy(t *testing.T, res *report.Results, withBoyce bool) {
	t.Helper()
	byModel := map[string]map[string]report.Score{}
	for _, sc := range res.Scores {
		if byModel[sc.Model] == nil {
			byModel[sc.Model] = map[string]report.Score{}
		}
		byModel[sc.Model][sc.Extent] = sc
	}
	compared := 0
	for id, v := range byModel[report.DistanceNullName] {
		c := byModel["copy"][id]
		key := func(sc report.Score) string {
			ratios := ""
			for _, p := range sc.PartialROC {
				// The published bootstrap and the area-random draws too:
				// seeded by the run seed and the extent, not the model's
				// name, identical predictions draw alike (deriveSeed).
				ratios += fmt.Sprint(p.E, p.Ratio, p.Iterations, p.RatioMean, p.RatioSD, p.CILow, p.CIHigh, p.PValue, p.NotFormed, p.PRandom, p.RandomFormed, p.PRandomNote)
			}
			boyce := "none"
			if b := sc.Boyce; b != nil && withBoyce {
				boyce = fmt.Sprintf("%+v", *b)
			} else if b != nil {
				boyce = fmt.Sprint(b.Windows, b.Used, b.Mid)
			}
			return fmt.Sprint(sc.Scored, sc.NotScored, sc.Cells, sc.AreaKm2, sc.TestPoints, sc.TrainPoints, sc.TestOutside, sc.TrainOutside,
				sc.AUC, sc.AUCUnweighted, sc.AUCTrain, sc.AUCSE, sc.AUCUnweightedSEDeLong, sc.AUCBootSD, sc.Placements, sc.PlacementsUnweighted, ratios, sc.Thresholds, boyce)
		}
		if key(v) != key(c) {
			t.Errorf("extent %s: virtual null\n %s\nGeoTIFF copy\n %s", id, key(v), key(c))
		}
		if v.Scored {
			compared++
		}
	}
	if compared < 5 {
		t.Errorf("only %d scored extents compared", compared)
	}
}

// mustIndex returns the nearest-site index of the sites.
func mustIndex(t *testing.T, lats, lons []float64) *geodesy.Index {
	t.Helper()
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		t.Fatal(err)
	}
	return ix
}

// runCopyFloored runs the study of args (a run command line) in this
// process through the pipeline's own stages, as `run` does, except that
// the pass of the model named name gets its layout again with the
// histogram floor exponent floor. It checks that the distance-only null's
// layout has that floor, and returns the results.
func runCopyFloored(t *testing.T, args []string, name string, floor int) *report.Results {
	t.Helper()
	var opts *RunOptions
	cmd := newRunCmd(&IO{Out: io.Discard, ErrOut: io.Discard}, func(o *RunOptions) error { opts = o; return nil })
	cmd.SetArgs(args[1:])
	cmd.SetOut(io.Discard)
	cmd.SetErr(io.Discard)
	if err := cmd.Execute(); err != nil || opts == nil {
		t.Fatalf("run options: %v", err)
	}
	po := opts.Options
	po.StudyFile, po.Version = opts.Study, version
	ctx := context.Background()
	s, err := pipeline.Prepare(ctx, po, pipeline.IO{ErrOut: io.Discard, Log: &pipeline.Log{}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	floored, nullFloor := false, false
	s.SetSums(func(s *pipeline.Study, ctx context.Context, p *pipeline.Plan) (*pipeline.Sums, error) {
		switch {
		case p.Model.Name == name:
			if _, ok := p.Layout.HistFloor(); ok {
				t.Errorf("the raster %s has a histogram floor of its own", name)
			}
			l, err := metrics.NewLayout(p.Layout.Values(), p.Layout.HistBins(), metrics.WithHistFloor(floor))
			if err != nil {
				return nil, err
			}
			p.Layout, floored = l, true
		case p.Model.NullKind == report.NullDistance:
			e, ok := p.Layout.HistFloor()
			if !ok || e != floor {
				t.Errorf("the distance-only null's layout has floor %d (%v), want %d", e, ok, floor)
			}
			nullFloor = true
		}
		return (*pipeline.Study).Stream(s, ctx, p)
	})
	for i := range s.Passes() {
		if err := s.Pass(ctx, i); err != nil {
			t.Fatal(err)
		}
	}
	res, err := s.Finish(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if !floored || !nullFloor {
		t.Fatalf("passes seen: %s %v, distance-only null %v", name, floored, nullFloor)
	}
	return res
}
