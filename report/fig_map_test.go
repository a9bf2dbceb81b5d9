package report

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
	"time"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"

	"areasweep/extent/vocab"
)

// TestMapPanelsFit checks the map figure's arrangement for families from
// one panel to far more than a page holds: the drawn rows never take more
// height than the page leaves them (before, 60 extents drew panels over
// the colour bar and the point key), maps are at least mapMinH tall
// whenever any are left out, columns grow before panels are dropped, and
// the panels left out are the last ones, named in the caption.
func TestMapPanelsFit(t *testing.T) {
	const avail = 190 * vg.Millimeter
	for _, n := range []int{1, 2, 4, 7, 12, 16, 30, 80} {
		t.Run(fmt.Sprint(n), func(t *testing.T) {
			r := &Results{}
			var groups []mapGroup
			for i := range n {
				var members []int
				for k := range 5 {
					r.Extents = append(r.Extents, Extent{ID: fmt.Sprintf("region_%dkm", 20*(5*i+k+1))})
					members = append(members, len(r.Extents)-1)
				}
				groups = append(groups, mapGroup{title: fmt.Sprintf("nested chain c%d", i), members: members})
			}
			l := layoutMapPanels(r, groups, twoColumns, avail, 0.8)
			if l.shown < 1 || l.shown > n || l.cols < 1 || l.cols > mapMaxCols {
				t.Fatalf("layout %+v for %d panels", l, n)
			}
			rows := (l.shown + l.cols - 1) / l.cols
			if got := vg.Length(rows) * l.cellH; got > avail+1e-9 {
				t.Errorf("%d rows of %.1f mm take %.1f mm, more than the %.1f mm left", rows, l.cellH/vg.Millimeter, got/vg.Millimeter, avail/vg.Millimeter)
			}
			mapH := l.cellH - vg.Points(mapPanelChrome) - l.legendH
			if n > 1 && mapH < mapMinH-1e-9 {
				t.Errorf("maps %.1f mm tall, below the %.0f mm floor", mapH/vg.Millimeter, mapMinH/vg.Millimeter)
			}
			if l.shown < n && l.cols != mapMaxCols {
				t.Errorf("%d of %d panels left out with only %d columns", n-l.shown, n, l.cols)
			}
			if n == 1 && l.cols != 1 {
				t.Errorf("one panel in %d columns", l.cols)
			}
			if left := n - l.shown; left > 0 {
				got := leftTitles(groups, left)
				if !strings.HasPrefix(got, groups[l.shown].title) || !strings.HasSuffix(got, groups[n-1].title) {
					t.Errorf("left-out panels named %q", got)
				}
			}
		})
	}
}

// TestMapMarksMerged: a point layer of more than crowdedMarks points is
// drawn with at most one mark per cell of the markLattice lattice across
// the map: every mark is one of the layer's points, no two share a cell,
// every point shares a cell with a mark, and the key and the caption say
// so; a layer of crowdedMarks points or fewer is drawn point by point,
// with the key and caption as before.
func TestMapMarksMerged(t *testing.T) {
	for _, n := range []int{crowdedMarks / 2, crowdedMarks, 3 * crowdedMarks} {
		t.Run(fmt.Sprint(n), func(t *testing.T) {
			r := loadSample(t)
			rng := rand.New(rand.NewPCG(uint64(n), 7))
			r.Points = r.Points[:0]
			for i := range n {
				r.Points = append(r.Points, Point{ID: i + 2, Role: vocab.RoleTrain, Status: vocab.PointScored,
					Row: rng.IntN(r.Grid.Height), Col: rng.IntN(r.Grid.Width)})
			}
			model := r.Models[0].Name
			tr := mapPoints(r, model).layers[0]
			f, ok := mapFigure(r)
			if !ok {
				t.Fatal("no map figure")
			}
			merged := strings.Contains(f.Caption, "one mark where several fall")
			if n <= crowdedMarks {
				if len(tr.xys) != n || tr.label != "training point" || merged {
					t.Fatalf("%d points: %d marks, key %q, caption merged %v", n, len(tr.xys), tr.label, merged)
				}
				return
			}
			pv := r.Preview
			dx := (pv.Bounds[2] - pv.Bounds[0]) / markLattice
			dy := dx
			if r.Grid.Geographic {
				dy *= math.Cos((pv.Bounds[1] + pv.Bounds[3]) / 2 * math.Pi / 180)
			}
			cell := func(x, y float64) [2]int64 { return [2]int64{int64(math.Floor(x / dx)), int64(math.Floor(y / dy))} }
			points := map[plotter.XY]bool{}
			for _, p := range r.Points {
				x, y := pointXY(r.Grid, p)
				points[plotter.XY{X: x, Y: y}] = true
			}
			marks := map[[2]int64]bool{}
			for _, m := range tr.xys {
				if !points[m] {
					t.Fatalf("mark %v is none of the points", m)
				}
				if marks[cell(m.X, m.Y)] {
					t.Fatalf("two marks in the cell of %v", m)
				}
				marks[cell(m.X, m.Y)] = true
			}
			for p := range points {
				if !marks[cell(p.X, p.Y)] {
					t.Fatalf("point %v has no mark in its cell", p)
				}
			}
			if len(tr.xys) >= n || tr.label != fmt.Sprintf("training point (%d points, %d marks)", n, len(tr.xys)) || !merged {
				t.Fatalf("%d points: %d marks, key %q, caption merged %v", n, len(tr.xys), tr.label, merged)
			}
		})
	}
}

