package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/report"
)

// e2eGolden is testdata/endtoend/golden.json, written by golden.py there:
// five small studies on unusual grids and the values areasweep must
// report, computed from the documented rules with GDAL, pyproj,
// scikit-learn and SciPy, without areasweep.
type e2eGolden struct {
	Iterations int        `json:"iterations"`
	Seed       int        `json:"seed"`
	Studies    []e2eStudy `json:"studies"`
}

type e2eStudy struct {
	Spec struct {
		Name   string     `json:"name"`
		CRS    string     `json:"crs"`
		Width  int        `json:"width"`
		Height int        `json:"height"`
		GT     [6]float64 `json:"gt"`
		Models []e2eModel `json:"models"`
		Region struct {
			CRS      string          `json:"crs"`
			Features json.RawMessage `json:"features"` // polygons: rings of [x, y]
		} `json:"region"`
		// Ecoregions, when present, are units written to a GeoJSON layer
		// with an id field "unit".
		Ecoregions *struct {
			MinPoints int  `json:"min_points"`
			Clip      bool `json:"clip"`
			Features  []struct {
				ID      string          `json:"id"`
				Polygon json.RawMessage `json:"polygon"`
			} `json:"features"`
		} `json:"ecoregions"`
		// ToleranceAUC, when present, is the study's --tolerance-auc.
		ToleranceAUC  *float64  `json:"tolerance_auc"`
		RegionBuffers []float64 `json:"region_buffers"`
		PointBuffers  []float64 `json:"point_buffers"`
		HullBuffers   []float64 `json:"hull_buffers"`
		E             []float64 `json:"e"`
		Thresholds    []float64 `json:"thresholds"`
		Points        []struct {
			Role string  `json:"role"`
			Lon  float64 `json:"lon"`
			Lat  float64 `json:"lat"`
		} `json:"points"`
	} `json:"spec"`
	Expected struct {
		Points []struct {
			ID, Row, Col int
			Status       string
		} `json:"points"`
		Extents []struct {
			ID          string  `json:"id"`
			Status      string  `json:"status"`
			Params      string  `json:"params"`
			Cells       int64   `json:"cells"`
			AreaKm2     float64 `json:"area_km2"`
			TrainPoints int     `json:"train_points"`
			TestPoints  int     `json:"test_points"`
			Ambiguous   []int   `json:"ambiguous_cells"`
			SortingBias *struct {
				TestMeanKm       float64 `json:"test_mean_km"`
				BackgroundMeanKm float64 `json:"background_mean_km"`
			} `json:"sorting_bias"`
			Rows [][]int `json:"rows"`
		} `json:"extents"`
		Scores []e2eScore `json:"scores"`
		Rings  []struct {
			Chain, Model, Inner, Outer string
			InnerAreaKm2               float64 `json:"inner_area_km2"`
			RingAreaKm2                float64 `json:"ring_area_km2"`
			RingCells                  int64   `json:"ring_cells"`
			AUCInner                   float64 `json:"auc_inner"`
			AUCRing                    float64 `json:"auc_ring"`
			AUCOuter                   float64 `json:"auc_outer"`
		} `json:"rings"`
		// Paired holds golden.py's paired_analysis: the paired[] records
		// of method "placements" (AUC and unweighted AUC), with the
		// position against the tolerance (kinds extent and null) and the
		// reading against 0 (kind null).
		Paired   []e2ePaired `json:"paired"`
		Verdicts []struct {
			Metric, Model, Verdict string
			Tolerance              float64 `json:"tolerance"`
			BaseExtent             string  `json:"base_extent"`
		} `json:"verdicts"`
	} `json:"expected"`
}

// e2ePaired is one paired difference (model on extent) minus (other model
// on other extent) as golden.py's paired_difference computes it.
type e2ePaired struct {
	Metric       string  `json:"metric"`
	Kind         string  `json:"kind"`
	Model        string  `json:"model"`
	Extent       string  `json:"extent"`
	OtherModel   string  `json:"other_model"`
	OtherExtent  string  `json:"other_extent"`
	CommonPoints int     `json:"common_points"`
	Defined      bool    `json:"defined"`
	A            float64 `json:"a"`
	B            float64 `json:"b"`
	Diff         float64 `json:"diff"`
	SE           float64 `json:"se"`
	Low          float64 `json:"ci_low"`
	High         float64 `json:"ci_high"`
	TestSetShift float64 `json:"test_set_shift"`
	// Position is "inside", "outside", "overlapping" or "too_few" (nil
	// when undefined or of kind model); Reading the reading of the
	// interval against 0 of a null or model record ("above", "below",
	// "not_above", "too_few").
	Position *string `json:"position"`
	Reading  string  `json:"reading"`
}

func (p e2ePaired) key() string {
	return p.Metric + " " + p.Kind + " " + p.Model + "/" + p.Extent + " - " + p.OtherModel + "/" + p.OtherExtent
}

// e2eModel is one model raster given by integer arithmetic (golden.py's
// bump): the same values here and in Python, bit for bit.
type e2eModel struct {
	Name                 string
	Type                 string
	R0, C0, A, B, K, Amp int64
	Floor, Noise         int64
	Div                  float64
	Scale, Offset        *float64
	NoData               *float64 `json:"nodata"`
	NoDataBox            [4]int   `json:"nodata_box"`
}

