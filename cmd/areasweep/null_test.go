package main

import (
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/cmd/internal/pass"
	"areasweep/extent"
	"areasweep/extent/geodesy"
	"areasweep/extent/nullmodel"
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
		if p.Status == report.PointScored && p.Role == "train" {
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
// omission lists, and the Boyce index with its curve (each extent's fine
// histogram follows its own cells, whatever the source). One thing differs
// by design and is not compared: the published half-size bootstrap (its
// stream is seeded by the model's name).
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
	if res.Sensitivity == nil || slices.Contains(res.Sensitivity.ModelNames, "copy") || slices.Contains(res.Sensitivity.ModelNames, report.DistanceNullName) {
		t.Errorf("nulls in the sensitivity analysis: %v", res.Sensitivity)
	}
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
				ratios += fmt.Sprint(p.E, p.Ratio, p.Iterations)
			}
			boyce := "none"
			if sc.Boyce != nil {
				boyce = fmt.Sprintf("%+v", *sc.Boyce)
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
		if e.Status != "ok" || names[k] != e.ID {
			continue
		}
		sb := e.SortingBias
		if sb == nil {
			t.Fatalf("%s: no sorting bias", e.ID)
		}
		var test []float64
		for _, p := range res.Points {
			if p.Status == report.PointScored && p.Role == "test" && bands[k][p.Row*g.Width+p.Col] == 1 {
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
		// Tolerances (our choice): 1e-9 relative covers the rounding of
		// cell areas to integer units and of distances to millimetres.
		if !sb.Defined || sb.TestPoints != len(test) || math.Abs(sb.TestMeanKm-mean) > 1e-9*mean || math.Abs(sb.BackgroundMeanKm-bgMean) > 1e-9*bgMean ||
			math.Abs(sb.RatioMean-mean/bgMean) > 1e-8*mean/bgMean {
			t.Errorf("%s: sorting bias %+v, brute force test mean %.9f km (%d points), background mean %.9f km", e.ID, *sb, mean, len(test), bgMean)
		}
		checked++
	}
	if checked < 5 {
		t.Errorf("sorting bias checked on %d extents only", checked)
	}
}
