package scenario

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"testing"

	"areasweep/extent"

	"github.com/airbusgeo/godal"
	"go.yaml.in/yaml/v3"
)

// written caches one Write per seed for the whole test binary.
var written = map[uint64]Files{}

func writeSeed(t *testing.T, seed uint64) Files {
	t.Helper()
	if f, ok := written[seed]; ok {
		return f
	}
	dir, err := os.MkdirTemp("", "scenario-test-")
	if err != nil {
		t.Fatal(err)
	}
	tmpDirs = append(tmpDirs, dir)
	f, err := Write(filepath.Join(dir, "demo"), seed)
	if err != nil {
		t.Fatalf("Write(seed %d): %v", seed, err)
	}
	written[seed] = f
	return f
}

// tmpDirs are removed by TestMain after all tests.
var tmpDirs []string

func TestMain(m *testing.M) {
	extent.Configure() // as the program does: fixed GeoPackage dates

	code := m.Run()
	for _, d := range tmpDirs {
		os.RemoveAll(d)
	}
	os.Exit(code)
}

// raster is a model read back through GDAL.
type raster struct {
	vals   []float32
	nodata float64
	gt     [6]float64
	epsg   string
	sizeX  int
	sizeY  int
	blockX int
	blockY int
	dtype  godal.DataType
}

func readRaster(t *testing.T, path string) raster {
	t.Helper()
	ds, err := godal.Open(path)
	if err != nil {
		t.Fatalf("open %s: %v", path, err)
	}
	defer ds.Close()
	var r raster
	st := ds.Structure()
	r.sizeX, r.sizeY = st.SizeX, st.SizeY
	if st.NBands != 1 {
		t.Fatalf("%s: %d bands, want 1", path, st.NBands)
	}
	b := ds.Bands()[0]
	bs := b.Structure()
	r.blockX, r.blockY, r.dtype = bs.BlockSizeX, bs.BlockSizeY, bs.DataType
	nd, ok := b.NoData()
	if !ok {
		t.Fatalf("%s: no nodata value", path)
	}
	r.nodata = nd
	if r.gt, err = ds.GeoTransform(); err != nil {
		t.Fatalf("%s: geotransform: %v", path, err)
	}
	sr := ds.SpatialRef()
	r.epsg = sr.AuthorityName("") + ":" + sr.AuthorityCode("")
	sr.Close()
	r.vals = make([]float32, r.sizeX*r.sizeY)
	if err := b.Read(0, 0, r.vals, r.sizeX, r.sizeY); err != nil {
		t.Fatalf("%s: read: %v", path, err)
	}
	return r
}

// polyRecord is one vector feature read back through GDAL.
type polyRecord struct {
	ring  [][2]float64
	attrs map[string]string
	wkt   string
}

func readPolygons(t *testing.T, path, layer string) ([]polyRecord, string) {
	t.Helper()
	ds, err := godal.Open(path, godal.VectorOnly())
	if err != nil {
		t.Fatalf("open %s: %v", path, err)
	}
	defer ds.Close()
	l := ds.LayerByName(layer)
	if l == nil {
		t.Fatalf("%s: no layer %q", path, layer)
	}
	sr := l.SpatialRef()
	epsg := sr.AuthorityName("") + ":" + sr.AuthorityCode("")
	var out []polyRecord
	for f := l.NextFeature(); f != nil; f = l.NextFeature() {
		g := f.Geometry()
		gj, err := g.GeoJSON(godal.SignificantDigits(12))
		if err != nil {
			t.Fatal(err)
		}
		wkt, _ := g.WKT()
		var p struct {
			Type        string
			Coordinates [][][2]float64
		}
		if err := json.Unmarshal([]byte(gj), &p); err != nil || p.Type != "Polygon" || len(p.Coordinates) != 1 {
			t.Fatalf("%s: feature is not a one-ring polygon: %s (%v)", path, gj, err)
		}
		attrs := map[string]string{}
		for k, v := range f.Fields() {
			attrs[k] = v.String()
		}
		out = append(out, polyRecord{ring: p.Coordinates[0], attrs: attrs, wkt: wkt})
		g.Close()
		f.Close()
	}
	return out, epsg
}

type occurrence struct {
	lon, lat float64
	role     string
}