type e2eScore struct {
	Model, Extent         string
	Scored                bool
	Cells                 int64
	AreaKm2               float64 `json:"area_km2"`
	TestPoints            int     `json:"test_points"`
	TrainPoints           int     `json:"train_points"`
	AUC                   float64 `json:"auc"`
	AUCUnweighted         float64 `json:"auc_unweighted"`
	AUCTrain              float64 `json:"auc_train"`
	AUCSE                 float64 `json:"auc_se"`
	AUCUnweightedSEDeLong float64 `json:"auc_unweighted_se_delong"`
	// Placements and PlacementsUnweighted are [point id, placement] pairs.
	Placements           [][2]float64 `json:"placements"`
	PlacementsUnweighted [][2]float64 `json:"placements_unweighted"`
	PartialROC           []struct {
		E             float64  `json:"e"`
		Defined       bool     `json:"defined"`
		XE            float64  `json:"x_e"`
		Tie           bool     `json:"tie"`
		Ratio         float64  `json:"ratio"`
		DiscreteXE    *float64 `json:"discrete_x_e"`
		DiscreteRatio *float64 `json:"discrete_ratio"`
	} `json:"partial_roc"`
	Thresholds []struct {
		Name         string  `json:"name"`
		Value        float64 `json:"value"`
		Successes, N int
		Omission     float64 `json:"omission"`
		AreaFraction float64 `json:"area_fraction"`
		PBinomial    float64 `json:"p_binomial"`
	} `json:"thresholds"`
	// Boyce is absent for the distance-only null, whose histogram has a
	// floor of its own.
	Boyce *struct {
		Defined bool    `json:"defined"`
		Index   float64 `json:"index"`
		// Exact is true when every value of the extent's cells is a
		// presence value or a fixed threshold: then the window areas
		// and the index are exact.
		Exact bool `json:"exact"`
		// Exact is also true when the model has at most 4096 values on
		// the cells of all extents and no two of them can share a
		// histogram bin (README: such a bin's area lies at its one
		// value). E are the windows' exact shares of area.
		E []float64 `json:"e"`
		// The extent's value range and test presences, and one entry
		// per window of the 100: the presences in it and bounds on its
		// share of area (golden.py boyce).
		Min, Max float64
		N        int
		PCount   []int     `json:"p_count"`
		ELo      []float64 `json:"e_lo"`
		EHi      []float64 `json:"e_hi"`
	} `json:"boyce"`
}

// stored returns the stored values of m on the study's grid, row-major,
// as float64 (golden.py's model_values before scale and offset).
func (m e2eModel) stored(w, h int) []float64 {
	out := make([]float64, w*h)
	for r := int64(0); r < int64(h); r++ {
		for c := int64(0); c < int64(w); c++ {
			d := m.A*(r-m.R0)*(r-m.R0) + m.B*(c-m.C0)*(c-m.C0)
			v := max(m.Amp-d/m.K, m.Floor) + (131*r+71*c+(r*c)%97)%m.Noise
			x := float64(v)
			if m.Type == "Float32" {
				x = float64(float32(x / m.Div))
			}
			if int(r) >= m.NoDataBox[0] && int(r) < m.NoDataBox[1] && int(c) >= m.NoDataBox[2] && int(c) < m.NoDataBox[3] {
				x = math.NaN()
				if m.NoData != nil {
					x = *m.NoData
				}
			}
			out[int(r)*w+int(c)] = x
		}
	}
	return out
}