// TestMapOnePanelKeyInside: a family of the base region and the whole
// raster alone draws one map panel in a one-column figure, whose key band
// gives the point marks half of 85 mm; the labels of the omitted test
// points ("test point omitted at the 10th percentile training presence")
// ran past the figure's right edge. Every text inside the canvas and none
// overlapping another (checkTexts).
func TestMapOnePanelKeyInside(t *testing.T) {
	r := baseAndWhole(t)
	if n := len(mapGroups(r)); n != 1 {
		t.Fatalf("%d panels, want 1", n)
	}
	f, svg := checkedMapSVG(t, r, "map of the base region and the whole raster")
	if f.W != oneColumn {
		t.Errorf("width %.1f mm, want one column", f.W/vg.Millimeter)
	}
	texts, _ := parseSVG(t, svg)
	var omitted []string
	for _, tx := range texts {
		if strings.Contains(tx.s, "omitted") || strings.Contains(tx.s, "training presence") {
			omitted = append(omitted, tx.s)
		}
	}
	if len(omitted) < 2 {
		t.Errorf("omission labels %q, want both in the key", omitted)
	}
}

// TestDegreeLabelsWrap: a grid across the antimeridian (longitudes 168 to
// 198, as GDAL writes one east of 180°) was labelled "190°E" and "200°E",
// meridians that do not exist. Expected labels: the longitude wrapped into
// (-180, 180], by the definition of east and west longitude.
func TestDegreeLabelsWrap(t *testing.T) {
	for _, tc := range []struct {
		v     float64
		label string
		lon   bool
		want  string
	}{
		{190, "190", true, "170°W"},
		{200, "200", true, "160°W"},
		{180, "180", true, "180°"},
		{-180, "\u2212180", true, "180°"},
		{-190, "\u2212190", true, "170°E"},
		{187.5, "187.5", true, "172.5°W"},
		{360, "360", true, "0°"},
		{-150, "\u2212150", true, "150°W"},
		{170, "170", true, "170°E"},
		{0, "0", true, "0°"},
		{-40, "\u221240", false, "40°S"},
	} {
		if got := degreeLabel(tc.v, tc.label, tc.lon); got != tc.want {
			t.Errorf("degreeLabel(%g, %q, %v) = %q, want %q", tc.v, tc.label, tc.lon, got, tc.want)
		}
	}
}

