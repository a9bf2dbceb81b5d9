package extent

import (
	"fmt"
	"strings"
	"testing"
)

// TestEcoregionTouchingAcrossAntimeridian: on a grid running 170..190
// degrees east, unit W (177..180 E, holding the training points) and unit
// E (180..181 E written as -180..-179) share the meridian of 180 degrees,
// as unit S (174..177 E) shares W's west edge; unit F (171..173 E) touches
// neither. E and S are the touching units: with the units' longitudes as
// written, E used to be missed.
func TestEcoregionTouchingAcrossAntimeridian(t *testing.T) {
	dir := t.TempDir()
	rect := func(x0, x1, y0, y1 float64) [][2]float64 {
		return [][2]float64{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}, {x0, y0}}
	}
	units := writeGeoJSON(t, dir, "units.geojson", []string{"W", "E", "S", "F"},
		[][][2]float64{rect(177, 180, -17, -11), rect(-180, -179, -12, -11), rect(174, 177, -17, -15), rect(171, 173, -13, -11)})
	region := writeGeoJSON(t, dir, "r.geojson", []string{"r"}, [][][2]float64{rect(175, 185, -18, -12)})
	g, v := geoGrid(t, 170, -10, 0.1, 200, 100)
	train := []LonLat{{178, -14}, {179.5, -16}, {177.5, -12}}
	f, err := Build(g, v, Spec{Region: region, Train: train, Ecoregions: units, EcoregionField: "id", EcoregionMinPoints: 1}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	m := f.Members[memberIdx(t, f, "ecoregions_k1_touching")]
	if !strings.HasSuffix(m.Params, "plus touching units=E,S") {
		t.Errorf("touching member %q, want the units E and S added", m.Params)
	}
	// W is 30 x 60 cells, E 10 x 10 and S 30 x 20 (cell centres strictly
	// inside: no edge falls on a centre).
	if m.Cells != 1800+100+600 {
		t.Errorf("touching member has %d cells, want %d (W, E and S)", m.Cells, 1800+100+600)
	}
}

// TestEcoregionTouchingFloatSeam: a 4 x 3 tiling of units whose shared
// edges were computed twice in floating point (a unit's top at
// -40 - 2 x 5/3 = -43.333333333333336, the unit above's bottom at
// -41.666666666666664 - 5/3 = -43.33333333333333: a gap of 7e-15
// degrees), as a tool writing each unit from its own corner does. The
// training points lie in the middle 2 x 2 units, and every other unit
// shares an edge or a corner with them, so the touching member is the
// whole 120 x 100-cell grid (by construction). The bottom row, behind
// the gap, was left out.
func TestEcoregionTouchingFloatSeam(t *testing.T) {
	dir := t.TempDir()
	var ids []string
	var rings [][][2]float64
	for i := 0; i < 4; i++ {
		for j := 0; j < 3; j++ {
			x0, y0 := 20+float64(i)*1.5, -40-float64(j)*(5.0/3)
			x1, y1 := x0+1.5, y0-5.0/3
			ids = append(ids, fmt.Sprintf("u%d%d", i, j))
			rings = append(rings, [][2]float64{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}, {x0, y0}})
		}
	}
	units := writeGeoJSON(t, dir, "units.geojson", ids, rings)
	region := writeGeoJSON(t, dir, "r.geojson", []string{"r"}, [][][2]float64{{{21, -41}, {24.5, -41}, {24.5, -43}, {21, -43}, {21, -41}}})
	g, v := geoGrid(t, 20, -40, 0.05, 120, 100)
	train := []LonLat{{22.2, -41}, {22.2, -42.5}, {23.7, -41}, {23.7, -42.5}}
	f, err := Build(g, v, Spec{Region: region, Train: train, Ecoregions: units, EcoregionField: "id", EcoregionMinPoints: 1}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	m := f.Members[memberIdx(t, f, "ecoregions_k1_touching")]
	if !strings.HasSuffix(m.Params, "plus touching units=u00,u01,u02,u12,u22,u30,u31,u32") {
		t.Errorf("touching member %q, want every other unit added", m.Params)
	}
	if m.Cells != 12000 {
		t.Errorf("touching member has %d cells, want 12000 (the whole grid)", m.Cells)
	}
}
