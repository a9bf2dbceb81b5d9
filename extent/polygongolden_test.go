package extent

import (
	"encoding/json"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// polygonGolden is testdata/polygons/golden.json, written by golden.py
// from GEOS (osgeo.ogr) and OGR's coordinate transformations.
type polygonGolden struct {
	Cases []struct {
		Name     string     `json:"name"`
		CRS      string     `json:"crs"`
		GT       [6]float64 `json:"gt"`
		Width    int        `json:"width"`
		Height   int        `json:"height"`
		LayerCRS string     `json:"layer_crs"`
		Features []struct {
			ID  string `json:"id"`
			WKT string `json:"wkt"`
		} `json:"features"`
		Units []struct {
			ID       string   `json:"id"`
			Inside   [][3]int `json:"inside"`
			Boundary [][2]int `json:"boundary"`
		} `json:"units"`
		Tiled    [][2]int     `json:"tiled"`
		Train    [][2]float64 `json:"train"`
		Occupied []string     `json:"occupied"`
	} `json:"cases"`
}

// TestPolygonGolden: the cells Fill gives each unit of a polygon layer
// (ReadShape for a region, ReadUnits for ecoregion units) and the units
// Contains puts training points in, against testdata/polygons/golden.json:
// every centre GEOS finds strictly inside a unit is filled, no centre
// outside it is, a centre on its boundary may go either way (README: to
// one side only), and a boundary centre inside a tiling goes to exactly
// one unit. The cases (golden.py) are messy layers: holes, islands, a
// region off the raster, vertices on cell centres, ids shared by several
// features, a layer in another CRS than the raster, units across the
// antimeridian on global grids, a polar cap on a polar stereographic
// raster and invalid polygons.
func TestPolygonGolden(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "testdata", "polygons", "golden.json"))
	if err != nil {
		t.Fatal(err)
	}
	var gold polygonGolden
	if err := json.Unmarshal(b, &gold); err != nil {
		t.Fatal(err)
	}
	if len(gold.Cases) == 0 {
		t.Fatal("golden.json holds no case")
	}
	epsg := func(t *testing.T, code string) *godal.SpatialRef {
		n, err := strconv.Atoi(strings.TrimPrefix(code, "EPSG:"))
		if err != nil {
			t.Fatal(err)
		}
		sr, err := godal.NewSpatialRefFromEPSG(n)
		if err != nil {
			t.Fatal(err)
		}
		return sr
	}
	for _, tc := range gold.Cases {
		t.Run(tc.Name, func(t *testing.T) {
			g, err := NewGrid(tc.Width, tc.Height, tc.GT, tc.CRS)
			if err != nil {
				t.Fatal(err)
			}
			sr := epsg(t, tc.LayerCRS)
			defer sr.Close()
			region := len(tc.Units) == 1 && tc.Units[0].ID == ""
			var fields []LayerField
			if !region {
				fields = []LayerField{{"id", godal.FTString}}
			}
			var feats []Feature
			for _, f := range tc.Features {
				geom, err := godal.NewGeometryFromWKT(f.WKT, sr)
				if err != nil {
					t.Fatal(err)
				}
				wkb, err := geom.WKB()
				geom.Close()
				if err != nil {
					t.Fatal(err)
				}
				ft := Feature{WKB: wkb}
				if !region {
					ft.Values = []any{f.ID}
				}
				feats = append(feats, ft)
			}
			path := filepath.Join(t.TempDir(), "layer.gpkg")
			if err := WriteLayer(path, "layer", sr, godal.GTUnknown, fields, feats); err != nil {
				t.Fatal(err)
			}
			var units []Unit
			if region {
				s, _, err := ReadShape(path, g)
				if err != nil {
					t.Fatal(err)
				}
				units = []Unit{{Shape: s}}
			} else if units, _, err = ReadUnits(path, "id", g); err != nil {
				t.Fatal(err)
			}
			byID := map[string]Unit{}
			for _, u := range units {
				byID[u.ID] = u
			}
			count := make([]int, g.Cells())
			cells := 0
			for _, want := range tc.Units {
				u, ok := byID[want.ID]
				if !ok {
					t.Fatalf("no unit %q", want.ID)
				}
				filled := make([]bool, g.Cells())
				Fill(g, u.Shape.Grid, func(row, c0, c1 int) {
					for c := c0; c < c1; c++ {
						filled[row*g.Width+c] = true
						count[row*g.Width+c]++
					}
				})
				either := make([]bool, g.Cells())
				for _, rc := range want.Boundary {
					either[rc[0]*g.Width+rc[1]] = true
				}
				inside := make([]bool, g.Cells())
				for _, r := range want.Inside {
					for c := r[1]; c < r[2]; c++ {
						inside[r[0]*g.Width+c] = true
					}
				}
				bad := 0
				for i := range filled {
					if filled[i] != inside[i] && !either[i] {
						if bad < 3 {
							t.Errorf("unit %q: cell (col %d, row %d) filled %v, GEOS: inside %v", want.ID, i%g.Width, i/g.Width, filled[i], inside[i])
						}
						bad++
					}
				}
				if bad > 0 {
					t.Errorf("unit %q: %d of %d cells differ from GEOS", want.ID, bad, g.Cells())
				}
				cells += g.Cells()
			}
			for _, rc := range tc.Tiled {
				if n := count[rc[0]*g.Width+rc[1]]; n != 1 {
					t.Errorf("centre of cell (col %d, row %d), on the edges of a tiling, is in %d units, want 1", rc[1], rc[0], n)
				}
			}
			if tc.Train != nil {
				lons := make([]float64, len(tc.Train))
				lats := make([]float64, len(tc.Train))
				for i, p := range tc.Train {
					lons[i], lats[i] = p[0], p[1]
				}
				xs := make([]float64, len(lons))
				ys := make([]float64, len(lons))
				g.FromLonLat(lons, lats, xs, ys)
				var occupied []string
				for _, u := range units {
					for i := range xs {
						if Contains(g, u.Shape.Grid, xs[i], ys[i]) {
							occupied = append(occupied, u.ID)
							break
						}
					}
				}
				sort.Strings(occupied)
				if strings.Join(occupied, "|") != strings.Join(tc.Occupied, "|") {
					t.Errorf("units holding training points %q, GEOS: %q", occupied, tc.Occupied)
				}
			}
			t.Logf("%d unit cells, %d tiled boundary centres compared", cells, len(tc.Tiled))
		})
	}
}