// TestMapLayoutWideGrid: a long, narrow grid (2000 x 40 cells over 30° of
// longitude and 3° of latitude) drew its three maps in three columns, each
// map 7 mm tall in a 30 mm panel, the points in a blur: more columns had
// been tried because the maps were short, which only made them shorter.
// Maps short for their shape now take the columns that draw them tallest
// (one here: 175 mm wide); maps of an ordinary shape keep two columns.
func TestMapLayoutWideGrid(t *testing.T) {
	r := manyExtents(t, 10)
	groups := mapGroups(r)
	if len(groups) != 3 {
		t.Fatalf("%d groups, want 3", len(groups))
	}
	avail := maxHeight - 40*vg.Millimeter
	for _, tc := range []struct {
		hw   float64
		cols int
	}{{0.13, 1}, {0.05, 1}, {0.9, 2}, {1.2, 2}} {
		l := layoutMapPanels(r, groups, twoColumns, avail, tc.hw)
		if l.cols != tc.cols || l.shown != 3 {
			t.Errorf("height/width %g: %d columns showing %d, want %d showing 3", tc.hw, l.cols, l.shown, tc.cols)
		}
		rows := (3 + l.cols - 1) / l.cols
		if h := vg.Length(rows) * l.cellH; h > avail+1e-6 {
			t.Errorf("height/width %g: rows %.1f mm, more than the %.1f mm room", tc.hw, h/vg.Millimeter, avail/vg.Millimeter)
		}
		// The map's own height at this width, against the panel's.
		mapH := (l.cellW - vg.Points(44)) * vg.Length(tc.hw)
		dataH := l.cellH - vg.Points(mapPanelChrome) - l.legendH
		if mapH < mapMaxH && dataH > mapH+1e-6 {
			t.Errorf("height/width %g: panel %.1f mm tall for a %.1f mm map", tc.hw, dataH/vg.Millimeter, mapH/vg.Millimeter)
		}
	}
}