// writeE2EStudy writes the study's rasters, occurrences, region and study
// file into dir and returns the study file's path.
func writeE2EStudy(t *testing.T, st *e2eStudy, g *e2eGolden, dir string) string {
	t.Helper()
	sp := &st.Spec
	sr, err := godal.NewSpatialRef(sp.CRS)
	if err != nil {
		t.Fatal(err)
	}
	defer sr.Close()
	types := map[string]godal.DataType{"Int16": godal.Int16, "Float32": godal.Float32, "Byte": godal.Byte}
	var yaml strings.Builder
	yaml.WriteString("model:\n")
	for _, m := range sp.Models {
		path := filepath.Join(dir, m.Name+".tif")
		ds, err := godal.Create(godal.GTiff, path, 1, types[m.Type], sp.Width, sp.Height, godal.CreationOption("TILED=YES", "BLOCKXSIZE=32", "BLOCKYSIZE=32"))
		if err != nil {
			t.Fatal(err)
		}
		ds.SetGeoTransform(sp.GT)
		ds.SetSpatialRef(sr)
		b := ds.Bands()[0]
		if m.NoData != nil {
			b.SetNoData(*m.NoData)
		}
		if m.Scale != nil {
			b.SetScaleOffset(*m.Scale, *m.Offset)
		}
		vals := m.stored(sp.Width, sp.Height)
		switch m.Type {
		case "Float32":
			buf := make([]float32, len(vals))
			for i, v := range vals {
				buf[i] = float32(v)
			}
			err = b.Write(0, 0, buf, sp.Width, sp.Height)
		case "Int16":
			buf := make([]int16, len(vals))
			for i, v := range vals {
				buf[i] = int16(v)
			}
			err = b.Write(0, 0, buf, sp.Width, sp.Height)
		default:
			buf := make([]byte, len(vals))
			for i, v := range vals {
				buf[i] = byte(v)
			}
			err = b.Write(0, 0, buf, sp.Width, sp.Height)
		}
		if err != nil {
			t.Fatal(err)
		}
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
		fmt.Fprintf(&yaml, "  - %s=%s.tif\n", m.Name, m.Name)
	}
	var occ strings.Builder
	occ.WriteString("lon,lat,role\n")
	for _, p := range sp.Points {
		fmt.Fprintf(&occ, "%s,%s,%s\n", strconv.FormatFloat(p.Lon, 'g', -1, 64), strconv.FormatFloat(p.Lat, 'g', -1, 64), p.Role)
	}
	crs := "urn:ogc:def:crs:OGC:1.3:CRS84"
	if sp.Region.CRS != "CRS84" {
		crs = "urn:ogc:def:crs:EPSG::" + strings.TrimPrefix(sp.Region.CRS, "EPSG:")
	}
	var polys []json.RawMessage
	if err := json.Unmarshal(sp.Region.Features, &polys); err != nil {
		t.Fatal(err)
	}
	var feats []string
	for _, p := range polys {
		feats = append(feats, `{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":`+string(p)+`}}`)
	}
	region := `{"type":"FeatureCollection","crs":{"type":"name","properties":{"name":"` + crs + `"}},"features":[` + strings.Join(feats, ",") + `]}`
	list := func(v []float64) string {
		s := make([]string, len(v))
		for i, x := range v {
			s[i] = strconv.FormatFloat(x, 'g', -1, 64)
		}
		return "[" + strings.Join(s, ", ") + "]"
	}
	fmt.Fprintf(&yaml, "occurrences: occ.csv\nregion: region.geojson\nregion-buffers: %s\npoint-buffers: %s\nhull-buffers: %s\n", list(sp.RegionBuffers), list(sp.PointBuffers), list(append([]float64{0}, sp.HullBuffers...)))
	fmt.Fprintf(&yaml, "e: %s\nthresholds: %s\niterations: %d\nseed: %d\nmembership-tif: true\nout: out\n", list(sp.E), list(sp.Thresholds), g.Iterations, g.Seed)
	if sp.ToleranceAUC != nil {
		fmt.Fprintf(&yaml, "tolerance-auc: %s\n", strconv.FormatFloat(*sp.ToleranceAUC, 'g', -1, 64))
	}
	files := map[string]string{"occ.csv": occ.String(), "region.geojson": region}
	if eco := sp.Ecoregions; eco != nil {
		var units []string
		for _, f := range eco.Features {
			units = append(units, `{"type":"Feature","properties":{"unit":"`+f.ID+`"},"geometry":{"type":"Polygon","coordinates":`+string(f.Polygon)+`}}`)
		}
		files["eco.geojson"] = `{"type":"FeatureCollection","crs":{"type":"name","properties":{"name":"urn:ogc:def:crs:OGC:1.3:CRS84"}},"features":[` + strings.Join(units, ",") + `]}`
		fmt.Fprintf(&yaml, "ecoregions: eco.geojson\necoregion-field: unit\necoregion-min-points: %d\necoregion-clip: %v\n", eco.MinPoints, eco.Clip)
	}
	files["study.yaml"] = yaml.String()
	for name, body := range files {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return filepath.Join(dir, "study.yaml")
}

// TestEndToEndGolden runs areasweep on the five studies of
// testdata/endtoend/golden.json (UTM with a scaled Int16 model, EPSG:3035
// with a holed region and region buffers, a latitude-longitude grid across
// the antimeridian, a high-latitude grid with a Byte model full of ties,
// a grid reaching the North Pole with a polar cap as region)
// and compares what it reports with the values computed there from the
// documented rules, without areasweep: membership, areas, the points'
// cells, every model's scores and the distance-only null's (Boyce aside),
// the sorting-bias means, the rings, and the paired differences of method
// "placements" with the AUC verdicts, readings against the null and model
// rankings built on them (checkE2EPaired). The source of each expected value
// is named beside its check. Tolerances: 1e-9 absolute for the exact
// quantities (AUCs, SE, partial ROC, omission, predicted area, paired
// differences with their SE, interval and test_set_shift), 1e-9
// relative for binomial p-values and for areas (latitude-longitude cells
// are exact; the equal-area grid's planar area differs from pyproj's WGS84
// area by 4e-10, GRS80 against WGS84; the UTM grid's block-scaled areas by
// 1.2e-10), 0.1% for the sorting-bias background mean (README; measured
// 0.07%); membership cell by cell, except for buffer cells whose centre
// lies so close to the buffer's edge that the documented densification may
// leave them out.
func TestEndToEndGolden(t *testing.T) {
	g := loadE2EGolden(t)
	for i := range g.Studies {
		st := &g.Studies[i]
		t.Run(st.Spec.Name, func(t *testing.T) {
			dir := t.TempDir()
			study := writeE2EStudy(t, st, g, dir)
			if _, se, code := runBin(t, "run", "--study", study, "--quiet"); code != 0 {
				t.Fatalf("exit %d: %s", code, se)
			}
			res := loadResults(t, filepath.Join(dir, "out"))
			names, bands := readBands(t, filepath.Join(dir, "out", "extents.tif"))
			checkE2E(t, st, res, names, bands)
			validGeoPackages(t, filepath.Join(dir, "out", "extents.gpkg"), filepath.Join(dir, "out", "omitted_points.gpkg"))
		})
	}
}

// loadE2EGolden reads testdata/endtoend/golden.json and checks it holds the
// five studies.
func loadE2EGolden(t *testing.T) *e2eGolden {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "endtoend", "golden.json"))
	if err != nil {
		t.Fatal(err)
	}
	var g e2eGolden
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	if len(g.Studies) != 5 {
		t.Fatalf("golden.json has %d studies, want 5", len(g.Studies))
	}
	return &g
}