var sixDecimals = regexp.MustCompile(`^-?[0-9]+\.[0-9]{6}$`)

func readOccurrences(t *testing.T, path string) []occurrence {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if bytes.Contains(b, []byte("\r")) {
		t.Fatalf("%s: has CR line ends", path)
	}
	rows, err := csv.NewReader(bytes.NewReader(b)).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	if len(rows) < 2 || fmt.Sprint(rows[0]) != "[longitude latitude role]" {
		t.Fatalf("%s: header %v", path, rows[0])
	}
	var out []occurrence
	for i, r := range rows[1:] {
		if !sixDecimals.MatchString(r[0]) || !sixDecimals.MatchString(r[1]) {
			t.Fatalf("%s line %d: coordinates %q %q not 6 decimals", path, i+2, r[0], r[1])
		}
		lon, _ := strconv.ParseFloat(r[0], 64)
		lat, _ := strconv.ParseFloat(r[1], 64)
		if r[2] != "train" && r[2] != "test" {
			t.Fatalf("%s line %d: role %q", path, i+2, r[2])
		}
		out = append(out, occurrence{lon, lat, r[2]})
	}
	return out
}

// pixel returns the row-major index of the cell containing (lon, lat) under
// geotransform gt, by the GDAL convention lon = gt0 + col gt1, lat = gt3 + row gt5.
func pixel(gt [6]float64, w, h int, lon, lat float64) (int, bool) {
	c := int(math.Floor((lon - gt[0]) / gt[1]))
	r := int(math.Floor((lat - gt[3]) / gt[5]))
	if c < 0 || c >= w || r < 0 || r >= h {
		return 0, false
	}
	return r*w + c, true
}