// TestGridUnitText: a map of a projected grid titled its axes "x (grid
// units)", which tells a reader nothing. The WKT strings below are GDAL's
// (osr ImportFromEPSG, ExportToWkt as WKT2_2018 and WKT1_GDAL) and the
// expected unit is the one GDAL names for the projected axes.
func TestGridUnitText(t *testing.T) {
	for _, tc := range []struct{ crs, want string }{
		{"EPSG:3031", "EPSG:3031 units"},
		{"", "grid units"},
		{`PROJCRS["WGS 84 / Antarctic Polar Stereographic",BASEGEOGCRS["WGS 84",ENSEMBLE["World Geodetic System 1984 ensemble",MEMBER["World Geodetic System 1984 (Transit)"],MEMBER["World Geodetic System 1984 (G730)"],MEMBER["World Geodetic System 1984 (G873)"],MEMBER["World Geodetic System 1984 (G1150)"],MEMBER["World Geodetic System 1984 (G1674)"],MEMBER["World Geodetic System 1984 (G1762)"],MEMBER["World Geodetic System 1984 (G2139)"],ELLIPSOID["WGS 84",6378137,298.257223563,LENGTHUNIT["metre",1]],ENSEMBLEACCURACY[2.0]],PRIMEM["Greenwich",0,ANGLEUNIT["degree",0.0174532925199433]],ID["EPSG",4326]],CONVERSION["Antarctic Polar Stereographic",METHOD["Polar Stereographic (variant B)",ID["EPSG",9829]],PARAMETER["Latitude of standard parallel",-71,ANGLEUNIT["degree",0.0174532925199433],ID["EPSG",8832]],PARAMETER["Longitude of origin",0,ANGLEUNIT["degree",0.0174532925199433],ID["EPSG",8833]],PARAMETER["False easting",0,LENGTHUNIT["metre",1],ID["EPSG",8806]],PARAMETER["False northing",0,LENGTHUNIT["metre",1],ID["EPSG",8807]]],CS[Cartesian,2],AXIS["(E)",north,MERIDIAN[90,ANGLEUNIT["degree",0.0174532925199433]],ORDER[1],LENGTHUNIT["metre",1]],AXIS["(N)",north,MERIDIAN[0,ANGLEUNIT["degree",0.0174532925199433]],ORDER[2],LENGTHUNIT["metre",1]],USAGE[SCOPE["Antarctic Digital Database and small scale topographic mapping."],AREA["Antarctica."],BBOX[-90,-180,-60,180]],ID["EPSG",3031]]`, "metre"},
		{`PROJCS["WGS 84 / Antarctic Polar Stereographic",GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563,AUTHORITY["EPSG","7030"]],AUTHORITY["EPSG","6326"]],PRIMEM["Greenwich",0,AUTHORITY["EPSG","8901"]],UNIT["degree",0.0174532925199433,AUTHORITY["EPSG","9122"]],AUTHORITY["EPSG","4326"]],PROJECTION["Polar_Stereographic"],PARAMETER["latitude_of_origin",-71],PARAMETER["central_meridian",0],PARAMETER["false_easting",0],PARAMETER["false_northing",0],UNIT["metre",1,AUTHORITY["EPSG","9001"]],AXIS["Easting",NORTH],AXIS["Northing",NORTH],AUTHORITY["EPSG","3031"]]`, "metre"},
		{`PROJCRS["NAD83 / California zone 3 (ftUS)",BASEGEOGCRS["NAD83",DATUM["North American Datum 1983",ELLIPSOID["GRS 1980",6378137,298.257222101,LENGTHUNIT["metre",1]]],PRIMEM["Greenwich",0,ANGLEUNIT["degree",0.0174532925199433]],ID["EPSG",4269]],CONVERSION["SPCS83 California zone 3 (US Survey feet)",METHOD["Lambert Conic Conformal (2SP)",ID["EPSG",9802]],PARAMETER["Latitude of false origin",36.5,ANGLEUNIT["degree",0.0174532925199433],ID["EPSG",8821]],PARAMETER["Longitude of false origin",-120.5,ANGLEUNIT["degree",0.0174532925199433],ID["EPSG",8822]],PARAMETER["Latitude of 1st standard parallel",38.4333333333333,ANGLEUNIT["degree",0.0174532925199433],ID["EPSG",8823]],PARAMETER["Latitude of 2nd standard parallel",37.0666666666667,ANGLEUNIT["degree",0.0174532925199433],ID["EPSG",8824]],PARAMETER["Easting at false origin",6561666.667,LENGTHUNIT["US survey foot",0.304800609601219],ID["EPSG",8826]],PARAMETER["Northing at false origin",1640416.667,LENGTHUNIT["US survey foot",0.304800609601219],ID["EPSG",8827]]],CS[Cartesian,2],AXIS["easting (X)",east,ORDER[1],LENGTHUNIT["US survey foot",0.304800609601219]],AXIS["northing (Y)",north,ORDER[2],LENGTHUNIT["US survey foot",0.304800609601219]],USAGE[SCOPE["Engineering survey, topographic mapping."],AREA["United States (USA) - California - counties Alameda; Calaveras; Contra Costa; Madera; Marin; Mariposa; Merced; Mono; San Francisco; San Joaquin; San Mateo; Santa Clara; Santa Cruz; Stanislaus; Tuolumne."],BBOX[36.73,-123.02,38.71,-117.83]],ID["EPSG",2227]]`, "US survey foot"},
		{`PROJCS["NAD83 / California zone 3 (ftUS)",GEOGCS["NAD83",DATUM["North_American_Datum_1983",SPHEROID["GRS 1980",6378137,298.257222101,AUTHORITY["EPSG","7019"]],AUTHORITY["EPSG","6269"]],PRIMEM["Greenwich",0,AUTHORITY["EPSG","8901"]],UNIT["degree",0.0174532925199433,AUTHORITY["EPSG","9122"]],AUTHORITY["EPSG","4269"]],PROJECTION["Lambert_Conformal_Conic_2SP"],PARAMETER["latitude_of_origin",36.5],PARAMETER["central_meridian",-120.5],PARAMETER["standard_parallel_1",38.4333333333333],PARAMETER["standard_parallel_2",37.0666666666667],PARAMETER["false_easting",6561666.667],PARAMETER["false_northing",1640416.667],UNIT["US survey foot",0.304800609601219,AUTHORITY["EPSG","9003"]],AXIS["Easting",EAST],AXIS["Northing",NORTH],AUTHORITY["EPSG","2227"]]`, "US survey foot"},
	} {
		if got := gridUnitText(tc.crs); got != tc.want {
			t.Errorf("gridUnitText(%.60q...) = %q, want %q", tc.crs, got, tc.want)
		}
	}
}