func relDiff(got, want float64) float64 {
	return math.Abs(got-want) / math.Max(math.Abs(want), 1e-300)
}

func checkE2E(t *testing.T, st *e2eStudy, res *report.Results, names []string, bands [][]byte) {
	exp := &st.Expected
	w := st.Spec.Width
	// Points: cell (floor of pixel coordinates; pyproj transform on
	// projected grids), outside, no data, thinning (golden.py study()).
	if len(res.Points) != len(exp.Points) {
		t.Fatalf("%d points, want %d", len(res.Points), len(exp.Points))
	}
	for i, p := range exp.Points {
		q := res.Points[i]
		if q.ID != p.ID || string(q.Status) != p.Status || q.Row != p.Row || q.Col != p.Col {
			t.Errorf("point %d: id %d status %s cell (%d,%d), want %+v", i, q.ID, q.Status, q.Row, q.Col, p)
		}
	}
	// Membership: GDAL RasterizeLayer of the cell centres, pyproj gnomonic
	// hull, pyproj Geod distances for the buffers.
	got := map[string]report.Extent{}
	for _, e := range res.Extents {
		got[e.ID] = e
	}
	band := map[string][]byte{}
	for i, n := range names {
		band[n] = bands[i]
	}
	same := map[string]bool{}
	for _, e := range exp.Extents {
		ge, ok := got[e.ID]
		if !ok || band[e.ID] == nil {
			t.Errorf("extent %s missing (extents %v)", e.ID, names)
			continue
		}
		if e.Params != "" && ge.Params != e.Params {
			t.Errorf("extent %s: params %q, want %q (OGR Contains and Intersects)", e.ID, ge.Params, e.Params)
		}
		if e.Status == "duplicate" || string(ge.Status) == "duplicate" {
			if string(ge.Status) != e.Status {
				t.Errorf("extent %s: status %s, want %s", e.ID, ge.Status, e.Status)
			}
			continue
		}
		want := make([]byte, len(band[e.ID]))
		for r, runs := range e.Rows {
			for k := 0; k+1 < len(runs); k += 2 {
				for c := runs[k]; c < runs[k+1]; c++ {
					want[r*w+c] = 1
				}
			}
		}
		amb := map[int]bool{}
		for _, c := range e.Ambiguous {
			amb[c] = true
		}
		diff, real := 0, 0
		for c := range want {
			if want[c] != band[e.ID][c] {
				diff++
				if !amb[c] {
					real++
					if real <= 5 {
						t.Errorf("extent %s: cell row %d col %d is %d, want %d", e.ID, c/w, c%w, band[e.ID][c], want[c])
					}
				}
			}
		}
		if real > 0 {
			t.Errorf("extent %s: %d cells differ (%d of them near a buffer's edge)", e.ID, diff, diff-real)
		}
		// Sorting bias: pyproj Geod.inv from the test points and from the
		// cell centres to the nearest training point; the background mean
		// within the documented 0.1%.
		if sb, gb := e.SortingBias, ge.SortingBias; sb != nil && diff == 0 {
			if gb == nil || relDiff(gb.TestMeanKm, sb.TestMeanKm) > 1e-9 || relDiff(gb.BackgroundMeanKm, sb.BackgroundMeanKm) > 1e-3 {
				t.Errorf("extent %s: sorting bias %+v, want test mean %v km, background mean %v km (pyproj Geod.inv)", e.ID, gb, sb.TestMeanKm, sb.BackgroundMeanKm)
			}
		}
		if string(ge.Status) != e.Status {
			t.Errorf("extent %s: status %s, want %s", e.ID, ge.Status, e.Status)
		}
		if diff > 0 {
			t.Logf("extent %s: %d of %d cells within the densification margin of the buffer's edge classified otherwise (documented)", e.ID, diff, len(e.Ambiguous))
			continue
		}
		same[e.ID] = true
		if ge.Cells != e.Cells || ge.TrainPoints != e.TrainPoints || ge.TestPoints != e.TestPoints || relDiff(ge.AreaKm2, e.AreaKm2) > 1e-9 {
			t.Errorf("extent %s: cells %d area %v train %d test %d, want %d %v %d %d (areas: authalic formula and pyproj Geod.polygon_area_perimeter)",
				e.ID, ge.Cells, ge.AreaKm2, ge.TrainPoints, ge.TestPoints, e.Cells, e.AreaKm2, e.TrainPoints, e.TestPoints)
		}
	}
	scores := map[string]report.Score{}
	for _, s := range res.Scores {
		scores[s.Model+"/"+s.Extent] = s
	}
	for _, s := range exp.Scores {
		if !same[s.Extent] {
			continue
		}
		lab := s.Model + "/" + s.Extent
		o, ok := scores[lab]
		if !ok || o.Scored != s.Scored {
			t.Errorf("%s: scored %v (%s), want %v", lab, o.Scored, o.NotScored, s.Scored)
			continue
		}
		if !s.Scored {
			continue
		}
		if o.Cells != s.Cells || o.TestPoints != s.TestPoints || o.TrainPoints != s.TrainPoints || relDiff(o.AreaKm2, s.AreaKm2) > 1e-9 {
			t.Errorf("%s: cells %d area %v test %d train %d, want %d %v %d %d", lab, o.Cells, o.AreaKm2, o.TestPoints, o.TrainPoints, s.Cells, s.AreaKm2, s.TestPoints, s.TrainPoints)
		}
		// sklearn.metrics.roc_auc_score with sample_weight; auc_se from
		// the placements in numpy.
		for _, c := range []struct {
			name      string
			got, want float64
		}{{"auc", o.AUC, s.AUC}, {"auc_unweighted", o.AUCUnweighted, s.AUCUnweighted}, {"auc_train", o.AUCTrain, s.AUCTrain}, {"auc_se", o.AUCSE, s.AUCSE},
			{"auc_unweighted_se_delong", o.AUCUnweightedSEDeLong, s.AUCUnweightedSEDeLong}} {
			if math.Abs(c.got-c.want) > 1e-9 {
				t.Errorf("%s: %s %v, want %v (sklearn roc_auc_score / numpy)", lab, c.name, c.got, c.want)
			}
		}
		// Placements per test point (numpy, golden.py placements): the
		// share of the extent's area below the point plus half the share
		// at its value.
		for _, c := range []struct {
			name string
			ids  []int
			got  []float64
			want [][2]float64
		}{{"placements", o.TestPointIDs, o.Placements, s.Placements}, {"placements_unweighted", o.TestPointIDs, o.PlacementsUnweighted, s.PlacementsUnweighted}} {
			if len(c.ids) != len(c.want) || len(c.got) != len(c.want) {
				t.Errorf("%s: %d %s, want %d", lab, len(c.got), c.name, len(c.want))
				continue
			}
			for k, w := range c.want {
				if c.ids[k] != int(w[0]) || math.Abs(c.got[k]-w[1]) > 1e-9 {
					t.Errorf("%s: %s[%d] point %d %v, want point %v %v (numpy)", lab, c.name, k, c.ids[k], c.got[k], w[0], w[1])
				}
			}
		}
		// Partial ROC: golden.py's partial_roc, the curve on the area axis
		// written out in numpy (Peterson et al. 2008).
		if len(o.PartialROC) != len(s.PartialROC) {
			t.Fatalf("%s: %d partial ROC entries, want %d", lab, len(o.PartialROC), len(s.PartialROC))
		}
		for k, p := range s.PartialROC {
			q := o.PartialROC[k]
			if q.E != p.E || q.Defined != p.Defined || math.Abs(q.XE-p.XE) > 1e-9 || p.Defined && math.Abs(q.Ratio-p.Ratio) > 1e-9 {
				t.Errorf("%s: partial ROC E=%v defined %v x_e %v ratio %v, want %v %v %v (numpy)", lab, p.E, q.Defined, q.XE, q.Ratio, p.Defined, p.XE, p.Ratio)
			}
			if p.DiscreteRatio != nil && (!q.DiscreteDefined || math.Abs(q.DiscreteXE-*p.DiscreteXE) > 1e-9 || math.Abs(q.DiscreteRatio-*p.DiscreteRatio) > 1e-9) {
				t.Errorf("%s: discrete partial ROC E=%v: %v %v, want %v %v (numpy)", lab, p.E, q.DiscreteXE, q.DiscreteRatio, *p.DiscreteXE, *p.DiscreteRatio)
			}
		}
		// Thresholds: scipy.stats.binomtest(k, n, p, alternative="greater").
		if len(o.Thresholds) != len(s.Thresholds) {
			t.Fatalf("%s: %d thresholds, want %d", lab, len(o.Thresholds), len(s.Thresholds))
		}
		for k, th := range s.Thresholds {
			q := o.Thresholds[k]
			if string(q.Name) != th.Name || q.Value != th.Value || q.Successes != th.Successes || q.N != th.N || q.Omission != th.Omission ||
				math.Abs(q.AreaFraction-th.AreaFraction) > 1e-9 || relDiff(q.PBinomial, th.PBinomial) > 1e-9 {
				t.Errorf("%s: threshold %+v, want %+v (numpy, scipy binomtest)", lab, q, th)
			}
		}
		if s.Boyce != nil {
			checkE2EBoyce(t, lab, o.Boyce, s)
		}
	}
	// Rings of the nested chains: sklearn roc_auc_score of the outer
	// member's test presences against the inner, ring and outer cells.
	rings := map[string]report.Ring{}
	for _, r := range res.Rings {
		rings[r.Chain+"/"+r.Model+"/"+r.Inner+"/"+r.Outer] = r
	}
	checked := 0
	for _, w := range exp.Rings {
		key := w.Chain + "/" + w.Model + "/" + w.Inner + "/" + w.Outer
		r, ok := rings[key]
		if !ok {
			t.Errorf("ring %s missing", key)
			continue
		}
		if !same[w.Inner] || !same[w.Outer] {
			continue
		}
		checked++
		if r.RingCells != w.RingCells || relDiff(r.InnerAreaKm2, w.InnerAreaKm2) > 1e-9 || relDiff(r.RingAreaKm2, w.RingAreaKm2) > 1e-9 ||
			math.Abs(r.AUCInner-w.AUCInner) > 1e-9 || math.Abs(r.AUCRing-w.AUCRing) > 1e-9 || math.Abs(r.AUCOuter-w.AUCOuter) > 1e-9 {
			t.Errorf("ring %s: %+v, want %+v (sklearn roc_auc_score)", key, r, w)
		}
	}
	if len(res.Rings) != len(exp.Rings) {
		t.Errorf("%d rings, want %d", len(res.Rings), len(exp.Rings))
	}
	t.Logf("%d of %d rings compared (the others hold a buffer whose edge cells differ within the margin)", checked, len(exp.Rings))
	checkE2EPaired(t, st, res, same)
}