func TestWriteFiles(t *testing.T) {
	f := writeSeed(t, 1)
	for _, p := range []string{f.Models[0].Path, f.Models[1].Path, f.Occurrences, f.Region, f.Ecoregions, f.Study} {
		if !filepath.IsAbs(p) || filepath.Dir(p) != f.Dir {
			t.Errorf("path %s not absolute inside %s", p, f.Dir)
		}
	}
	if f.Models[0].Name != "good" || f.Models[1].Name != "coarse" || f.EcoregionField != "unit_id" {
		t.Errorf("names: %+v %q", f.Models, f.EcoregionField)
	}
	var mask []bool
	for _, m := range f.Models {
		t.Run("raster_"+m.Name, func(t *testing.T) {
			r := readRaster(t, m.Path)
			if r.sizeX != 300 || r.sizeY != 240 { // grid from the brief
				t.Errorf("size %dx%d, want 300x240", r.sizeX, r.sizeY)
			}
			if r.epsg != "EPSG:4326" {
				t.Errorf("CRS %s, want EPSG:4326", r.epsg)
			}
			if want := [6]float64{-150, 0.1, 0, -28, 0, -0.1}; r.gt != want {
				t.Errorf("geotransform %v, want %v", r.gt, want)
			}
			if r.nodata != -9999 || r.dtype != godal.Float32 || r.blockX != 64 || r.blockY != 64 {
				t.Errorf("nodata %v type %v blocks %dx%d, want -9999 Float32 64x64", r.nodata, r.dtype, r.blockX, r.blockY)
			}
			land := 0
			m := make([]bool, len(r.vals))
			for i, v := range r.vals {
				if float64(v) == r.nodata {
					continue
				}
				if v < 0 || v > 1 || math.IsNaN(float64(v)) {
					t.Fatalf("cell %d value %v outside [0, 1]", i, v)
				}
				m[i] = true
				land++
			}
			// "one large continent filling roughly half the grid" (brief)
			if share := float64(land) / float64(len(r.vals)); share < 0.4 || share > 0.6 {
				t.Errorf("land share %.3f, want about one half", share)
			}
			if mask == nil {
				mask = m
			} else {
				for i := range m {
					if m[i] != mask[i] {
						t.Fatalf("cell %d: land masks of the models differ", i)
					}
				}
			}
		})
	}
	for _, c := range []struct {
		name, path, layer string
		n                 int
		fields            []string
	}{
		{"region", f.Region, "region", 1, []string{"name"}},
		{"ecoregions", f.Ecoregions, "ecoregions", 40, []string{"unit_id", "unit_name"}},
	} {
		t.Run("vector_"+c.name, func(t *testing.T) {
			polys, epsg := readPolygons(t, c.path, c.layer)
			if epsg != "EPSG:4326" {
				t.Errorf("CRS %s, want EPSG:4326", epsg)
			}
			if len(polys) != c.n {
				t.Fatalf("%d features, want %d", len(polys), c.n)
			}
			names := map[string]bool{}
			for i, p := range polys {
				for _, fld := range c.fields {
					if p.attrs[fld] == "" {
						t.Errorf("feature %d: field %q empty", i, fld)
					}
				}
				if n := p.attrs["unit_name"]; n != "" {
					if names[n] {
						t.Errorf("unit name %q repeated", n)
					}
					names[n] = true
				}
				if p.attrs["unit_id"] != "" && p.attrs["unit_id"] != strconv.Itoa(i+1) {
					t.Errorf("feature %d: unit_id %s, want %d", i, p.attrs["unit_id"], i+1)
				}
				for _, v := range p.ring {
					if v[0] < -150-1e-9 || v[0] > -120+1e-9 || v[1] < -52-1e-9 || v[1] > -28+1e-9 {
						t.Fatalf("feature %d vertex %v outside the grid box", i, v)
					}
				}
			}
		})
	}
	t.Run("study", func(t *testing.T) {
		b, err := os.ReadFile(f.Study)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.HasPrefix(b, []byte("# ")) || bytes.Contains(b, []byte("\r")) {
			t.Errorf("study.yaml does not start with a comment line or has CR line ends")
		}
		var got map[string]any
		if err := yaml.Unmarshal(b, &got); err != nil {
			t.Fatalf("study.yaml: %v", err)
		}
		// The keys and values the brief fixes, which mirror the command's flags.
		want := map[string]any{
			"model":                []any{"good=model_good.tif", "coarse=model_coarse.tif"},
			"occurrences":          "occurrences.csv",
			"region":               "region.gpkg",
			"ecoregions":           "ecoregions.gpkg",
			"ecoregion-field":      "unit_id",
			"region-buffers":       []any{-50, 100, 250, 500},
			"point-buffers":        []any{50, 100, 200},
			"hull-buffers":         []any{0, 100},
			"ecoregion-min-points": 1,
			"e":                    []any{0.05, 0.10},
			"iterations":           500,
			"fraction":             0.5,
			"seed":                 20261201,
		}
		if fmt.Sprint(got) != fmt.Sprint(want) {
			t.Errorf("study.yaml\n got %v\nwant %v", got, want)
		}
		for k, v := range got {
			if s, ok := v.(string); ok && k != "ecoregion-field" {
				if _, err := os.Stat(filepath.Join(filepath.Dir(f.Study), s)); err != nil {
					t.Errorf("key %s: %v", k, err)
				}
			}
		}
	})
}

func TestWriteRejectsNonEmptyDir(t *testing.T) {
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "x"), nil, 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Write(dir, 1); err == nil {
		t.Fatal("Write into a non-empty directory: want an error")
	}
	empty := filepath.Join(dir, "empty")
	if err := os.Mkdir(empty, 0o755); err != nil {
		t.Fatal(err)
	}
	if _, err := Write(empty, 1); err != nil {
		t.Fatalf("Write into an empty directory: %v", err)
	}
}