// TestMapBackgroundCells: the PNG canvas scales images bilinearly, so a
// coarse grid's suitability (20 x 15 cells) was drawn as a smooth blur in
// extent_maps.png while the SVG draws its cells (image-rendering:
// pixelated). Drawn from blockScale's blocks, a pixel 40% across a
// two-cell image is the first cell's colour, as in the SVG; scaled
// bilinearly from the two pixels it was a blend (70% of the first).
func TestMapBackgroundCells(t *testing.T) {
	src := image.NewRGBA(image.Rect(0, 0, 2, 1))
	src.Set(0, 0, color.RGBA{0, 0, 0, 255})
	src.Set(1, 0, color.RGBA{255, 255, 255, 255})
	w, h := 100*vg.Millimeter/4, 10*vg.Millimeter
	c := newPNGCanvas(w, h)
	c.DrawImage(vg.Rectangle{Max: vg.Point{X: w, Y: h}}, blockScale(src, w))
	b := c.img.Bounds()
	for _, frac := range []float64{0.1, 0.4, 0.6, 0.9} {
		x := b.Min.X + int(frac*float64(b.Dx()))
		got := c.img.RGBAAt(x, b.Min.Y+b.Dy()/2)
		want := uint8(0)
		if frac > 0.5 {
			want = 255
		}
		if got.R != want {
			t.Errorf("pixel %.0f%% across: red %d, want %d (a cell's own colour)", 100*frac, got.R, want)
		}
	}
	if one := blockScale(src, 0); one != src {
		t.Error("a map too small for blocks got a copy")
	}
}

// TestGridAxisUnit: a map of a grid in metres was labelled in metres,
// 7-digit ticks such as 3500000 that crowd a narrow panel; it is now
// labelled in km. The WKT is GDAL's (osr ImportFromEPSG(3035),
// ExportToWkt, WKT2_2018), whose axes are in metres; the feet CRS keeps
// its own unit. The expected ticks are niceTicks' on the range divided by
// 1000, worked by hand: 2,500 to 7,000 km with at most 4 labels takes the
// step 2,000 km (1,000 gives 5 labels), so 4,000 and 6,000 km.
func TestGridAxisUnit(t *testing.T) {
	laea := `PROJCRS["ETRS89-extended / LAEA Europe",BASEGEOGCRS["ETRS89",DATUM["European Terrestrial Reference System 1989",ELLIPSOID["GRS 1980",6378137,298.257222101,LENGTHUNIT["metre",1]]],PRIMEM["Greenwich",0,ANGLEUNIT["degree",0.0174532925199433]],ID["EPSG",4258]],CONVERSION["Europe Equal Area 2001",METHOD["Lambert Azimuthal Equal Area",ID["EPSG",9820]]],CS[Cartesian,2],AXIS["northing (Y)",north,ORDER[1],LENGTHUNIT["metre",1]],AXIS["easting (X)",east,ORDER[2],LENGTHUNIT["metre",1]],ID["EPSG",3035]]`
	feet := `PROJCS["NAD83 / California zone 3 (ftUS)",GEOGCS["NAD83",DATUM["North_American_Datum_1983",SPHEROID["GRS 1980",6378137,298.257222101]],UNIT["degree",0.0174532925199433]],PROJECTION["Lambert_Conformal_Conic_2SP"],UNIT["US survey foot",0.304800609601219],AUTHORITY["EPSG","2227"]]`
	for _, tc := range []struct {
		g    Grid
		unit string
		div  float64
	}{
		{Grid{CRS: laea}, "km", 1000},
		{Grid{CRS: feet}, "US survey foot", 1},
		{Grid{CRS: "EPSG:3031"}, "EPSG:3031 units", 1},
		{Grid{CRS: "EPSG:3035", Unit: "metre", UnitM: 1}, "km", 1000},
		{Grid{CRS: "EPSG:2227", Unit: "US survey foot", UnitM: 0.304800609601219}, "US survey foot", 1},
		{Grid{CRS: "+proj=laea +units=km", Unit: "kilometre", UnitM: 1000}, "km", 1},
	} {
		if u, d := gridAxisUnit(tc.g); u != tc.unit || d != tc.div {
			t.Errorf("gridAxisUnit(%.40q, %q, %g) = %q, %g; want %q, %g", tc.g.CRS, tc.g.Unit, tc.g.UnitM, u, d, tc.unit, tc.div)
		}
	}
	ts := gridTicks{Div: 1000, N: 4}.Ticks(2.5e6, 7e6)
	var got []string
	for _, tk := range ts {
		got = append(got, fmt.Sprintf("%g=%s", tk.Value, tk.Label))
	}
	if want := []string{"4e+06=4000", "6e+06=6000"}; !slices.Equal(got, want) {
		t.Errorf("gridTicks{1000, 4} on 2.5e6..7e6 = %v, want %v", got, want)
	}
}