// checkE2EPaired compares the paired differences of method "placements"
// and the readings built on them with golden.py's paired_analysis, on the
// extents whose membership matched cell for cell (same). The records from
// paired resamples (partial ROC, omission, Boyce) rest on areasweep's own
// random draws and are not checked here.
func checkE2EPaired(t *testing.T, st *e2eStudy, res *report.Results, same map[string]bool) {
	t.Helper()
	exp := &st.Expected
	got := map[string]report.Paired{}
	for _, p := range res.Paired {
		if p.Method != "placements" {
			continue
		}
		if p.Metric != "auc" && p.Metric != "auc_unweighted" {
			t.Errorf("paired %s %s: method placements for a metric other than AUC", p.Metric, p.Kind)
		}
		k := e2ePaired{Metric: p.Metric, Kind: string(p.Kind), Model: p.Model, Extent: p.Extent, OtherModel: p.OtherModel, OtherExtent: p.OtherExtent}.key()
		got[k] = p
	}
	want := map[string]e2ePaired{}
	checked := 0
	for _, w := range exp.Paired {
		k := w.key()
		want[k] = w
		if !same[w.Extent] || !same[w.OtherExtent] {
			continue
		}
		p, ok := got[k]
		if !ok {
			t.Errorf("paired %s missing", k)
			continue
		}
		checked++
		// README "Paired differences", results.json paired[] and
		// metrics.PairedPlacements: on the common test points D_i = a_i -
		// b_i from golden.py's placements, diff = mean D, se = sqrt(sum
		// (D_i - diff)^2 / (n(n-1))), diff -+ z se with z =
		// scipy.stats.norm.ppf(0.975), a and b the means of each side's
		// placements there, test_set_shift = (sklearn AUC of each side on
		// its own points, difference) - diff.
		if p.CommonPoints != w.CommonPoints || p.Defined != w.Defined {
			t.Errorf("paired %s: common points %d defined %v, want %d %v (golden.py paired_difference)", k, p.CommonPoints, p.Defined, w.CommonPoints, w.Defined)
			continue
		}
		if !w.Defined {
			continue
		}
		for _, c := range []struct {
			name      string
			got, want float64
		}{{"a", p.A, w.A}, {"b", p.B, w.B}, {"diff", p.Diff, w.Diff}, {"se", (*p.SE), w.SE}, {"ci_low", (*p.Low), w.Low}, {"ci_high", (*p.High), w.High},
			{"test_set_shift", p.TestSetShift, w.TestSetShift}} {
			if math.Abs(c.got-c.want) > 1e-9 {
				t.Errorf("paired %s: %s %v, want %v (numpy on golden.py's placements, scipy norm.ppf)", k, c.name, c.got, c.want)
			}
		}
	}
	for k, p := range got {
		if _, ok := want[k]; !ok && same[p.Extent] && same[p.OtherExtent] {
			t.Errorf("paired %s: not a record golden.py's paired_analysis forms", k)
		}
	}
	t.Logf("%d of %d paired placement differences compared (the others involve a buffer whose edge cells differ within the margin)", checked, len(exp.Paired))

	sens := res.Sensitivity
	if sens == nil {
		t.Fatal("results.json has no sensitivity analysis")
	}
	tol := 0.02 // README: the default AUC tolerance (report.DefaultToleranceAUC)
	if st.Spec.ToleranceAUC != nil {
		tol = *st.Spec.ToleranceAUC
	}
	for _, m := range sens.Metrics {
		if (m.Key == "auc" || m.Key == "auc_unweighted") && m.Tolerance != tol {
			t.Errorf("metric %s: tolerance %v, want %v", m.Key, m.Tolerance, tol)
		}
	}
	// Verdicts: README "Verdicts are equivalence judgements" and
	// report.ModelVerdict: robust when every difference from the base has
	// its interval inside -T..+T, extent-sensitive when one lies wholly
	// outside, undetermined otherwise; a difference on fewer than
	// report.MinPairedPoints (10) common test points is too_few, not
	// judged. Positions and verdicts from golden.py's paired_analysis; on
	// the extents whose buffer-edge cells differ within the margin
	// areasweep's own position enters the rule.
	mvs := map[string]report.ModelVerdict{}
	for _, mv := range sens.ModelVerdicts {
		mvs[mv.Metric+"/"+mv.Model] = mv
	}
	summary := map[string][]string{}
	for _, v := range exp.Verdicts {
		lab := v.Metric + "/" + v.Model
		mv, ok := mvs[lab]
		if !ok {
			t.Errorf("verdict %s missing", lab)
			continue
		}
		if mv.Base != v.BaseExtent || mv.Tolerance != v.Tolerance {
			t.Errorf("verdict %s: base %s tolerance %v, want %s %v", lab, mv.Base, mv.Tolerance, v.BaseExtent, v.Tolerance)
		}
		wantExt := map[string]e2ePaired{}
		for _, w := range exp.Paired {
			if w.Metric == v.Metric && w.Kind == "extent" && w.Model == v.Model {
				wantExt[w.Extent] = w
			}
		}
		if len(mv.Diffs) != len(wantExt) {
			t.Errorf("verdict %s: %d differences from the base, want %d", lab, len(mv.Diffs), len(wantExt))
		}
		var pos []string
		mixed := false
		for _, d := range mv.Diffs {
			w, ok := wantExt[d.Extent]
			if !ok {
				t.Errorf("verdict %s: a difference on %s, which golden.py does not form", lab, d.Extent)
				continue
			}
			wp := ""
			if w.Position != nil {
				wp = *w.Position
			}
			if !same[d.Extent] {
				mixed = true
				pos = append(pos, d.Position)
				if d.Position != wp {
					t.Logf("verdict %s: on %s (edge cells within the margin) position %s, golden.py %s", lab, d.Extent, d.Position, wp)
				}
				continue
			}
			pos = append(pos, wp)
			if d.Position != wp || d.Defined != w.Defined || d.CommonPoints != w.CommonPoints || d.Method != "placements" ||
				w.Defined && (math.Abs(d.Diff-w.Diff) > 1e-9 || math.Abs(val(d.Low)-w.Low) > 1e-9 || math.Abs(val(d.High)-w.High) > 1e-9 || math.Abs(d.TestSetShift-w.TestSetShift) > 1e-9) {
				t.Errorf("verdict %s: difference on %s %+v, want position %q common points %d diff %v interval %v..%v shift %v (golden.py paired_analysis)",
					lab, d.Extent, d, wp, w.CommonPoints, w.Diff, w.Low, w.High, w.TestSetShift)
			}
		}
		wantV := v.Verdict
		if mixed {
			wantV = e2eVerdictRule(pos)
		}
		if string(mv.Verdict) != wantV {
			t.Errorf("verdict %s: %s, want %s (positions %v, tolerance %v; README rule)", lab, mv.Verdict, wantV, pos, tol)
		}
		summary[v.Metric] = append(summary[v.Metric], wantV)
	}
	// sensitivity.verdicts: extent-sensitive when any model's is, robust
	// when every model's is, undetermined otherwise (README).
	for _, v := range sens.Verdicts {
		vs, ok := summary[v.Metric]
		if !ok {
			continue
		}
		want := "undetermined"
		switch {
		case slices.Contains(vs, "extent-sensitive"):
			want = "extent-sensitive"
		case !slices.ContainsFunc(vs, func(s string) bool { return s != "robust" }):
			want = "robust"
		}
		if string(v.Verdict) != want || v.Tolerance != tol {
			t.Errorf("verdict %s: %s tolerance %v, want %s %v (models %v)", v.Metric, v.Verdict, v.Tolerance, want, tol, vs)
		}
		delete(summary, v.Metric)
	}
	if len(summary) > 0 {
		t.Errorf("no summary verdict for %v", summary)
	}
	// Readings against the null (README sensitivity.above_null[]): above
	// when the interval is wholly above 0, below when wholly below,
	// not_above otherwise, too_few on fewer than 10 common test points.
	readings := map[string]e2ePaired{}
	for _, w := range exp.Paired {
		if w.Kind == "null" && w.Metric == "auc" {
			readings[w.Model+"/"+w.Extent] = w
		}
	}
	n := 0
	for _, an := range sens.AboveNull {
		if an.Metric != "auc" {
			continue
		}
		for _, g := range an.Gaps {
			w, ok := readings[an.Model+"/"+g.Extent]
			if !ok || an.Null != w.OtherModel {
				t.Errorf("above null %s - %s on %s: golden.py forms no such difference", an.Model, an.Null, g.Extent)
				continue
			}
			if g.Extent == an.BaseExtent && an.BaseReading != w.Reading {
				t.Errorf("above null %s: base reading %s, want %s", an.Model, an.BaseReading, w.Reading)
			}
			if !same[g.Extent] {
				continue
			}
			n++
			if g.Reading != w.Reading || g.CommonPoints != w.CommonPoints || g.Method != "placements" ||
				math.Abs(g.Diff-w.Diff) > 1e-9 || math.Abs(g.Low-w.Low) > 1e-9 || math.Abs(g.High-w.High) > 1e-9 {
				t.Errorf("above null %s on %s: %+v, want reading %s common points %d diff %v interval %v..%v (golden.py paired_analysis)",
					an.Model, g.Extent, g, w.Reading, w.CommonPoints, w.Diff, w.Low, w.High)
			}
		}
	}
	if n == 0 {
		t.Error("no AUC reading against the null compared")
	}
	// Model rankings (README sensitivity.rankings[], report.ModelRanking):
	// on each extent, Model better than Other beyond noise when the
	// interval of the difference lies above 0, worse when below, within
	// noise otherwise; too_few (fewer than 10 common test points) not
	// counted. Golden readings on the extents whose membership matched,
	// areasweep's own on the others.
	pairs := map[string]e2ePaired{}
	for _, w := range exp.Paired {
		if w.Kind == "model" {
			pairs[w.Metric+"/"+w.Model+"/"+w.OtherModel+"/"+w.Extent] = w
		}
	}
	ranked := 0
	for _, r := range sens.Rankings {
		if r.Metric != "auc" && r.Metric != "auc_unweighted" {
			continue
		}
		lab := r.Metric + " " + r.Model + " - " + r.Other
		var better, worse, within, extents int
		for _, d := range r.Diffs {
			w, ok := pairs[r.Metric+"/"+r.Model+"/"+r.Other+"/"+d.Extent]
			if !ok {
				t.Errorf("ranking %s on %s: golden.py forms no such difference", lab, d.Extent)
				continue
			}
			reading := w.Reading
			if !same[d.Extent] {
				reading = ""
				switch {
				case d.Defined && d.Position == "too_few":
					reading = "too_few"
				case d.Defined && val(d.Low) > 0:
					reading = "above"
				case d.Defined && val(d.High) < 0:
					reading = "below"
				case d.Defined:
					reading = "not_above"
				}
			} else if d.Defined != w.Defined || d.CommonPoints != w.CommonPoints || d.Method != "placements" || (d.Position == "too_few") != (w.Reading == "too_few") ||
				w.Defined && (math.Abs(d.Diff-w.Diff) > 1e-9 || math.Abs(val(d.Low)-w.Low) > 1e-9 || math.Abs(val(d.High)-w.High) > 1e-9) {
				t.Errorf("ranking %s on %s: %+v, want common points %d diff %v interval %v..%v reading %s (golden.py paired_analysis)",
					lab, d.Extent, d, w.CommonPoints, w.Diff, w.Low, w.High, w.Reading)
			}
			switch reading {
			case "above":
				better++
			case "below":
				worse++
			case "not_above":
				within++
			}
			if reading != "" && reading != "too_few" {
				extents++
			}
		}
		if r.Better != better || r.Worse != worse || r.WithinNoise != within || r.Extents != extents {
			t.Errorf("ranking %s: better %d worse %d within noise %d on %d extents, want %d %d %d %d", lab, r.Better, r.Worse, r.WithinNoise, r.Extents, better, worse, within, extents)
		}
		ranked++
	}
	if len(st.Spec.Models) > 1 && ranked != 2 {
		t.Errorf("%d AUC rankings compared, want 2 (auc and auc_unweighted)", ranked)
	}
}