func TestDeterminism(t *testing.T) {
	a := writeSeed(t, 1)
	b, err := Write(filepath.Join(t.TempDir(), "again"), 1)
	if err != nil {
		t.Fatal(err)
	}
	c := writeSeed(t, 2)
	same := func(p, q string) bool {
		x, err1 := os.ReadFile(p)
		y, err2 := os.ReadFile(q)
		if err1 != nil || err2 != nil {
			t.Fatal(err1, err2)
		}
		return bytes.Equal(x, y)
	}
	sameRaster := func(p, q string) bool {
		x, y := readRaster(t, p), readRaster(t, q)
		for i := range x.vals {
			if math.Float32bits(x.vals[i]) != math.Float32bits(y.vals[i]) {
				return false
			}
		}
		return true
	}
	samePolys := func(p, q, layer string) bool {
		x, _ := readPolygons(t, p, layer)
		y, _ := readPolygons(t, q, layer)
		return fmt.Sprint(x) == fmt.Sprint(y)
	}
	if !same(a.Occurrences, b.Occurrences) || !same(a.Study, b.Study) {
		t.Error("same seed: CSV or YAML bytes differ")
	}
	for i := range a.Models {
		if !sameRaster(a.Models[i].Path, b.Models[i].Path) {
			t.Errorf("same seed: %s raster values differ", a.Models[i].Name)
		}
		if sameRaster(a.Models[i].Path, c.Models[i].Path) {
			t.Errorf("seeds 1 and 2: %s rasters identical", a.Models[i].Name)
		}
	}
	if !samePolys(a.Region, b.Region, "region") || !samePolys(a.Ecoregions, b.Ecoregions, "ecoregions") {
		t.Error("same seed: polygons differ")
	}
	if same(a.Occurrences, c.Occurrences) || samePolys(a.Ecoregions, c.Ecoregions, "ecoregions") {
		t.Error("seeds 1 and 2: occurrences or ecoregions identical")
	}
}

func TestOccurrences(t *testing.T) {
	for _, seed := range []uint64{1, 2} {
		t.Run(fmt.Sprintf("seed_%d", seed), func(t *testing.T) {
			f := writeSeed(t, seed)
			occ := readOccurrences(t, f.Occurrences)
			r := readRaster(t, f.Models[0].Path)
			// ~300 records plus 3-4 duplicates (brief)
			if len(occ) < 290 || len(occ) > 310 {
				t.Errorf("%d records, want about 300", len(occ))
			}
			type key struct {
				cell int
				role string
			}
			perCell := map[key]int{}
			perCellAny := map[int]int{}
			nTrain := 0
			seen := map[[2]float64]bool{}
			for i, o := range occ {
				cell, ok := pixel(r.gt, r.sizeX, r.sizeY, o.lon, o.lat)
				if !ok || float64(r.vals[cell]) == r.nodata {
					t.Fatalf("record %d (%v, %v) not on land", i, o.lon, o.lat)
				}
				if seen[[2]float64{o.lon, o.lat}] {
					t.Errorf("record %d repeats coordinates exactly", i)
				}
				seen[[2]float64{o.lon, o.lat}] = true
				perCell[key{cell, o.role}]++
				perCellAny[cell]++
				if o.role == "train" {
					nTrain++
				}
			}
			// split ~70/30 (brief)
			if share := float64(nTrain) / float64(len(occ)); share < 0.65 || share > 0.75 {
				t.Errorf("train share %.3f, want about 0.7", share)
			}
			dups := 0
			for k, n := range perCell {
				if n > 1 {
					dups += n - 1
				}
				if perCellAny[k.cell] != n {
					t.Errorf("cell %d holds records of both roles", k.cell)
				}
			}
			// 3-4 deliberate same-cell, same-role duplicates (brief)
			if dups < 3 || dups > 4 {
				t.Errorf("%d same-cell duplicates, want 3 or 4", dups)
			}
		})
	}
}

// weightedAUC is the weighted Mann-Whitney statistic with ties counted half:
//
//	AUC = sum_i sum_j u_i w_j ([p_i > n_j] + [p_i = n_j] / 2) / (sum_i u_i sum_j w_j)
//
// (Hanley & McNeil 1982, Radiology 143:29-36, for the unweighted form). The
// test checks it against sklearn in TestWeightedAUCGolden.
func weightedAUC(pos, posW, neg, negW []float64) float64 {
	idx := make([]int, len(neg))
	for i := range idx {
		idx[i] = i
	}
	sort.Slice(idx, func(a, b int) bool { return neg[idx[a]] < neg[idx[b]] })
	s := make([]float64, len(neg))
	cum := make([]float64, len(neg)+1)
	for k, i := range idx {
		s[k] = neg[i]
		cum[k+1] = cum[k] + negW[i]
	}
	num, den := 0.0, 0.0
	for i, p := range pos {
		lo := sort.SearchFloat64s(s, p)
		hi := sort.Search(len(s), func(k int) bool { return s[k] > p })
		num += posW[i] * (cum[lo] + (cum[hi]-cum[lo])/2)
		den += posW[i]
	}
	return num / (den * cum[len(neg)])
}