// TestMapLoneExtentTitle: a map panel holding one extent in no chain (a
// study whose region covers the raster and has no buffers: the base
// region alone) is titled by its id; it was titled "extents in no chain",
// as if it held several (found by the figure audit). Two or more keep
// the group's title.
func TestMapLoneExtentTitle(t *testing.T) {
	r := manyExtents(t, 10)
	var base, whole Extent
	for _, e := range r.Extents {
		switch e.Kind {
		case vocab.KindBase:
			base = e
		case vocab.KindWholeRaster:
			whole = e
		}
	}
	if base.ID == "" || whole.ID == "" {
		t.Fatalf("base %+v, whole %+v", base, whole)
	}
	// In no chain, as when nothing else nests them.
	base.Chain, whole.Chain = "", ""
	r.Extents = []Extent{base}
	if gs := mapGroups(r); len(gs) != 1 || gs[0].title != "extent in no chain" {
		t.Errorf("one extent: groups %+v, want one titled %q", gs, "extent in no chain")
	}
	r.Extents = []Extent{base, whole}
	if gs := mapGroups(r); len(gs) != 1 || gs[0].title != "extents in no chain" {
		t.Errorf("two extents: groups %+v, want one titled %q", gs, "extents in no chain")
	}
}

// TestMapSmallExtentCircled: an extent of a few km² on a map of a few
// thousand km (a 0.2° square, 378 km², on the demo's 30° grid) covered
// one cell of the 240-cell preview, so its outline was a square of about
// 1 pt, hidden under the point marks: named under the panel, nowhere to
// be seen. An extent whose cells span at most 1/64 of the preview's width
// and height is now circled in its outline's colour, and the caption
// names it; one that covers no preview cell at all is named as having
// no outline. Larger extents are not circled.
func TestMapSmallExtentCircled(t *testing.T) {
	for _, tc := range []struct {
		mask  [][2]int // cells (column, row) of a 256 x 256 preview
		small bool
	}{
		{[][2]int{{100, 100}}, true},
		{[][2]int{{100, 100}, {103, 103}}, true}, // 4 cells across: 4 <= 256/64
		{[][2]int{{100, 100}, {104, 100}}, false},
		{nil, false},
	} {
		m := make([]bool, 256*256)
		for _, c := range tc.mask {
			m[c[1]*256+c[0]] = true
		}
		if _, small := smallMask(m, 256, 256); small != tc.small {
			t.Errorf("cells %v: small %v, want %v", tc.mask, small, tc.small)
		}
	}

	// A family of the base region, the whole raster, a user extent of two
	// cells and one of none, on a 256 x 256 preview.
	r := manyExtents(t, 10)
	var keep []Extent
	for _, e := range r.Extents {
		if e.Kind == vocab.KindBase || e.Kind == vocab.KindWholeRaster {
			keep = append(keep, e)
		}
	}
	const w = 256
	disc := func(rad float64) []bool {
		m := make([]bool, w*w)
		for i := range m {
			dx, dy := float64(i%w)+0.5-w/2, float64(i/w)+0.5-w/2
			m[i] = dx*dx+dy*dy <= rad*rad
		}
		return m
	}
	tiny := make([]bool, w*w)
	tiny[60*w+200], tiny[60*w+201] = true, true
	masks := [][]bool{disc(60), disc(1e9)}
	if keep[0].Kind != vocab.KindBase {
		masks[0], masks[1] = masks[1], masks[0]
	}
	keep = append(keep, Extent{ID: "user_tiny", Kind: vocab.KindUser, Params: "file=tiny.gpkg", Status: vocab.StatusOK, AreaKm2: 378},
		Extent{ID: "user_none", Kind: vocab.KindUser, Params: "file=none.gpkg", Status: vocab.StatusOK, AreaKm2: 20})
	masks = append(masks, tiny, make([]bool, w*w))
	r.Extents = keep
	r.Preview = NewPreview(w, w, r.Preview.Bounds, make([]float64, w*w), 0, 1, masks)

	f, ok := mapFigure(r)
	if !ok {
		t.Fatal("no map figure")
	}
	if !strings.Contains(f.Caption, "A circle in its outline's colour marks user_tiny,") {
		t.Errorf("caption does not name the circled extent: %s", f.Caption)
	}
	if !strings.Contains(f.Caption, "user_none covers no cell of the coarse copy, so it has no outline here") {
		t.Errorf("caption does not name the extent without an outline: %s", f.Caption)
	}
	rec := &recorder.Canvas{}
	if err := f.draw(draw.NewCanvas(rec, f.W, f.H)); err != nil {
		t.Fatal(err)
	}
	rings := 0
	for _, a := range rec.Actions {
		st, ok := a.(*recorder.Stroke)
		if !ok {
			continue
		}
		for _, c := range st.Path {
			if c.Type == vg.ArcComp && c.Radius == smallRingRadius {
				rings++
			}
		}
	}
	if rings != 1 {
		t.Errorf("%d circles of radius %v pt drawn, want 1 (user_tiny's)", rings, smallRingRadius.Points())
	}
}