// e2eVerdictRule is README's verdict rule on the positions of a model's
// differences from the base ("" for an undefined one).
func e2eVerdictRule(pos []string) string {
	if slices.Contains(pos, "outside") {
		return "extent-sensitive"
	}
	if len(pos) > 0 && !slices.ContainsFunc(pos, func(s string) bool { return s != "inside" }) {
		return "robust"
	}
	return "undetermined"
}

// checkE2EBoyce checks the Boyce index's windows against golden.py's
// boyce: every window areasweep uses must exist, its P/E must lie within
// the bounds that the documented histogram (bins at most (max-min)/2047
// wide, area spread over each bin, the area at presence values exact)
// allows around the exact window areas, and every window with area beyond
// a bin's width of its ends must be used. The index must equal the exact
// one (scipy.stats.spearmanr) within 1e-9 when every value of the cells
// is a presence value or threshold (the Byte model), and within 0.01
// otherwise (measured: at most 0.0033); so must a model of few values
// whose bins hold one value each, and then every window's P/E must equal
// the exact one within 1e-9 (our tolerance: the shares are stored to 12
// digits).
func checkE2EBoyce(t *testing.T, lab string, b *report.Boyce, s e2eScore) {
	t.Helper()
	if (b != nil) != s.Boyce.Defined {
		t.Errorf("%s: Boyce index defined %v, want %v", lab, b != nil, s.Boyce.Defined)
		return
	}
	if b == nil {
		return
	}
	used := map[int]bool{}
	w := s.Boyce
	if len(w.PCount) != 100 || len(w.ELo) != 100 || len(w.EHi) != 100 || w.N == 0 {
		t.Fatalf("%s: golden Boyce windows malformed", lab)
	}
	// The windows' midpoints as golden.py (and README) place them: width
	// 0.1 of the range, 100 equal steps.
	span := w.Max - w.Min
	width := 0.1 * span
	step := (span - width) / 99
	mids := make([]float64, 100)
	for i := range mids {
		mids[i] = w.Min + float64(i)*step + width/2
	}
	for k, mid := range b.Mid {
		found := -1
		for i, m := range mids {
			if math.Abs(m-mid) <= 1e-9*math.Max(1, math.Abs(mid)) {
				found = i
			}
		}
		if found < 0 {
			t.Errorf("%s: Boyce window at %v is not one of the 100 windows", lab, mid)
			continue
		}
		used[found] = true
		p, elo, ehi := float64(w.PCount[found])/float64(w.N), w.ELo[found], w.EHi[found]
		f := b.Ratio[k]
		lo, hi := p/ehi, math.Inf(1)
		if elo > 0 {
			hi = p / elo
		}
		if ehi <= 1e-12 || f < lo*(1-1e-9) || f > hi*(1+1e-9) || (f == 0) != (p == 0) {
			t.Errorf("%s: Boyce window at %v: P/E %v outside [%v, %v] (P %v)", lab, mid, f, lo, hi, p)
		}
		if w.Exact && (len(w.E) != 100 || relDiff(f, p/w.E[found]) > 1e-9) {
			t.Errorf("%s: Boyce window at %v: P/E %v, want %v (exact window area, model of few values)", lab, mid, f, p/w.E[found])
		}
	}
	for i := range mids {
		if w.ELo[i] > 1e-12 && !used[i] {
			t.Errorf("%s: Boyce window at %v (E at least %v) not used", lab, mids[i], w.ELo[i])
		}
	}
	tol := 0.01
	if s.Boyce.Exact {
		tol = 1e-9
	}
	if math.Abs(b.Index-s.Boyce.Index) > tol {
		t.Errorf("%s: Boyce index %v, want %v within %v (scipy spearmanr on exact window areas)", lab, b.Index, s.Boyce.Index, tol)
	}
}

// val is the number p points to, NaN when p is nil (a paired record's
// optional SE and interval).
func val(p *float64) float64 {
	if p == nil {
		return math.NaN()
	}
	return *p
}