func TestWeightedAUCGolden(t *testing.T) {
	g := loadGolden(t)
	for _, c := range g.AUC {
		t.Run(c.Name, func(t *testing.T) {
			got := weightedAUC(c.Pos, c.PosW, c.Neg, c.NegW)
			if math.Abs(got-c.AUC) > 1e-12 { // sklearn roc_auc_score, testdata/golden.json
				t.Errorf("AUC %.15f, sklearn %.15f", got, c.AUC)
			}
		})
	}
}

// rayCast is the test's own even-odd point-in-polygon test.
func rayCast(ring [][2]float64, x, y float64) bool {
	in := false
	n := len(ring)
	for i := 0; i < n; i++ {
		a, b := ring[i], ring[(i+n-1)%n]
		if (a[1] > y) != (b[1] > y) {
			xi := a[0] + (y-a[1])*(b[0]-a[0])/(b[1]-a[1])
			if x < xi {
				in = !in
			}
		}
	}
	return in
}

// TestDemoEffect recomputes, from the files alone, the effect the demo exists
// to show: the good model's area-weighted AUC of test points against land
// cells (weight cos(latitude), proportional to cell area) is clearly higher on
// all land than inside the base region; the good model beats the coarse one
// inside the base region; the coarse model's floor covers much of the land.
func TestDemoEffect(t *testing.T) {
	for _, seed := range []uint64{1, 2, 3} {
		t.Run(fmt.Sprintf("seed_%d", seed), func(t *testing.T) {
			f := writeSeed(t, seed)
			occ := readOccurrences(t, f.Occurrences)
			polys, _ := readPolygons(t, f.Region, "region")
			ring := polys[0].ring
			auc := map[string][2]float64{} // model -> {region, all land}
			for _, m := range f.Models {
				r := readRaster(t, m.Path)
				var pos, posW, negAll, wAll, negIn, wIn []float64
				for _, o := range occ {
					if o.role != "test" {
						continue
					}
					cell, _ := pixel(r.gt, r.sizeX, r.sizeY, o.lon, o.lat)
					pos = append(pos, float64(r.vals[cell]))
					posW = append(posW, 1)
				}
				floor, floorN, landN := math.Inf(1), 0, 0
				for i, v := range r.vals {
					if float64(v) == r.nodata {
						continue
					}
					lon := r.gt[0] + (float64(i%r.sizeX)+0.5)*r.gt[1]
					lat := r.gt[3] + (float64(i/r.sizeX)+0.5)*r.gt[5]
					w := math.Cos(lat * math.Pi / 180)
					negAll, wAll = append(negAll, float64(v)), append(wAll, w)
					if rayCast(ring, lon, lat) {
						negIn, wIn = append(negIn, float64(v)), append(wIn, w)
					}
					landN++
					switch {
					case float64(v) < floor:
						floor, floorN = float64(v), 1
					case float64(v) == floor:
						floorN++
					}
				}
				auc[m.Name] = [2]float64{weightedAUC(pos, posW, negIn, wIn), weightedAUC(pos, posW, negAll, wAll)}
				t.Logf("%s: AUC base region %.3f, all land %.3f; %d test points; region has %.0f%% of land; lowest value %.3f on %.0f%% of land",
					m.Name, auc[m.Name][0], auc[m.Name][1], len(pos), 100*float64(len(negIn))/float64(landN), floor, 100*float64(floorN)/float64(landN))
				if m.Name == "coarse" && float64(floorN)/float64(landN) < 0.30 {
					t.Errorf("coarse floor %.3f covers %.1f%% of land, want >= 30%% (brief)", floor, 100*float64(floorN)/float64(landN))
				}
			}
			// "clear margin" (brief); 0.05 AUC is common practice for a difference that matters.
			if g := auc["good"]; g[1]-g[0] < 0.05 {
				t.Errorf("good model: all-land AUC %.3f not clearly above base-region AUC %.3f", g[1], g[0])
			}
			if auc["good"][0] <= auc["coarse"][0] {
				t.Errorf("base region: good AUC %.3f not above coarse %.3f", auc["good"][0], auc["coarse"][0])
			}
		})
	}
}