// TestScaleBarLabel: the scale bar of a map a few hundred metres across
// (a grid of 5 m cells) read "0 km" at its end, its length rounded to
// whole kilometres. Below 1 km it now reads in metres. Lengths are the
// bar's round values (1, 2 or 5 x 10^k km); labels worked by hand.
func TestScaleBarLabel(t *testing.T) {
	for _, tc := range []struct {
		km   float64
		want string
	}{
		{10000, "10000 km"},
		{2, "2 km"},
		{1, "1 km"},
		{0.5, "500 m"},
		{0.1, "100 m"},
		{0.02, "20 m"},
		{0.001, "1 m"},
		{0.0005, "0.5 m"},
	} {
		if got := scaleBarLabel(tc.km); got != tc.want {
			t.Errorf("scaleBarLabel(%g) = %q, want %q", tc.km, got, tc.want)
		}
	}
	// The bar itself on a map of 0.0005 km per point (about 100 m of bar
	// on a 500 pt key).
	rec := &recorder.Canvas{}
	drawScaleBar(draw.NewCanvas(rec, 500, 60), 0.0005)
	var labels []string
	for _, a := range rec.Actions {
		if fs, ok := a.(*recorder.FillString); ok {
			labels = append(labels, fs.String)
		}
	}
	if !slices.Contains(labels, "100 m") {
		t.Errorf("scale bar labels %q, want one of 100 m", labels)
	}
}

// TestMapCoarseCellsNotCut: outlines had every corner cut by half a
// preview cell, so on a coarse grid (6 x 5 cells of 1°, each about 80 pt
// on the map) a base region made of whole cells, a rectangle, was drawn
// as an octagon half a cell inside its corners. Corners are now cut only
// where a cell is under maxCutCellPt on the panel (the demo's 240-cell
// preview, about 1 pt a cell, still is), and the caption says which.
func TestMapCoarseCellsNotCut(t *testing.T) {
	base, _ := anchorStyle(vocab.KindBase)
	for _, tc := range []struct {
		w, h    int
		cut     bool
		caption string
	}{
		{6, 5, false, "Outlines follow the edges of the coarse copy's cells"},
		{240, 200, true, "Outlines follow the coarse copy's cells with their corners cut"},
	} {
		r := baseAndWhole(t)
		// base: the middle third of the cells in each direction; the
		// whole raster: every cell.
		masks := make([][]bool, len(r.Extents))
		for k, e := range r.Extents {
			masks[k] = make([]bool, tc.w*tc.h)
			for i := range masks[k] {
				c, row := i%tc.w, i/tc.w
				masks[k][i] = e.Kind == vocab.KindWholeRaster || (c >= tc.w/3 && c < 2*tc.w/3 && row >= tc.h/3 && row < 2*tc.h/3)
			}
		}
		r.Preview = NewPreview(tc.w, tc.h, r.Preview.Bounds, make([]float64, tc.w*tc.h), 0, 1, masks)
		f, ok := mapFigure(r)
		if !ok {
			t.Fatal("no map figure")
		}
		if !strings.Contains(f.Caption, tc.caption) {
			t.Errorf("%d x %d cells: caption lacks %q", tc.w, tc.h, tc.caption)
		}
		rec := &recorder.Canvas{}
		if err := f.draw(draw.NewCanvas(rec, f.W, f.H)); err != nil {
			t.Fatal(err)
		}
		var current color.Color
		diagonal, segments := false, 0
		for _, a := range rec.Actions {
			switch a := a.(type) {
			case *recorder.SetColor:
				current = a.Color
			case *recorder.Stroke:
				if current != base.Color {
					continue
				}
				for k := 1; k < len(a.Path); k++ {
					p, q := a.Path[k-1].Pos, a.Path[k].Pos
					if a.Path[k].Type == vg.LineComp {
						segments++
						diagonal = diagonal || (math.Abs(float64(q.X-p.X)) > 1e-6 && math.Abs(float64(q.Y-p.Y)) > 1e-6)
					}
				}
			}
		}
		if segments == 0 {
			t.Fatalf("%d x %d cells: no outline of base drawn", tc.w, tc.h)
		}
		if diagonal != tc.cut {
			t.Errorf("%d x %d cells: base outline has diagonal segments %v, want %v", tc.w, tc.h, diagonal, tc.cut)
		}
	}
}

// baseAndWhole is manyExtents(t, 10) kept to its base extent and whole
// raster: one map panel.
func baseAndWhole(t *testing.T) *Results {
	r := manyExtents(t, 10)
	var keep []Extent
	for _, e := range r.Extents {
		if e.Kind == vocab.KindBase || e.Kind == vocab.KindWholeRaster {
			keep = append(keep, e)
		}
	}
	r.Extents = keep
	return r
}

// TestMapLayoutNarrowStripEnds: a study strip much wider than tall (60 x
// 1000 cells, and one row of 2000) whose map has one panel (one column,
// 85 mm) never finished its report: trying four columns left a panel 16 pt
// wide, its key wrapped into a negative width, and wordPieces appended
// empty pieces forever (found by a run on such a grid, memory growing to
// 13 GB). The layout now ends, in one column; wrapText with no room gives
// a character a line and loses none.
func TestMapLayoutNarrowStripEnds(t *testing.T) {
	r := baseAndWhole(t)
	groups := mapGroups(r)
	s := "test point omitted at the minimum training_presence (1)"
	widths := []vg.Length{-14, 0, 1}
	type result struct {
		l       mapLayout
		wrapped []string
	}
	done := make(chan result, 1)
	go func() {
		var res result
		for _, hw := range []float64{0.06, 0.0005} {
			res.l = layoutMapPanels(r, groups, oneColumn, maxHeight-40*vg.Millimeter, hw)
		}
		for _, w := range widths {
			res.wrapped = append(res.wrapped, wrapText(s, minFontPt, w))
		}
		done <- res
	}()
	select {
	case res := <-done:
		if res.l.cols != 1 || res.l.shown != len(groups) {
			t.Errorf("%d columns showing %d, want 1 showing %d", res.l.cols, res.l.shown, len(groups))
		}
		for i, got := range res.wrapped {
			if strings.ReplaceAll(strings.ReplaceAll(got, "\n", ""), " ", "") != strings.ReplaceAll(s, " ", "") {
				t.Errorf("width %v: %q wrapped as %q", widths[i], s, got)
			}
		}
	case <-time.After(30 * time.Second):
		t.Fatal("the layout of a narrow strip's map, or wrapping into no room, did not end in 30 s")
	}
}

// TestLatitudeLabelsThinned: on the map of a strip one row tall (0.01°
// over 20°) the latitude labels 49.8°N, 50.0°N and 50.2°N were drawn
// over one another in a map 8 pt tall. With the axis's length given,
// labels closer than 1.2 times their height are thinned, one alone (the
// middle's) on an axis too short for two; a tall axis keeps them all.
// Expected labels by construction (niceTicks' steps).
func TestLatitudeLabelsThinned(t *testing.T) {
	labels := func(ts []plot.Tick) []string {
		var out []string
		for _, tk := range ts {
			if tk.Label != "" {
				out = append(out, tk.Label)
			}
		}
		return out
	}
	for _, tc := range []struct {
		h    vg.Length
		want string
	}{
		{0, "49.8°N 49.9°N 50.0°N 50.1°N 50.2°N"},   // no length: as before
		{200, "49.8°N 49.9°N 50.0°N 50.1°N 50.2°N"}, // 50 pt apart
		{30, "49.8°N 50.0°N 50.2°N"},                // 7.5 pt apart: every 2nd
		{8, "50.0°N"},                               // too short for two
	} {
		got := strings.Join(labels(degreeTicks{H: tc.h}.Ticks(49.79, 50.21)), " ")
		if got != tc.want {
			t.Errorf("axis %v pt: labels %q, want %q", float64(tc.h), got, tc.want)
		}
	}
}
